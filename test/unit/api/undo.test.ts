import { readFileSync } from 'node:fs';
import path from 'node:path';
import { afterEach, beforeEach, describe, expect, it } from 'vitest';
import { dispatch } from '../../../app/api/dispatch.ts';
import { Session } from '../../../app/api/session.ts';
import { addFacet } from '../../../app/phases/construct/index.ts';
import { runRound } from '../../../app/phases/purification/index.ts';
import type { LastChange } from '../../../app/phases/undo.ts';
import type { LogEntry } from '../../../db/decision-log.ts';
import { setPhaseStatus } from '../../../db/repos/phase-state.ts';
import { insertFixturePool, responsesCsv, storeCsv } from '../../helpers/study-data.ts';
import { TEST_ACTOR, tempDir } from '../../helpers/tmp.ts';

/** Invented pilot responses (test/reference/purification.py): used here only to have a study to change. */
const fixture = JSON.parse(
  readFileSync(new URL('../../reference/fixtures/purification.json', import.meta.url), 'utf8'),
) as { codes: string[]; reverse: string[]; offDomain: string; rows: (number | null)[][] };

let tmp: ReturnType<typeof tempDir>;
let session: Session;
let datasetId: number;
beforeEach(async () => {
  tmp = tempDir();
  session = new Session(TEST_ACTOR, 'test');
  session.create(path.join(tmp.dir, 's.scalewright'), 'S');
  const facets: Record<string, number> = {};
  for (const prefix of ['TR', 'RP', 'BH', 'RR'])
    facets[prefix] = addFacet(session.study, `Facet ${prefix}`, '');
  insertFixturePool(session.study, fixture, facets);
  const { csv, mapping } = responsesCsv(fixture.codes, fixture.rows);
  datasetId = await storeCsv(session.study, csv, mapping);
});
afterEach(async () => {
  await session.shutdown();
  tmp.cleanup();
});

async function ok<T>(name: string, input: unknown): Promise<T> {
  const result = await dispatch(session, name, input);
  if (!result.ok) throw new Error(`${name} failed: ${result.error.message}`);
  return result.value as T;
}

async function refused(name: string, input: unknown): Promise<{ code: string; message: string }> {
  const result = await dispatch(session, name, input);
  if (result.ok) throw new Error(`${name} should have been refused`);
  return result.error;
}

const lastRow = () => session.study.log.list({ limit: 1 })[0] as LogEntry;
const fileBytes = () => readFileSync(session.study.path);
const excludedCount = async () =>
  (await ok<{ dataset: { counts: string } }>('pilot.screening', { datasetId })).dataset.counts;

describe('undo the last change', () => {
  it('undoes an exclusion by bringing the respondents back, with a row that names the row it reverses', async () => {
    await ok('pilot.exclude', { datasetId, respondents: [0, 2], reason: 'answered in under a minute' });
    const excludedRow = lastRow().seq;
    expect(await excludedCount()).toMatch(/, 2 excluded$/);
    const last = await ok<LastChange>('log.lastChange', {});
    expect(last).toMatchObject({ seq: excludedRow, kind: 'respondents-excluded', undoable: true });
    expect(last.effect).toMatch(/brings the excluded respondents back/);

    expect((await refused('log.undo', { seq: excludedRow, reason: '  ' })).code).toBe('invalid-input');
    const done = await ok<{ seq: number }>('log.undo', {
      seq: excludedRow,
      reason: 'excluded the wrong file',
    });
    const row = lastRow();
    expect(done.seq).toBe(row.seq);
    expect(row).toMatchObject({ kind: 'exclusions-reversed', rationale: 'excluded the wrong file' });
    expect(row.detail.reverses).toBe(excludedRow);
    expect(row.detail.positions).toEqual([0, 2]);
    expect(await excludedCount()).toMatch(/, 0 excluded$/);
    // Both rows stay in the log, and the reversal itself is not undone by a second undo.
    expect(session.study.log.list({ kind: 'respondents-excluded' })).toHaveLength(1);
    const next = await ok<LastChange>('log.lastChange', {});
    expect(next).toMatchObject({ seq: row.seq, undoable: false });
    expect(next.effect).toMatch(new RegExp(`already undid row ${excludedRow}`));
  });

  it('undoes a purification drop by restoring the item', async () => {
    runRound(session.study, { bootstrap: null });
    await ok('purification.decide', {
      itemCode: fixture.offDomain,
      action: 'drop',
      domainRationale: 'Off the construct’s domain.',
      statisticalRationale: 'Low corrected item-total r.',
    });
    const dropRow = lastRow();
    expect(dropRow.kind).toBe('item-dropped');
    // The round's own analysis-run row is older; undo looks at the decision.
    expect((await ok<LastChange>('log.lastChange', {})).seq).toBe(dropRow.seq);
    await ok('log.undo', { seq: dropRow.seq, reason: 'dropped the wrong item' });
    const row = lastRow();
    expect(row.kind).toBe('item-restored');
    expect(row.detail).toMatchObject({ code: fixture.offDomain, reverses: dropRow.seq });
    const view = await ok<{ items: { code: string; status: string }[] }>('purification.view', {});
    expect(view.items.find((p) => p.code === fixture.offDomain)?.status).toBe('in');
  });

  it('refuses on a signed-off phase and leaves the study file byte-identical', async () => {
    await ok('pilot.exclude', { datasetId, respondents: [1], reason: 'did not consent' });
    const seq = lastRow().seq;
    session.study.db.transaction(() => setPhaseStatus(session.study, 'pilot', 'signed-off'))();
    const before = fileBytes();
    const error = await refused('log.undo', { seq, reason: 'changed my mind' });
    expect(error.code).toBe('signed-off');
    expect(error.message).toMatch(/phase is signed off; reopen it/);
    expect(fileBytes().equals(before)).toBe(true);
  });

  it('refuses a change that cannot be undone, saying why, and changes nothing', async () => {
    runRound(session.study, { bootstrap: null });
    await ok('purification.decide', {
      itemCode: fixture.codes[0],
      action: 'keep',
      domainRationale: 'Central to its facet.',
      statisticalRationale: '',
    });
    const keepRow = lastRow().seq;
    const last = await ok<LastChange>('log.lastChange', {});
    expect(last).toMatchObject({ seq: keepRow, kind: 'item-kept', undoable: false });
    const before = fileBytes();
    const error = await refused('log.undo', { seq: keepRow, reason: 'oops' });
    expect(error.message).toBe(
      `row ${keepRow} (item-kept) cannot be undone: keeping an item changed nothing; drop or move it instead`,
    );
    expect((await refused('log.undo', { seq: keepRow - 1, reason: 'oops' })).code).toBe('stale');
    expect(fileBytes().equals(before)).toBe(true);
  });
});
