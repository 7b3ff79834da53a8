import { createHash } from 'node:crypto';
import { readFileSync } from 'node:fs';
import path from 'node:path';
import fc from 'fast-check';
import { afterEach, beforeEach, describe, expect, it } from 'vitest';
import { DEMO_FACETS, fillDemoConstruct } from '../../../app/demo/construct.ts';
import { DEMO_OFF_DOMAIN_ITEM, fillDemoItems } from '../../../app/demo/items.ts';
import {
  DEMO_ATTENTION_ANSWER,
  DEMO_ITEM_TRUTH,
  DEMO_PILOT_ROWS,
  DEMO_PILOT_SEED,
  DEMO_RETEST_RESPONDENTS,
  DEMO_STRAIGHT_LINER_REASON,
  DEMO_STRAIGHT_LINERS,
  fillDemoPilot,
  generateDemoPilot,
} from '../../../app/demo/pilot.ts';
import { fillDemoReview } from '../../../app/demo/review.ts';
import { decodeColumn } from '../../../app/engine/columnar.ts';
import type { ScreeningResult } from '../../../app/engine/screening.ts';
import type { ColumnMapping } from '../../../app/import/mapping.ts';
import { NO_MISSING_CODES, type MissingCodes } from '../../../app/import/numbers.ts';
import { analysisData, currentPilotDataset } from '../../../app/phases/analysis-data.ts';
import { RuleError } from '../../../app/phases/errors.ts';
import { phaseOverview, reopenPhase, signOffPhase } from '../../../app/phases/index.ts';
import {
  automaticMapping,
  type CurrentOnImport,
  datasetDetail,
  excludeRespondents,
  includeRespondents,
  pilotRules,
  pilotView,
  planImport,
  previewDataFile,
  screenDataset,
  screeningView,
  storeImport,
} from '../../../app/phases/pilot/index.ts';
import { readDataFile } from '../../../app/import/read-data-file.ts';
import { getRun, listRuns } from '../../../db/repos/analysis-runs.ts';
import {
  currentExclusions,
  type DatasetRole,
  getDatasetSummary,
  listDatasets,
  listExclusionDecisions,
  loadDatasetFile,
  loadEncodedDataset,
} from '../../../db/repos/datasets.ts';
import { getPhaseStatus, setPhaseStatus } from '../../../db/repos/phase-state.ts';
import { Study } from '../../../db/study.ts';
import { createStudyWithPool } from '../../helpers/study-data.ts';
import { TEST_ACTOR, tempDir } from '../../helpers/tmp.ts';
import { utf8 } from '../../helpers/bytes.ts';

/** Agreement with numpy/scipy: the same formulas in double precision (the inverse computed differently). */
const FIXTURE_TOL = 1e-9;
/** p-values deep in the tail compared relative to their size. */
const P_RELATIVE_TOL = 1e-7;
const P_ABSOLUTE_TOL = 1e-15;

function closeTo(actual: number | null, expected: number | null, tol = FIXTURE_TOL): boolean {
  if (actual === null || expected === null) return actual === expected;
  return Math.abs(actual - expected) <= tol * Math.max(1, Math.abs(expected));
}

function pClose(actual: number | null, expected: number | null): boolean {
  if (actual === null || expected === null) return actual === expected;
  return Math.abs(actual - expected) <= Math.max(P_ABSOLUTE_TOL, P_RELATIVE_TOL * expected);
}

/**
 * The demo pilot file read by independent code: test/reference/demo_pilot.py (Python's csv module,
 * numpy, scipy.stats.chi2.sf, sklearn FactorAnalysis; versions inside the fixture).
 */
const demoFixture = JSON.parse(
  readFileSync(new URL('../../reference/fixtures/demo-pilot.json', import.meta.url), 'utf8'),
) as {
  sha256: string;
  respondents: number;
  items: string[];
  missingPerItem: number[];
  meanPerItem: number[];
  completeCases: number;
  longstring: number[];
  irv: (number | null)[];
  mahalanobis: (number | null)[];
  mahalanobisP: (number | null)[];
  medianDuration: number;
  flaggedRows: Record<string, number[]>;
  factorAnalysis: { loadings: Record<string, number[]> };
  totalScoreTripsCorrelation: number;
  meanTotalByGroup: Record<string, number>;
};

/** Screening reference cases: test/reference/screening.py (numpy + scipy). */
const screeningFixture = JSON.parse(
  readFileSync(new URL('../../reference/fixtures/screening.json', import.meta.url), 'utf8'),
) as {
  cases: {
    n: number;
    k: number;
    items: (number | null)[][];
    durations: (number | null)[];
    expected: {
      longstring: number[];
      irv: (number | null)[];
      mahalanobis: (number | null)[];
      mahalanobisP: (number | null)[];
      medianDuration: number;
      speeders: number[];
      mahalanobisFlagged: number[];
    };
  }[];
};

let tmp: ReturnType<typeof tempDir>;
let study: Study;

function poolStudy(codes: string[]): Study {
  return createStudyWithPool(
    path.join(tmp.dir, `s${Math.random().toString(36).slice(2)}.scalewright`),
    codes,
  );
}

async function importCsv(
  s: Study,
  csv: string,
  options: {
    fileName?: string;
    role?: DatasetRole;
    mapping?: ColumnMapping | ((header: string[]) => ColumnMapping);
    missing?: MissingCodes;
    accept?: boolean;
    name?: string;
    current?: CurrentOnImport;
  } = {},
): Promise<number> {
  const bytes = utf8(csv);
  const { plan, read } = planImport(s, bytes, {
    fileName: options.fileName ?? 'pilot.csv',
    role: options.role ?? 'pilot',
    name: options.name,
    mapping: options.mapping ?? automaticMapping(s),
    missingCodes: options.missing ?? NO_MISSING_CODES,
    reading: {},
  });
  const result = await readDataFile(read);
  return storeImport(s, plan, result, bytes, {
    acceptProblems: options.accept ?? false,
    ...(options.current ? { current: options.current } : {}),
  });
}

function state(s: Study) {
  return { log: s.log.count(), head: s.meta('log_head'), datasets: listDatasets(s).length };
}

beforeEach(() => {
  tmp = tempDir();
  study = poolStudy(['Q1', 'Q2', 'Q3', 'Q4']);
});
afterEach(() => {
  study.close();
  tmp.cleanup();
});

const SMALL =
  'rid,q1,q2,q3,q4,grp,secs\nr1,1,2,3,4,a,300\nr2,4,-9,5,3,b,320\nr3,2,2,,2,a,50\nr4,5,4,3,5,b,310\nr5,3,3,3,3,a,290\nr6,2,4,1,5,b,330\n';

describe('importing a data file into the study', () => {
  it('stores the original bytes, their SHA-256, how the file was read, the mapping and the codes, with its log row and the choice that makes it current', async () => {
    const before = study.log.count();
    const id = await importCsv(study, SMALL, {
      mapping: automaticMapping(study, {
        rid: { role: 'id' },
        grp: { role: 'group' },
        secs: { role: 'duration' },
      }),
      missing: { text: [], numeric: [-9] },
    });
    expect(Array.from(loadDatasetFile(study, id) ?? [])).toEqual(Array.from(utf8(SMALL)));
    const summary = getDatasetSummary(study, id);
    // SHA-256 as node:crypto computes it over the same bytes.
    expect(summary?.fileSha256).toBe(createHash('sha256').update(utf8(SMALL)).digest('hex'));
    expect(summary).toMatchObject({
      role: 'pilot',
      name: 'pilot',
      fileName: 'pilot.csv',
      respondents: 6,
      importedBy: TEST_ACTOR.name,
    });
    expect(summary?.reading).toMatchObject({
      kind: 'delimited',
      encoding: 'utf-8',
      delimiter: ',',
      decimalMark: '.',
      missingCodes: { text: [], numeric: [-9] },
      scaleBounds: { min: 1, max: 5 },
      header: ['rid', 'q1', 'q2', 'q3', 'q4', 'grp', 'secs'],
    });
    // Header q1 is matched to the pool's item Q1 and stored in the pool's spelling.
    expect(summary?.mapping.q1).toEqual({ role: 'item', itemCode: 'Q1' });
    // The import and, as the first pilot data of the study, the choice that makes it current.
    expect(study.log.count()).toBe(before + 2);
    expect(study.log.list({ limit: 1 })[0]).toMatchObject({
      kind: 'dataset-made-current',
      detail: { datasetId: id },
    });
    const row = study.log.list({ limit: 2 })[1];
    expect(row).toMatchObject({ phase: 'pilot', kind: 'dataset-imported', target: 'pilot data "pilot"' });
    expect(row.detail).toMatchObject({
      sha256: summary?.fileSha256,
      respondents: 6,
      idColumn: 'rid',
      groups: ['grp'],
      duration: 'secs',
      missingCodes: { text: [], numeric: [-9] },
      problems: 0,
    });
    const q2 = loadEncodedDataset(study, id)?.columns.find((c) => c.itemCode === 'Q2');
    expect(
      Array.from(decodeColumn(q2?.encoded ?? { kind: 'int8', scale: 0, length: 0, data: new Int8Array() })),
    ).toEqual([2, Number.NaN, 2, 4, 3, 4]);
    expect(getPhaseStatus(study, 'pilot')).toBe('in-progress');
  });

  it('refuses a file with problems unless they are accepted, and then keeps the values as they are (never clipped)', async () => {
    const csv = 'rid,q1,q2\nr1,1,9\nr2,often,3\n';
    const before = state(study);
    const refused = importCsv(study, csv);
    await expect(refused).rejects.toThrow(RuleError);
    await expect(importCsv(study, csv)).rejects.toThrow(
      /2 cells need a look, the first at row 2, column 'q2': value 9 is outside the declared scale 1 to 5/,
    );
    expect(state(study)).toEqual(before);
    const id = await importCsv(study, csv, { accept: true });
    const encoded = loadEncodedDataset(study, id);
    const q2 = encoded?.columns.find((c) => c.name === 'q2');
    expect(Array.from(decodeColumn(q2?.encoded ?? encoded?.columns[0].encoded ?? ({} as never)))).toEqual([
      9, 3,
    ]);
    expect(encoded?.problemCount).toBe(2);
    expect(study.log.list({ limit: 2 })[1].detail).toMatchObject({ problems: 2, problemsAccepted: true });
  });

  it('refuses what it cannot honour before reading: a signed-off phase, an item not in the pool, a number given as a text code', () => {
    const bytes = utf8(SMALL);
    const base = { fileName: 'p.csv', role: 'pilot' as const, missingCodes: NO_MISSING_CODES, reading: {} };
    expect(() =>
      planImport(study, bytes, { ...base, mapping: { q1: { role: 'item', itemCode: 'ZZ9' } } }),
    ).toThrow(/column 'q1' is mapped to item ZZ9, which is not in the item pool/);
    expect(() =>
      planImport(study, bytes, { ...base, mapping: {}, missingCodes: { text: ['-9'], numeric: [] } }),
    ).toThrow(/"-9" is a number; give it as a numeric code/);
    expect(() =>
      planImport(study, bytes, { ...base, mapping: {}, missingCodes: { text: [' '], numeric: [] } }),
    ).toThrow(/cannot be blank/);
    expect(() => planImport(study, bytes, { ...base, mapping: {}, name: 'x'.repeat(201) })).toThrow(
      /at most 200/,
    );
    setPhaseStatus(study, 'pilot', 'signed-off');
    expect(() => planImport(study, bytes, { ...base, mapping: {} })).toThrow(
      /the Pilot data phase is signed off; reopen it/,
    );
    // Validation data belong to the validity phase, which is open.
    expect(() => planImport(study, bytes, { ...base, role: 'validation', mapping: {} })).not.toThrow();
  });

  it('logs validation data in the validity phase and retest data in the pilot phase', async () => {
    await importCsv(study, SMALL, { role: 'validation', accept: true, missing: { text: [], numeric: [-9] } });
    expect(study.log.list({ limit: 1 })[0].phase).toBe('validity');
    await importCsv(study, SMALL, { role: 'retest', missing: { text: [], numeric: [-9] } });
    expect(study.log.list({ limit: 1 })[0].phase).toBe('pilot');
    expect(currentPilotDataset(study)).toBeUndefined();
  });

  it('previews the start of a file with a proposed mapping and likely missing codes, writing nothing', async () => {
    const before = state(study);
    const preview = await previewDataFile(
      study,
      utf8('id;q1;q2;Q3;note\nr1;1;-9;2,5;x\nr2;NA;4;3;y\nr3;2;-9;1;z\n'),
      'p.csv',
    );
    expect(preview).toMatchObject({
      kind: 'delimited',
      encoding: 'utf-8',
      delimiter: ';',
      delimiterName: 'semicolon',
      decimalMark: ',',
      header: ['id', 'q1', 'q2', 'Q3', 'note'],
      rowNumbers: [2, 3, 4],
      bounds: { min: 1, max: 5 },
    });
    expect(preview.proposal.mapping).toEqual({
      id: { role: 'id' },
      q1: { role: 'item', itemCode: 'Q1' },
      q2: { role: 'item', itemCode: 'Q2' },
      Q3: { role: 'item', itemCode: 'Q3' },
      note: { role: 'ignored' },
    });
    expect(preview.proposal.unmatchedItems).toEqual(['Q4']);
    expect(preview.suggestedMissing).toEqual([
      { code: '-9', numeric: true, cells: 2 },
      { code: 'NA', numeric: false, cells: 1 },
    ]);
    expect(state(study)).toEqual(before);
    await expect(previewDataFile(study, utf8('id,q1\nr1,"2\n'), 'bad.csv')).rejects.toThrow(
      /row 2, column 2 \('q1'\).*a quoted field is opened and never closed/,
    );
  });
});

describe('screening and exclusions', () => {
  it('stores a screening run whose indices equal the numpy/scipy reference, through the study path', async () => {
    const c = screeningFixture.cases[0];
    const codes = Array.from({ length: c.k }, (_, j) => `S${j + 1}`);
    const s = poolStudy(codes);
    try {
      const lines = [`rid,${codes.join(',')},secs`];
      for (let i = 0; i < c.n; i++) {
        lines.push(`p${i + 1},${c.items.map((item) => item[i] ?? '').join(',')},${c.durations[i] ?? ''}`);
      }
      const id = await importCsv(s, `${lines.join('\n')}\n`, {
        mapping: automaticMapping(s, { rid: { role: 'id' }, secs: { role: 'duration' } }),
      });
      const runId = screenDataset(s, id);
      const run = getRun(s, runId);
      expect(run).toMatchObject({ phase: 'pilot', kind: 'screening', seed: null });
      expect(run?.inputs).toMatchObject({ datasetId: id, respondents: c.n, items: codes, duration: 'secs' });
      expect(s.log.list({ limit: 1 })[0]).toMatchObject({ kind: 'analysis-run', runId });
      const result = run?.results as ScreeningResult;
      const e = c.expected;
      expect(result.respondents.map((r) => r.longstring)).toEqual(e.longstring);
      expect(result.respondents.every((r, i) => closeTo(r.irv, e.irv[i]))).toBe(true);
      expect(result.respondents.every((r, i) => closeTo(r.mahalanobis, e.mahalanobis[i]))).toBe(true);
      expect(result.respondents.every((r, i) => pClose(r.mahalanobisP, e.mahalanobisP[i]))).toBe(true);
      expect(result.thresholds.medianDuration).toBeCloseTo(e.medianDuration, 9);
      const view = screeningView(s, id);
      const flagged = (check: string) =>
        view.respondents.filter((r) => r.flags.some((f) => f.check === check)).map((r) => r.index);
      expect(flagged('speeder')).toEqual(e.speeders);
      expect(flagged('mahalanobis')).toEqual(e.mahalanobisFlagged);
    } finally {
      s.close();
    }
  });

  it('excludes singly and by rule with a reason, reverses by a later decision, and analyses leave the excluded out', async () => {
    const id = await importCsv(study, SMALL, {
      mapping: automaticMapping(study, { rid: { role: 'id' }, secs: { role: 'duration' } }),
      missing: { text: [], numeric: [-9] },
    });
    expect(() => excludeRespondents(study, id, { checks: ['irv'], reason: 'no variation' })).toThrow(
      /screen "pilot" first/,
    );
    const runId = screenDataset(study, id);
    const byRule = excludeRespondents(study, id, { checks: ['irv'], reason: 'the same answer everywhere' });
    expect(byRule).toEqual({ excluded: 1, ids: ['r5'] });
    const ruleRow = study.log.list({ limit: 1 })[0];
    expect(ruleRow).toMatchObject({
      kind: 'respondents-excluded',
      runId,
      rationale: 'the same answer everywhere',
    });
    expect(ruleRow.detail).toMatchObject({ positions: [4], ids: ['r5'], rows: [6], excludedAfter: 1 });
    expect(excludeRespondents(study, id, { respondents: [2, 4], reason: 'far too fast' })).toEqual({
      excluded: 1,
      ids: ['r3'],
    });
    expect([...currentExclusions(study, id).keys()].sort()).toEqual([2, 4]);
    expect(analysisData(study, id, ['Q1']).respondentIds).toEqual(['r1', 'r2', 'r4', 'r6']);
    expect(screeningView(study, id).dataset.counts).toBe('6 respondents, 2 excluded');
    expect(pilotView(study).datasets[0].counts).toBe('6 respondents, 2 excluded');

    expect(
      includeRespondents(study, id, { respondents: [2, 3], reason: 'the time was logged wrongly' }),
    ).toEqual({
      included: 1,
      ids: ['r3'],
    });
    expect([...currentExclusions(study, id).keys()]).toEqual([4]);
    expect(listExclusionDecisions(study, id).map((d) => [d.respondent, d.excluded])).toEqual([
      [4, true],
      [2, true],
      [2, false],
    ]);
    expect(study.log.list({ limit: 1 })[0]).toMatchObject({
      kind: 'exclusions-reversed',
      detail: expect.objectContaining({ earlierReasons: ['far too fast'] }),
    });
    const view = screeningView(study, id);
    expect(view.respondents[2]).toMatchObject({ exclusion: null, decisions: 2 });
    expect(view.respondents[4].exclusion?.rule).toBe(`flagged by screening run ${runId} for no variation`);
    expect(view.counts).toMatchObject({ respondents: 6, excluded: 1, analysed: 5 });
    expect(datasetDetail(study, id).missingAnalysed).toMatchObject({ respondents: 5, completeCases: 3 });
    expect(datasetDetail(study, id).missingAll).toMatchObject({
      respondents: 6,
      completeCases: 4,
      perRespondent: [4, 2, 0, 0, 0],
    });
  });

  it('refuses exclusions without a reason, of unknown respondents, of the already excluded, and in a signed-off phase', async () => {
    const id = await importCsv(study, SMALL, { missing: { text: [], numeric: [-9] }, accept: true });
    expect(() => excludeRespondents(study, id, { respondents: [0], reason: '  ' })).toThrow(/say why/);
    expect(() => excludeRespondents(study, id, { respondents: [6], reason: 'x' })).toThrow(
      /has no respondent at position 6 \(it has 6\)/,
    );
    expect(() => excludeRespondents(study, 99, { respondents: [0], reason: 'x' })).toThrow(
      /dataset 99 does not exist/,
    );
    excludeRespondents(study, id, { respondents: [0], reason: 'x' });
    expect(() => excludeRespondents(study, id, { respondents: [0], reason: 'x' })).toThrow(
      /already excluded/,
    );
    expect(() => includeRespondents(study, id, { respondents: [1], reason: 'x' })).toThrow(
      /none of the respondents named is excluded/,
    );
    setPhaseStatus(study, 'pilot', 'signed-off');
    const before = state(study);
    expect(() => includeRespondents(study, id, { respondents: [0], reason: 'x' })).toThrow(/signed off/);
    expect(() => screenDataset(study, id)).toThrow(/signed off/);
    expect(state(study)).toEqual(before);
  });
});

describe('the phase checklist', () => {
  it('asks for a pilot dataset mapping every pool item, a screening run, and a reason for every exclusion', async () => {
    const unmet = () =>
      pilotRules
        .checklist(study)
        .filter((c) => !c.met)
        .map((c) => c.id);
    expect(unmet()).toEqual(['imported', 'mapped', 'screened', 'reasons']);
    expect(pilotRules.holds(study)).toEqual(['0 pilot datasets']);
    const partial = await importCsv(study, 'rid,q1,q2\nr1,1,2\nr2,2,3\n');
    expect(unmet()).toEqual(['mapped', 'screened']);
    expect(pilotRules.checklist(study).find((c) => c.id === 'mapped')?.detail).toBe('no column for Q3, Q4');
    screenDataset(study, partial);
    const id = await importCsv(study, SMALL, {
      missing: { text: [], numeric: [-9] },
      current: { makeCurrent: true, reason: 'the full file replaces the partial one' },
    });
    expect(unmet()).toEqual(['screened']);
    screenDataset(study, id);
    expect(unmet()).toEqual([]);
    excludeRespondents(study, id, { respondents: [1], reason: 'skipped an item on purpose' });
    expect(pilotRules.checklist(study).find((c) => c.id === 'reasons')?.detail).toBe(
      '1 excluded, each with a reason',
    );
    expect(pilotRules.holds(study)).toEqual(['2 pilot datasets', '6 respondents, 1 excluded']);
  });
});

describe('round trip: what is stored is what the file says', () => {
  const cell = fc.oneof(
    fc.constantFrom(
      '',
      ' ',
      '1',
      '2',
      '3',
      '4',
      '5',
      '-9',
      '9',
      'NA',
      'n/a',
      '2.5',
      '10',
      '-1',
      '0',
      '3.25',
      'x',
    ),
    fc.integer({ min: -200, max: 200 }).map(String),
    fc.double({ min: -1000, max: 1000, noNaN: true }).map((d) => d.toFixed(2)),
  );
  /** What a cell means, read independently of the importer: blank or a declared code is missing. */
  function expected(raw: string, codes: MissingCodes): number {
    const t = raw.trim();
    if (t === '' || codes.text.some((c) => c.toLowerCase() === t.toLowerCase())) return Number.NaN;
    if (!/^[+-]?(\d+(\.\d*)?|\.\d+)$/.test(t)) return Number.NaN;
    // Adding +0 turns -0 into 0: the two are the same answer (the compact layout keeps one zero).
    const v = Number(t) + 0;
    return codes.numeric.includes(v) ? Number.NaN : v;
  }

  it('random files never crash the import, and every stored answer equals the file’s (fast-check)', async () => {
    const codes: MissingCodes = { text: ['NA'], numeric: [-9] };
    await fc.assert(
      fc.asyncProperty(
        fc.array(fc.array(cell, { minLength: 4, maxLength: 4 }), { minLength: 1, maxLength: 40 }),
        async (rows) => {
          const csv = `id,q1,q2,q3,q4\n${rows.map((r, i) => `p${i},${r.join(',')}`).join('\n')}\n`;
          const before = state(study);
          let id: number;
          try {
            id = await importCsv(study, csv, { missing: codes, accept: true });
          } catch (error) {
            // Only clean refusals are allowed, and they leave the study as it was.
            expect(error).toBeInstanceOf(Error);
            expect((error as Error).name).toMatch(/TableError|RuleError/);
            expect(state(study)).toEqual(before);
            return;
          }
          const encoded = loadEncodedDataset(study, id);
          expect(encoded?.ids).toEqual(rows.map((_, i) => `p${i}`));
          for (let j = 0; j < 4; j++) {
            const column = encoded?.columns.find((c) => c.itemCode === `Q${j + 1}`);
            const stored = Array.from(decodeColumn(column?.encoded ?? ({} as never)));
            expect(stored).toEqual(rows.map((r) => expected(r[j], codes)));
          }
        },
      ),
      { numRuns: 60, seed: 20261201 },
    );
  });
});

describe('the demo pilot', () => {
  it('is deterministic, and the numpy reference read the very same bytes', () => {
    const demo = generateDemoPilot();
    expect(createHash('sha256').update(utf8(demo.pilotCsv)).digest('hex')).toBe(demoFixture.sha256);
    expect(generateDemoPilot(DEMO_PILOT_SEED).pilotCsv).toBe(demo.pilotCsv);
    expect(generateDemoPilot(DEMO_PILOT_SEED + 7).pilotCsv).not.toBe(demo.pilotCsv);
    expect(demo.rows).toHaveLength(DEMO_PILOT_ROWS);
    expect(demo.retestCsv.trim().split('\n')).toHaveLength(DEMO_RETEST_RESPONDENTS + 1);
  });

  it('plants exactly what the independent reading finds: straight-liners, random responders, duplicates, early stoppers', () => {
    const demo = generateDemoPilot();
    const f = demoFixture.flaggedRows;
    expect(demo.straightLinerRows).toHaveLength(DEMO_STRAIGHT_LINERS);
    expect(demo.straightLinerRows).toEqual(f.irv);
    expect(demo.randomResponderRows).toEqual(f.mahalanobis);
    expect(demo.earlyStopperRows).toEqual(f.missing);
    const duplicateRows = demo.rows.filter((r) => demo.duplicateIds.includes(r.id)).map((r) => r.row);
    expect(duplicateRows).toEqual(f.duplicateId);
    expect(demo.rows.filter((r) => r.attentionFailed).map((r) => r.row)).toEqual(f.attention);
  });

  it('has the known structure: four facets recovered by a reference factor analysis, the off-domain item weak', () => {
    // sklearn FactorAnalysis (ML, varimax) on the complete cases without the straight-liners.
    const loadings = demoFixture.factorAnalysis.loadings;
    const dominant = (code: string) => {
      const l = loadings[code].map(Math.abs);
      return l.indexOf(Math.max(...l));
    };
    const factorOfFacet = DEMO_FACETS.map((_, facet) => {
      const items = DEMO_ITEM_TRUTH.filter((it) => it.facet === facet && it.code !== DEMO_OFF_DOMAIN_ITEM);
      const factors = new Set(items.map((it) => dominant(it.code)));
      expect(factors.size, `items of facet ${facet} share one factor`).toBe(1);
      return [...factors][0];
    });
    expect(new Set(factorOfFacet).size).toBe(DEMO_FACETS.length);
    const strongest = (code: string) => Math.max(...loadings[code].map(Math.abs));
    const weakest = DEMO_ITEM_TRUTH.map((it) => it.code).sort((a, b) => strongest(a) - strongest(b))[0];
    expect(weakest).toBe(DEMO_OFF_DOMAIN_ITEM);
    expect(strongest(DEMO_OFF_DOMAIN_ITEM)).toBeLessThan(0.3);
    // The criterion rises with confidence, and the groups are ordered as generated.
    expect(demoFixture.totalScoreTripsCorrelation).toBeGreaterThan(0.3);
    const g = demoFixture.meanTotalByGroup;
    expect(g.rarely).toBeLessThan(g.occasional);
    expect(g.occasional).toBeLessThan(g.regular);
  });

  describe('in the demo study', () => {
    let demo: Study;
    beforeEach(() => {
      demo = Study.create(
        path.join(tmp.dir, 'demo.scalewright'),
        { actor: TEST_ACTOR, app: 'test' },
        {
          init(s) {
            fillDemoConstruct(s);
            signOffPhase(s, 'construct', 'agreed (test)');
            fillDemoItems(s);
            fillDemoReview(s);
            fillDemoPilot(s);
          },
        },
      );
    });
    afterEach(() => demo.close());

    it('is imported through the study path: the stored file, its hash and its answers match the reference', () => {
      const [pilot, retest] = listDatasets(demo);
      expect(pilot).toMatchObject({
        role: 'pilot',
        respondents: demoFixture.respondents,
        fileSha256: demoFixture.sha256,
      });
      expect(
        createHash('sha256')
          .update(loadDatasetFile(demo, pilot.id) ?? new Uint8Array())
          .digest('hex'),
      ).toBe(demoFixture.sha256);
      const encoded = loadEncodedDataset(demo, pilot.id);
      const items = encoded?.columns.filter((c) => c.role === 'item') ?? [];
      expect(items.map((c) => c.itemCode)).toEqual(demoFixture.items);
      items.forEach((c, j) => {
        const values = Array.from(decodeColumn(c.encoded)).filter((v) => !Number.isNaN(v));
        expect(c.missing).toBe(demoFixture.missingPerItem[j]);
        expect(values.reduce((s, v) => s + v, 0) / values.length).toBeCloseTo(demoFixture.meanPerItem[j], 12);
      });
      expect(encoded?.attention[0]).toMatchObject({
        name: 'att_check',
        correctAnswer: String(DEMO_ATTENTION_ANSWER),
      });
      expect(datasetDetail(demo, pilot.id).missingAll.completeCases).toBe(demoFixture.completeCases);
      expect(retest).toMatchObject({ role: 'retest', respondents: DEMO_RETEST_RESPONDENTS });
      const links = new Set(encoded?.retestLinks?.values.filter((v) => v !== ''));
      expect(loadEncodedDataset(demo, retest.id)?.ids.every((id) => links.has(id))).toBe(true);
    });

    it('is screened like the reference, the straight-liners excluded with the logged reason, the phase signed off', () => {
      const pilot = listDatasets(demo)[0];
      const run = listRuns(demo, { kind: 'screening' })[0];
      const result = run.results as ScreeningResult;
      const f = demoFixture;
      expect(result.respondents.map((r) => r.longstring)).toEqual(f.longstring);
      expect(result.respondents.every((r, i) => closeTo(r.irv, f.irv[i]))).toBe(true);
      expect(result.respondents.every((r, i) => closeTo(r.mahalanobis, f.mahalanobis[i]))).toBe(true);
      expect(result.respondents.every((r, i) => pClose(r.mahalanobisP, f.mahalanobisP[i]))).toBe(true);
      expect(result.thresholds.medianDuration).toBe(f.medianDuration);
      const view = screeningView(demo, pilot.id);
      for (const [check, rows] of Object.entries(f.flaggedRows)) {
        expect(
          view.respondents.filter((r) => r.flags.some((flag) => flag.check === check)).map((r) => r.row),
          check,
        ).toEqual(rows);
      }
      const excluded = currentExclusions(demo, pilot.id);
      expect([...excluded.keys()].map((i) => view.respondents[i].row).sort((a, b) => a - b)).toEqual(
        f.flaggedRows.irv,
      );
      expect([...excluded.values()].every((e) => e.reason === DEMO_STRAIGHT_LINER_REASON)).toBe(true);
      expect(view.dataset.counts).toBe(`480 respondents, ${DEMO_STRAIGHT_LINERS} excluded`);
      const overview = phaseOverview(demo, 'pilot');
      expect(overview.status).toBe('signed-off');
      expect(overview.checklist.every((c) => c.met)).toBe(true);
      reopenPhase(demo, 'pilot', 'test reopening');
      expect(getPhaseStatus(demo, 'pilot')).toBe('reopened');
    });
  });
});
