import path from 'node:path';
import { afterEach, beforeEach, describe, expect, it } from 'vitest';
import type { ReadCheck } from '../../../app/api/commands/pilot.ts';
import type { ApiResult } from '../../../app/api/define.ts';
import { dispatch } from '../../../app/api/dispatch.ts';
import { Session } from '../../../app/api/session.ts';
import { addFacet } from '../../../app/phases/construct/index.ts';
import { addItem } from '../../../app/phases/items/index.ts';
import type { DataFilePreview } from '../../../app/phases/pilot/index.ts';
import type { TaskStatus } from '../../../app/workers/tasks.ts';
import { listDatasets, loadDatasetFile } from '../../../db/repos/datasets.ts';
import { TEST_ACTOR, tempDir } from '../../helpers/tmp.ts';
import { makeWorkbook } from '../import/xlsx-writer.ts';

const CODES = ['Q1', 'Q2', 'Q3', 'Q4'];
const CSV =
  'id,q1,q2,q3,q4,duration\nr1,1,2,3,4,300\nr2,4,-9,5,3,310\nr3,2,2,,2,290\nr4,5,4,3,5,40\nr5,3,3,3,3,305\n';

let tmp: ReturnType<typeof tempDir>;
let session: Session;
beforeEach(() => {
  tmp = tempDir();
  session = new Session(TEST_ACTOR, 'test');
  session.create(path.join(tmp.dir, 's.scalewright'), 'S');
  const facet = addFacet(session.study, 'Test facet', '');
  for (const code of CODES) {
    addItem(session.study, {
      code,
      text: `Test wording of item ${code}`,
      facetId: facet,
      keying: 'forward',
      sourceType: 'own-drafting',
      sourceNote: '',
    });
  }
});
afterEach(async () => {
  await session.shutdown();
  tmp.cleanup();
});

const base64 = (text: string | Uint8Array) => Buffer.from(text).toString('base64');

async function ok<T>(name: string, input: unknown): Promise<T> {
  const result = (await dispatch(session, name, input)) as ApiResult<T>;
  if (!result.ok) throw new Error(`${name} failed: ${result.error.code}: ${result.error.message}`);
  return result.value;
}

async function failure(name: string, input: unknown): Promise<{ code: string; message: string }> {
  const result = await dispatch(session, name, input);
  if (result.ok) throw new Error(`${name} should have failed`);
  return result.error;
}

function studyState() {
  const s = session.study;
  return { log: s.log.count(), head: s.meta('log_head'), datasets: listDatasets(s).length };
}

async function waitFor(taskId: string): Promise<TaskStatus> {
  for (;;) {
    const status = await ok<TaskStatus>('task.status', { id: taskId });
    if (status.state !== 'running') return status;
    await new Promise((resolve) => setTimeout(resolve, 20));
  }
}

async function stage(fileName: string, content: string | Uint8Array) {
  return ok<{ stageId: string; preview: DataFilePreview }>('pilot.stage', {
    fileName,
    content: base64(content),
  });
}

describe('the import commands', () => {
  it('stage, preview, read in a worker, check and confirm: nothing stored until the confirmation', async () => {
    const before = studyState();
    const { stageId, preview } = await stage('pilot.csv', CSV);
    expect(preview.proposal.mapping).toMatchObject({
      id: { role: 'id' },
      q1: { role: 'item', itemCode: 'Q1' },
      duration: { role: 'duration' },
    });
    expect(preview.suggestedMissing).toEqual([{ code: '-9', numeric: true, cells: 1 }]);
    const semicolons = await ok<DataFilePreview>('pilot.preview', { stageId, reading: { delimiter: ';' } });
    expect(semicolons.header).toEqual(['id,q1,q2,q3,q4,duration']);
    const started = await ok<{ taskId: string }>('pilot.startRead', {
      stageId,
      role: 'pilot',
      name: '',
      mapping: preview.proposal.mapping,
      missingCodes: { text: [], numeric: [-9] },
    });
    await waitFor(started.taskId);
    const check = await ok<ReadCheck>('pilot.collectRead', { taskId: started.taskId });
    expect(check).toMatchObject({
      respondents: 5,
      problemCount: 0,
      name: 'pilot',
      encoding: 'utf-8',
      delimiterName: 'comma',
    });
    expect(check.columns.find((c) => c.name === 'q2')).toEqual({
      name: 'q2',
      role: 'item',
      itemCode: 'Q2',
      missing: 1,
    });
    expect(studyState()).toEqual(before);
    const stored = await ok<{ datasetId: number; name: string }>('pilot.confirmImport', {
      readId: check.readId,
      name: 'Spring pilot',
    });
    expect(stored.name).toBe('Spring pilot');
    expect(studyState().datasets).toBe(before.datasets + 1);
    expect(Buffer.from(loadDatasetFile(session.study, stored.datasetId) ?? []).toString()).toBe(CSV);
    // The staged file is gone: confirming again is refused.
    expect((await failure('pilot.confirmImport', { readId: check.readId })).code).toBe('not-found');
  });

  it('lists problems by row and column, stores only when they are accepted', async () => {
    const { stageId, preview } = await stage('pilot.csv', CSV);
    const started = await ok<{ taskId: string }>('pilot.startRead', {
      stageId,
      role: 'pilot',
      mapping: preview.proposal.mapping,
      missingCodes: { text: [], numeric: [] },
    });
    await waitFor(started.taskId);
    const check = await ok<ReadCheck>('pilot.collectRead', { taskId: started.taskId });
    expect(check.problems).toEqual([
      {
        row: 3,
        column: 'q2',
        message:
          "row 3, column 'q2': value -9 is outside the declared scale 1 to 5 (kept as is, not clipped)",
      },
    ]);
    const before = studyState();
    const refused = await failure('pilot.confirmImport', { readId: check.readId });
    expect(refused).toMatchObject({ code: 'problems' });
    expect(refused.message).toMatch(/1 cell needs a look, the first at row 3, column 'q2'/);
    expect(studyState()).toEqual(before);
    await ok('pilot.confirmImport', { readId: check.readId, acceptProblems: true });
    expect(studyState().datasets).toBe(before.datasets + 1);
  });

  it('a cancelled read leaves the study exactly as it was', async () => {
    const big = `id,q1,q2,q3\n${Array.from({ length: 400_000 }, (_, i) => `r${i},1,2,3`).join('\n')}\n`;
    const { stageId, preview } = await stage('big.csv', big);
    const before = studyState();
    const started = await ok<{ taskId: string }>('pilot.startRead', {
      stageId,
      role: 'pilot',
      mapping: preview.proposal.mapping,
      missingCodes: { text: [], numeric: [] },
    });
    await ok('task.cancel', { id: started.taskId });
    const status = await waitFor(started.taskId);
    expect(status.state).toBe('cancelled');
    const collected = await failure('pilot.collectRead', { taskId: started.taskId });
    expect(collected).toEqual({
      code: 'cancelled',
      message: 'reading "big.csv" was cancelled; nothing was stored',
    });
    expect(studyState()).toEqual(before);
  });

  it('reads an .xlsx workbook', async () => {
    const book = makeWorkbook([
      {
        name: 'Wave 1',
        rows: [
          ['id', 'q1', 'q2', 'q3'],
          ['r1', 1, 2, 3],
          ['r2', 2, 3, 4],
        ],
      },
    ]);
    const { stageId, preview } = await stage('pilot.xlsx', book);
    expect(preview).toMatchObject({ kind: 'workbook', sheet: 'Wave 1', sheets: ['Wave 1'], delimiter: '' });
    const started = await ok<{ taskId: string }>('pilot.startRead', {
      stageId,
      role: 'validation',
      mapping: preview.proposal.mapping,
      missingCodes: { text: [], numeric: [] },
      reading: { sheet: 'Wave 1' },
    });
    await waitFor(started.taskId);
    const check = await ok<ReadCheck>('pilot.collectRead', { taskId: started.taskId });
    expect(check).toMatchObject({ kind: 'workbook', sheet: 'Wave 1', respondents: 2, role: 'validation' });
    await ok('pilot.confirmImport', { readId: check.readId });
    // The first validation data of the study becomes current: two rows, the import and the choice.
    expect(session.study.log.list({ limit: 2 })).toMatchObject([
      { phase: 'validity', kind: 'dataset-made-current' },
      { phase: 'validity', kind: 'dataset-imported' },
    ]);
  });

  it('answers bad files and bad requests with clear messages, never a crash', async () => {
    const before = studyState();
    expect(await failure('pilot.stage', { fileName: 'bad.csv', content: base64('id,q1\nr1,"2\n') })).toEqual({
      code: 'file',
      message: expect.stringMatching(
        /^bad\.csv: row 2, column 2 \('q1'\).*a quoted field is opened and never closed$/,
      ),
    });
    expect(await failure('pilot.stage', { fileName: 'empty.csv', content: '' })).toMatchObject({
      code: 'file',
      message: expect.stringMatching(/is empty \(0 bytes\)/),
    });
    expect((await failure('pilot.stage', { fileName: 'x.csv', content: 'not base64!' })).code).toBe(
      'invalid-input',
    );
    const { stageId, preview } = await stage('pilot.csv', CSV);
    const badMapping = await failure('pilot.startRead', {
      stageId,
      role: 'pilot',
      mapping: { ...preview.proposal.mapping, q3: { role: 'item', itemCode: 'NOPE' } },
      missingCodes: { text: [], numeric: [] },
    });
    expect(badMapping).toEqual({
      code: 'mapping',
      message: "column 'q3' is mapped to item NOPE, which is not in the item pool",
    });
    const noAnswer = await failure('pilot.startRead', {
      stageId,
      role: 'pilot',
      mapping: { q1: { role: 'attention', correctAnswer: ' ' } },
      missingCodes: { text: [], numeric: [] },
    });
    expect(noAnswer).toMatchObject({
      code: 'invalid-input',
      message: expect.stringMatching(/correct answer/),
    });
    const twoIds = await ok<{ taskId: string }>('pilot.startRead', {
      stageId,
      role: 'pilot',
      mapping: { ...preview.proposal.mapping, duration: { role: 'id' } },
      missingCodes: { text: [], numeric: [] },
    });
    await waitFor(twoIds.taskId);
    expect(await failure('pilot.collectRead', { taskId: twoIds.taskId })).toEqual({
      code: 'file',
      message: "columns 'id' and 'duration' are both mapped as id; only one column may have that role",
    });
    expect((await failure('pilot.preview', { stageId: 'gone' })).code).toBe('not-found');
    expect(await ok('pilot.discard', {})).toEqual({ discarded: true });
    expect((await failure('pilot.preview', { stageId })).code).toBe('not-found');
    expect(studyState()).toEqual(before);
  });
});

describe('the screening and exclusion commands', () => {
  async function imported(): Promise<number> {
    const { stageId, preview } = await stage('pilot.csv', CSV);
    const started = await ok<{ taskId: string }>('pilot.startRead', {
      stageId,
      role: 'pilot',
      mapping: preview.proposal.mapping,
      missingCodes: { text: [], numeric: [-9] },
    });
    await waitFor(started.taskId);
    const check = await ok<ReadCheck>('pilot.collectRead', { taskId: started.taskId });
    return (await ok<{ datasetId: number }>('pilot.confirmImport', { readId: check.readId })).datasetId;
  }

  it('screen, read the table, exclude by rule and singly, bring back, with counts that follow', async () => {
    const datasetId = await imported();
    const empty = await ok<{ run: unknown; dataset: { counts: string } }>('pilot.screening', { datasetId });
    expect(empty.run).toBeNull();
    expect(empty.dataset.counts).toBe('5 respondents, 0 excluded');
    const { runId } = await ok<{ runId: number }>('pilot.screen', { datasetId });
    const view = await ok<{
      run: { id: number };
      respondents: { id: string; flags: { check: string; label: string; reason: string }[] }[];
      counts: { byCheck: { check: string; flagged: number }[] };
    }>('pilot.screening', { datasetId });
    expect(view.run.id).toBe(runId);
    expect(view.respondents[3].flags).toEqual([
      { check: 'speeder', label: 'too fast', reason: 'took 40, under 0.5 × the median 300 = 150' },
    ]);
    expect(view.respondents[4].flags.map((f) => f.check)).toEqual(['longstring', 'irv']);
    expect(await ok('pilot.exclude', { datasetId, checks: ['irv'], reason: 'no variation at all' })).toEqual({
      excluded: 1,
      ids: ['r5'],
    });
    expect(await ok('pilot.exclude', { datasetId, respondents: [3], reason: 'far too fast' })).toEqual({
      excluded: 1,
      ids: ['r4'],
    });
    expect(await ok('pilot.include', { datasetId, respondents: [3], reason: 'the clock was wrong' })).toEqual(
      {
        included: 1,
        ids: ['r4'],
      },
    );
    const after = await ok<{ dataset: { counts: string } }>('pilot.screening', { datasetId });
    expect(after.dataset.counts).toBe('5 respondents, 1 excluded');
    const list = await ok<{ datasets: { counts: string; screening: { runId: number } }[] }>('pilot.view', {});
    expect(list.datasets[0]).toMatchObject({ counts: '5 respondents, 1 excluded', screening: { runId } });
    expect((await failure('pilot.exclude', { datasetId, respondents: [0], reason: '' })).code).toBe(
      'invalid-input',
    );
    expect((await failure('pilot.exclude', { datasetId, checks: ['sleepy'], reason: 'x' })).code).toBe(
      'invalid-input',
    );
    expect((await failure('pilot.screening', { datasetId: 42 })).code).toBe('not-found');
    expect((await failure('pilot.screen', { datasetId, mahalanobisAlpha: 2 })).code).toBe('invalid-input');
  });
});
