import path from 'node:path';
import { afterEach, beforeEach, describe, expect, it } from 'vitest';
import { NO_MISSING_CODES } from '../../../app/import/numbers.ts';
import { currentPilotDataset } from '../../../app/phases/analysis-data.ts';
import { RuleError } from '../../../app/phases/errors.ts';
import {
  automaticMapping,
  type CurrentOnImport,
  importChoice,
  makeDatasetCurrent,
  pilotView,
  planImport,
  storeImport,
  withdrawDataset,
} from '../../../app/phases/pilot/index.ts';
import { readDataFile } from '../../../app/import/read-data-file.ts';
import { purificationView, roundSummaries, runRound } from '../../../app/phases/purification/index.ts';
import { listDatasetChoices, listDatasets } from '../../../db/repos/datasets.ts';
import type { Study } from '../../../db/study.ts';
import { createStudyWithPool } from '../../helpers/study-data.ts';
import { tempDir } from '../../helpers/tmp.ts';

let tmp: ReturnType<typeof tempDir>;
let study: Study;

const CODES = ['Q1', 'Q2', 'Q3', 'Q4'];

/** n respondents answering four 1–5 items, varied enough for a round (deterministic). */
function csv(n: number, offset: number): string {
  const rows = Array.from({ length: n }, (_, r) => {
    const base = ((r * 7 + offset) % 5) + 1;
    const answers = CODES.map((_, j) => Math.min(5, Math.max(1, base + (((r + j * 3 + offset) % 3) - 1))));
    return `r${r + 1},${answers.join(',')}`;
  });
  return `rid,${CODES.join(',')}\n${rows.join('\n')}\n`;
}

async function importCsv(text: string, fileName: string, current?: CurrentOnImport): Promise<number> {
  const bytes = new TextEncoder().encode(text);
  const { plan, read } = planImport(study, bytes, {
    fileName,
    role: 'pilot',
    mapping: automaticMapping(study),
    missingCodes: NO_MISSING_CODES,
    reading: {},
  });
  const result = await readDataFile(read);
  return storeImport(study, plan, result, bytes, { acceptProblems: false, ...(current ? { current } : {}) });
}

function snapshot() {
  return {
    log: study.log.count(),
    head: study.meta('log_head'),
    datasets: listDatasets(study).length,
    choices: listDatasetChoices(study).length,
  };
}

beforeEach(() => {
  tmp = tempDir();
  study = createStudyWithPool(path.join(tmp.dir, 'choice.scalewright'), CODES);
});
afterEach(() => {
  study.close();
  tmp.cleanup();
});

describe('the current dataset of a role is a logged choice', () => {
  it('a first import becomes current with a logged choice; a second one does not silently replace it', async () => {
    const first = await importCsv(csv(60, 0), 'spring.csv');
    expect(currentPilotDataset(study)?.id).toBe(first);
    const kinds = study.log.list({ limit: 2 }).map((r) => r.kind);
    expect(kinds).toEqual(['dataset-made-current', 'dataset-imported']);

    const round = runRound(study);
    expect(round.n).toBe(60);
    expect(importChoice(study, 'pilot')).toMatchObject({
      current: { id: first, name: 'spring' },
      roundsOnCurrent: [1],
      defaultMakeCurrent: false,
      ifMadeCurrent: expect.stringContaining('round 1 ran on "spring" and will be marked out of date'),
    });

    const second = await importCsv(csv(40, 2), 'late.csv');
    expect(currentPilotDataset(study)?.id).toBe(first);
    expect(study.log.list({ limit: 1 })[0].kind).toBe('dataset-imported');
    expect(roundSummaries(study)[0]).toMatchObject({ onCurrentData: true, outOfDate: null });
    const view = pilotView(study);
    expect(view.datasets.find((d) => d.id === second)).toMatchObject({ current: false });
    expect(view.datasets.find((d) => d.id === first)?.standing.text).toMatch(
      /^current since \d{4}-\d\d-\d\d: made current on import/,
    );
    expect(purificationView(study).next?.respondents).toBe(60);
  });

  it('making current and withdrawing are logged with their reasons, reversible, and rounds follow the choice', async () => {
    const first = await importCsv(csv(60, 0), 'spring.csv');
    runRound(study);
    const second = await importCsv(csv(40, 2), 'late.csv');

    makeDatasetCurrent(study, second, 'the late file is the corrected export');
    expect(currentPilotDataset(study)?.id).toBe(second);
    const made = study.log.list({ limit: 1 })[0];
    expect(made).toMatchObject({
      kind: 'dataset-made-current',
      phase: 'pilot',
      rationale: 'the late file is the corrected export',
      detail: { datasetId: second, previous: { datasetId: first, dataset: 'spring' }, roundsOnPrevious: [1] },
    });
    const stale = roundSummaries(study)[0];
    expect(stale.onCurrentData).toBe(false);
    expect(stale.outOfDate).toContain('the current pilot data is now "late" (dataset 2)');
    expect(stale.outOfDate).toContain('the late file is the corrected export');
    expect(runRound(study).n).toBe(40);

    withdrawDataset(study, second, 'the late file mixes two samples');
    expect(currentPilotDataset(study)).toBeUndefined();
    expect(study.log.list({ limit: 1 })[0]).toMatchObject({
      kind: 'dataset-withdrawn',
      detail: { datasetId: null },
    });
    expect(pilotView(study).datasets.find((d) => d.id === second)?.standing.text).toContain('withdrawn');
    expect(() => runRound(study)).toThrow(/no pilot/);
    expect(roundSummaries(study).every((r) => r.outOfDate?.includes('no pilot dataset is current'))).toBe(
      true,
    );

    // Back to the first file: round 1 is on the current data again.
    makeDatasetCurrent(study, first, 'back to the spring file');
    expect(currentPilotDataset(study)?.id).toBe(first);
    expect(roundSummaries(study).map((r) => r.onCurrentData)).toEqual([true, false]);
    expect(listDatasetChoices(study, 'pilot').map((c) => c.datasetId)).toEqual([first, second, null, first]);
  });

  it('an import can be made current when asked, with a reason when it replaces one', async () => {
    const first = await importCsv(csv(60, 0), 'spring.csv');
    const before = snapshot();
    await expect(importCsv(csv(40, 2), 'late.csv', { makeCurrent: true })).rejects.toThrow(
      /say why the new file replaces "spring"/,
    );
    expect(snapshot()).toEqual(before);
    const second = await importCsv(csv(40, 2), 'late.csv', { makeCurrent: true, reason: 'corrected export' });
    expect(currentPilotDataset(study)?.id).toBe(second);
    expect(study.log.list({ limit: 1 })[0]).toMatchObject({
      kind: 'dataset-made-current',
      rationale: 'corrected export',
      detail: { previous: { datasetId: first } },
    });
    // Asked not to, a first import of a role stays beside the others, not current.
    const retestBytes = new TextEncoder().encode(csv(10, 1));
    const { plan, read } = planImport(study, retestBytes, {
      fileName: 'retest.csv',
      role: 'retest',
      mapping: automaticMapping(study),
      missingCodes: NO_MISSING_CODES,
      reading: {},
    });
    storeImport(study, plan, await readDataFile(read), retestBytes, {
      acceptProblems: false,
      current: { makeCurrent: false },
    });
    expect(pilotView(study).datasets.filter((d) => d.role === 'retest' && d.current)).toEqual([]);
  });

  it('refuses blank reasons, a dataset already current, withdrawing one that is not current, and leaves the study unchanged', async () => {
    const first = await importCsv(csv(60, 0), 'spring.csv');
    const second = await importCsv(csv(40, 2), 'late.csv');
    const before = snapshot();
    expect(() => makeDatasetCurrent(study, second, '  ')).toThrow(RuleError);
    expect(() => makeDatasetCurrent(study, first, 'again')).toThrow(/already the current pilot data/);
    expect(() => withdrawDataset(study, second, 'not it')).toThrow(/not the current pilot data/);
    expect(() => makeDatasetCurrent(study, 99, 'x')).toThrow(/dataset 99 does not exist/);
    expect(snapshot()).toEqual(before);
  });
});
