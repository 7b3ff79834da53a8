import { readFileSync } from 'node:fs';
import path from 'node:path';
import { afterEach, beforeEach, describe, expect, it } from 'vitest';
import { fillDemoStudy } from '../../../app/demo/index.ts';
import { DEMO_OFF_DOMAIN_ITEM } from '../../../app/demo/items.ts';
import { DEMO_CROSS_LOADING_ITEM, DEMO_STRAIGHT_LINERS } from '../../../app/demo/pilot.ts';
import { analysisData, currentPilotDataset } from '../../../app/phases/analysis-data.ts';
import { addFacet } from '../../../app/phases/construct/index.ts';
import { RuleError } from '../../../app/phases/errors.ts';
import { phaseOverview, reopenPhase, signOffPhase } from '../../../app/phases/index.ts';
import { includeRespondents } from '../../../app/phases/pilot/index.ts';
import {
  decideItem,
  decisionViews,
  prepareRound,
  purificationView,
  reverseDecision,
  type RoundSummary,
  roundDetail,
  roundSummaries,
  runRound,
  storeRound,
} from '../../../app/phases/purification/index.ts';
import { JOBS } from '../../../app/workers/jobs.ts';
import { getRun } from '../../../db/repos/analysis-runs.ts';
import { currentExclusions, insertExclusions } from '../../../db/repos/datasets.ts';
import { setPhaseStatus } from '../../../db/repos/phase-state.ts';
import { listDecisions, listRounds } from '../../../db/repos/purification.ts';
import { Study } from '../../../db/study.ts';
import { insertFixturePool, responsesCsv, storeCsv } from '../../helpers/study-data.ts';
import { TEST_ACTOR, tempDir } from '../../helpers/tmp.ts';

/**
 * Expected values: test/reference/purification.py (numpy + scipy; versions inside the fixture),
 * which also generated the invented pilot responses used here.
 */
const fixture = JSON.parse(
  readFileSync(new URL('../../reference/fixtures/purification.json', import.meta.url), 'utf8'),
) as {
  codes: string[];
  reverse: string[];
  offDomain: string;
  straightLiners: number[];
  rows: (number | null)[][];
  round1: Expected;
  round2: Expected;
  round1WithStraightLiners: Expected;
};

interface Expected {
  n: number;
  k: number;
  alpha: number;
  lambda2: number;
  lambda6: number;
  feldt: [number, number];
  items: Record<
    string,
    { mean: number; sd: number; correctedItemTotal: number; alphaIfDeleted: number; counts: number[] }
  >;
  facetAlpha: Record<string, number>;
}

/** Agreement with the numpy/scipy fixture: both sides compute in double precision. */
const REFERENCE_TOLERANCE = 1e-9;

const FACETS = [
  ['TR', 'Confidence in traffic', 'Belief in riding safely among motor vehicles.'],
  ['RP', 'Route planning', 'Belief in choosing and adapting a route.'],
  ['BH', 'Bike handling', 'Belief in controlling the bicycle itself.'],
  ['RR', 'Roadside repairs', 'Belief in dealing with common faults during a trip.'],
] as const;

let tmp: ReturnType<typeof tempDir>;
let study: Study;
const facetIds: Record<string, number> = {};

beforeEach(() => {
  tmp = tempDir();
  study = Study.create(path.join(tmp.dir, 's.scalewright'), { actor: TEST_ACTOR, app: 'test' });
  for (const [prefix, name, definition] of FACETS) facetIds[prefix] = addFacet(study, name, definition);
  insertFixturePool(study, fixture, facetIds);
});
afterEach(() => {
  study.close();
  tmp.cleanup();
});

/** Stores the given respondents × items as the pilot dataset (no missing codes: blanks only). */
async function storePilot(rows: (number | null)[][], codes: string[], name = 'Pilot'): Promise<number> {
  const { csv, mapping } = responsesCsv(codes, rows);
  return storeCsv(study, csv, mapping, { name, missingCodes: { text: [], numeric: [] } });
}

function excludeStraightLiners(datasetId: number) {
  study.change({ phase: 'pilot', kind: 'excluded', target: 'straight-liners' }, () =>
    insertExclusions(
      study,
      datasetId,
      fixture.straightLiners.map((respondent) => ({ respondent, excluded: true, reason: 'straight-lining' })),
    ),
  );
}

function expectMatches(roundId: number, expected: Expected) {
  const detail = roundDetail(study, roundId);
  expect(detail.scale.n).toBe(expected.n);
  expect(detail.scale.k).toBe(expected.k);
  expect(detail.scale.alpha.value).toBeCloseTo(expected.alpha, 9);
  // Guttman's lambda 2 and 6 from numpy's covariance and inverse (test/reference/purification.py).
  expect(Math.abs((detail.scale.lambda2?.value ?? 0) - expected.lambda2)).toBeLessThan(REFERENCE_TOLERANCE);
  expect(Math.abs((detail.scale.lambda6?.value ?? 0) - expected.lambda6)).toBeLessThan(REFERENCE_TOLERANCE);
  expect(Math.abs(detail.scale.alphaCI.lower - expected.feldt[0])).toBeLessThan(REFERENCE_TOLERANCE);
  expect(Math.abs(detail.scale.alphaCI.upper - expected.feldt[1])).toBeLessThan(REFERENCE_TOLERANCE);
  for (const row of detail.rows) {
    const want = expected.items[row.code];
    expect(Math.abs(row.stats.mean - want.mean), row.code).toBeLessThan(REFERENCE_TOLERANCE);
    expect(Math.abs(row.stats.sd - want.sd), row.code).toBeLessThan(REFERENCE_TOLERANCE);
    expect(
      Math.abs((row.stats.correctedItemTotal as number) - want.correctedItemTotal),
      row.code,
    ).toBeLessThan(REFERENCE_TOLERANCE);
    expect(Math.abs((row.stats.alphaIfDeleted as number) - want.alphaIfDeleted), row.code).toBeLessThan(
      REFERENCE_TOLERANCE,
    );
  }
  for (const [prefix] of FACETS) {
    const facet = detail.facets.find((f) => f.facetId === facetIds[prefix]);
    expect(Math.abs((facet?.analysis?.alpha.value ?? Number.NaN) - expected.facetAlpha[prefix])).toBeLessThan(
      REFERENCE_TOLERANCE,
    );
  }
  return detail;
}

const OD_DOMAIN =
  'OD1 asks about enjoying bicycle racing on television, which the construct excludes (sport and racing are outside the domain).';
const OD_STATS =
  'Corrected item-total r = .10, far below the others; alpha rises from .922 to .931 without it.';

describe('a purification round', () => {
  it('analyses every pooled item on the pilot data minus the exclusions, reverse keys applied, as numpy does', async () => {
    const datasetId = await storePilot(fixture.rows, fixture.codes);
    excludeStraightLiners(datasetId);
    const round = runRound(study, { bootstrap: { resamples: 200, seed: 5 } });
    expect(round).toMatchObject({ number: 1, k: 17, n: fixture.round1.n, excluded: 12, onCurrentData: true });
    expect(round.respondentsInFile).toBe(fixture.rows.length);
    const detail = expectMatches(round.id, fixture.round1);

    // The response distributions are of the scored answers (BH3 reversed), complete cases only.
    for (const row of detail.rows) {
      const counts = row.distribution.counts;
      expect(counts.reduce((a, b) => a + b, 0) + row.distribution.missing).toBe(
        fixture.rows.length - fixture.straightLiners.length,
      );
    }
    expect(detail.rows.find((r) => r.code === 'BH3')?.keying).toBe('reverse');

    // The planted off-domain item shows up: low corrected item-total, and alpha rises without it.
    const od = detail.rows.find((r) => r.code === fixture.offDomain);
    expect(od?.flags.map((f) => f.rule)).toEqual(expect.arrayContaining(['low-item-total', 'alpha-rises']));
    expect(
      detail.rows.filter((r) => r.flags.some((f) => f.rule === 'low-item-total')).map((r) => r.code),
    ).toEqual(['OD1']);

    // The run stores exactly what it ran on, with the seed and engine version, and its log row cites it.
    const run = getRun(study, round.runId);
    expect(run?.inputs).toMatchObject({
      round: 1,
      dataset: { id: datasetId, excluded: 12, excludedRespondents: fixture.straightLiners },
      reverseKeyed: ['BH3'],
      bounds: { min: 1, max: 5 },
    });
    expect((run?.inputs as { items?: unknown[] } | undefined)?.items).toHaveLength(17);
    expect(run?.seed).toBe(5);
    expect(run?.options).toMatchObject({ missing: 'listwise', bootstrap: { resamples: 200, seed: 5 } });
    expect(run?.engineVersion).toMatch(/\d/);
    const [entry] = study.log.list({ phase: 'purification' });
    expect(entry).toMatchObject({ kind: 'analysis-run', runId: round.runId });
    expect(entry.target).toMatch(/purification round 1 \(17 items, n = 235\)/);

    // The stored raw answers are never changed by reverse keying.
    const raw = analysisData(study, datasetId, ['BH3']).data.map((r) => r[0]);
    expect(raw).toEqual(
      fixture.rows
        .filter((_, i) => !fixture.straightLiners.includes(i))
        .map((r) => r[fixture.codes.indexOf('BH3')]),
    );
  });

  it('shows how straight-liners change the item statistics when they are not excluded', async () => {
    await storePilot(fixture.rows, fixture.codes);
    const round = runRound(study, { bootstrap: null });
    const detail = expectMatches(round.id, fixture.round1WithStraightLiners);
    // Straight-lining "5" runs against the reverse-keyed BH3 once it is reversed.
    const bh3 = detail.rows.find((r) => r.code === 'BH3')?.stats.correctedItemTotal as number;
    expect(bh3).toBeLessThan(fixture.round1.items.BH3.correctedItemTotal - 0.3);
    expect(detail.rows.find((r) => r.code === 'BH3')?.flags.map((f) => f.rule)).toContain('low-item-total');
  });

  it('runs the same in a worker as in this thread', async () => {
    const datasetId = await storePilot(fixture.rows, fixture.codes);
    excludeStraightLiners(datasetId);
    const prepared = prepareRound(study, { bootstrap: { resamples: 300, seed: 9 } });
    const progress: number[] = [];
    const result = JOBS['purification.round'](prepared.job, {
      progress: (done, total) => progress.push(done / total),
      shouldStop: () => false,
    });
    // Progress runs once over the scale and the four facets together, then the factor analysis's
    // parallel analysis, and never goes back.
    expect(progress.at(-1)).toBe(1);
    expect(progress.every((p, i) => i === 0 || p >= progress[i - 1])).toBe(true);
    const stored = storeRound(study, prepared, JSON.parse(JSON.stringify(result)));
    expect(stored.bootstrapCI).toMatchObject({ resamples: 300, seed: 9 });
    expect(stored.bootstrapCI?.lower).toBeLessThan(stored.alpha);
  });

  it('refuses to store a round when the exclusions changed while it ran', async () => {
    const datasetId = await storePilot(fixture.rows, fixture.codes);
    const prepared = prepareRound(study, { bootstrap: null });
    const result = JOBS['purification.round'](prepared.job, {
      progress: () => undefined,
      shouldStop: () => false,
    });
    excludeStraightLiners(datasetId);
    expect(() => storeRound(study, prepared, result)).toThrow(
      /the pilot data, its exclusions, .* changed while round 1 ran; nothing was stored/,
    );
    expect(listRounds(study)).toHaveLength(0);
  });

  it('refuses to store a round when another one was stored while it ran', async () => {
    await storePilot(fixture.rows, fixture.codes);
    const a = prepareRound(study, { bootstrap: null });
    const b = prepareRound(study, { bootstrap: null });
    const run = (p: typeof a) =>
      JOBS['purification.round'](p.job, { progress: () => undefined, shouldStop: () => false });
    storeRound(study, a, run(a));
    expect(() => storeRound(study, b, run(b))).toThrow(
      'round 1 was stored while this one ran; run the round again',
    );
    expect(listRounds(study)).toHaveLength(1);
  });

  it('names an answer outside the declared response range by respondent and column', async () => {
    await storePilot(
      [
        [1, 2, 3],
        [2, 7, 3],
        [3, 3, 4],
      ],
      ['TR1', 'TR2', 'TR3'],
    );
    expect(() => runRound(study)).toThrow(
      'pilot data "Pilot", respondent p2, column TR2: the answer 7 lies outside the declared response range 1–5 (Construct phase, response format)',
    );
  });

  it('asks for pilot data before the first round', () => {
    expect(() => runRound(study)).toThrow(/no pilot data has been imported yet/);
    expect(purificationView(study).pilot).toBeNull();
  });
});

describe('decisions and the next round', () => {
  let datasetId: number;
  beforeEach(async () => {
    datasetId = await storePilot(fixture.rows, fixture.codes);
    excludeStraightLiners(datasetId);
  });

  it('drops the off-domain item with both rationales; the next round starts from the decision', () => {
    const r1 = runRound(study, { bootstrap: null });
    const logBefore = study.log.count();
    const decisionId = decideItem(study, {
      itemCode: 'od1',
      action: 'drop',
      domainRationale: OD_DOMAIN,
      statisticalRationale: OD_STATS,
    });
    const [entry] = study.log.list({ limit: 1 });
    expect(study.log.count()).toBe(logBefore + 1);
    expect(entry).toMatchObject({ kind: 'item-dropped', target: 'item OD1', runId: r1.runId });
    expect(entry.rationale).toBe(`Domain: ${OD_DOMAIN}\nStatistics: ${OD_STATS}`);
    expect(entry.detail).toMatchObject({
      round: 1,
      statisticsOnly: false,
      fromFacet: 'Confidence in traffic',
    });
    expect(purificationView(study).next?.items).not.toContain('OD1');

    const r2 = runRound(study, { bootstrap: null });
    expect(r2).toMatchObject({ number: 2, k: 16, left: ['OD1'], returned: [] });
    expectMatches(r2.id, fixture.round2);
    expect(r2.alpha).toBeGreaterThan(r1.alpha);
    expect(getRun(study, r2.runId)?.inputs).toMatchObject({
      startedFromRound: 1,
      decisionsApplied: [decisionId],
    });

    const history = decisionViews(study);
    expect(history).toHaveLength(1);
    expect(history[0]).toMatchObject({ roundNumber: 1, runId: r1.runId, inForce: true, reversedBy: null });
    const overview = phaseOverview(study, 'purification');
    const check = (id: string) => overview.checklist.find((c) => c.id === id);
    expect(check('round-on-current-data')?.met).toBe(true);
    expect(check('final-round-current')?.met).toBe(true);
    expect(check('drops-have-domain-rationale')?.met).toBe(true);
    expect(check('alpha-with-ci')?.detail).toMatch(
      /^α = \.93\d \(meets the \.70 criterion for early-stage research, Nunnally & Bernstein \(1994\)\), 95% CI \.91\d to \.94\d \(Feldt\), n = 235/,
    );
    expect(overview.holds).toEqual([
      '2 rounds',
      'α = .93 in round 2 (meets the .70 criterion)',
      '16 items retained',
      '1 dropped',
    ]);
  });

  it('allows a drop on statistics alone, marks it, holds sign-off, and a restore reverses it', () => {
    runRound(study, { bootstrap: null });
    const dropId = decideItem(study, {
      itemCode: 'OD1',
      action: 'drop',
      domainRationale: '  ',
      statisticalRationale: 'alpha goes up',
    });
    const [entry] = study.log.list({ limit: 1 });
    expect(entry.target).toBe('item OD1 (statistics only)');
    expect(entry.rationale).toMatch(/^Statistics only: no reason about the construct’s domain was given\./);
    expect(listDecisions(study)[0]).toMatchObject({ statisticsOnly: true, domainRationale: '' });
    runRound(study, { bootstrap: null });
    const overview = phaseOverview(study, 'purification');
    const drops = overview.checklist.find((c) => c.id === 'drops-have-domain-rationale');
    expect(drops).toMatchObject({ met: false });
    expect(drops?.detail).toMatch(/dropped on statistics only: OD1 \(round 1\)/);

    const restoreId = reverseDecision(study, dropId, {
      domainRationale: 'On reflection the team wants to see it beside the traffic items once more.',
      statisticalRationale: '',
    });
    const views = decisionViews(study);
    expect(views.find((d) => d.id === dropId)).toMatchObject({ reversedBy: restoreId, inForce: false });
    expect(views.find((d) => d.id === restoreId)).toMatchObject({
      action: 'restore',
      reversesId: dropId,
      roundNumber: 2,
    });
    expect(purificationView(study).next?.items).toContain('OD1');
    const r3 = runRound(study, { bootstrap: null });
    expect(r3).toMatchObject({ number: 3, k: 17, returned: ['OD1'] });
    expect(() => reverseDecision(study, dropId, { domainRationale: 'x', statisticalRationale: '' })).toThrow(
      'that drop of item OD1 has already been reversed',
    );
  });

  it('moves an item to another facet for the next round, and a move back reverses the move', () => {
    runRound(study, { bootstrap: null });
    const move = decideItem(study, {
      itemCode: 'RP4',
      action: 'move',
      toFacetId: facetIds.TR,
      domainRationale: 'RP4 asks about judging junctions on the way, which is about riding among traffic.',
      statisticalRationale: '',
    });
    expect(study.log.list({ limit: 1 })[0]).toMatchObject({
      kind: 'item-moved',
      target: 'item RP4 to facet "Confidence in traffic"',
    });
    const r2 = runRound(study, { bootstrap: null });
    const detail = roundDetail(study, r2.id);
    expect(detail.facets.find((f) => f.facetId === facetIds.TR)?.items).toContain('RP4');
    expect(detail.facets.find((f) => f.facetId === facetIds.RP)?.items).toEqual(['RP1', 'RP2', 'RP3']);
    expect(detail.rows.find((r) => r.code === 'RP4')?.facetName).toBe('Confidence in traffic');
    const back = reverseDecision(study, move, {
      domainRationale: 'The team agreed the item is about choosing where to ride after all.',
      statisticalRationale: 'It correlates more with the route items (within-facet r).',
    });
    expect(decisionViews(study).find((d) => d.id === back)).toMatchObject({
      action: 'move',
      reversesId: move,
      toFacet: 'Route planning',
    });
  });

  it('refuses bad decisions with a clear message and leaves the study unchanged', () => {
    const r1 = runRound(study, { bootstrap: null });
    decideItem(study, {
      itemCode: 'OD1',
      action: 'drop',
      domainRationale: OD_DOMAIN,
      statisticalRationale: OD_STATS,
    });
    runRound(study, { bootstrap: null });
    const logRows = study.log.count();
    const decisions = listDecisions(study).length;
    const cases: [Parameters<typeof decideItem>[1], string | RegExp][] = [
      [
        { itemCode: 'ZZ9', action: 'drop', domainRationale: 'x', statisticalRationale: '' },
        'there is no item "ZZ9" in the item pool',
      ],
      [
        { itemCode: 'TR1', action: 'keep', domainRationale: ' ', statisticalRationale: '\n' },
        'give a rationale for keeping item TR1: how it relates to the construct’s domain, and what the statistics show',
      ],
      [
        {
          itemCode: 'TR1',
          action: 'move',
          toFacetId: facetIds.RP,
          domainRationale: '',
          statisticalRationale: 'r',
        },
        /moving item TR1 to facet "Route planning" is a judgement about the construct’s domain/,
      ],
      [
        {
          itemCode: 'TR1',
          action: 'move',
          toFacetId: facetIds.TR,
          domainRationale: 'x',
          statisticalRationale: '',
        },
        'item TR1 is already in facet "Confidence in traffic"',
      ],
      [
        { itemCode: 'TR1', action: 'move', toFacetId: 999, domainRationale: 'x', statisticalRationale: '' },
        'facet 999 is not an active facet of this study',
      ],
      [
        { itemCode: 'OD1', action: 'drop', domainRationale: 'x', statisticalRationale: '' },
        'item OD1 was dropped in round 1; restore it before dropping it',
      ],
      [
        { itemCode: 'TR2', action: 'restore', domainRationale: 'x', statisticalRationale: '' },
        'item TR2 is not dropped, so there is nothing to restore',
      ],
      [
        { roundId: r1.id, itemCode: 'TR2', action: 'keep', domainRationale: 'x', statisticalRationale: '' },
        'decisions are made on the latest round (round 2); round 1 is kept as history',
      ],
    ];
    for (const [request, message] of cases) {
      expect(() => decideItem(study, request)).toThrow(RuleError);
      expect(() => decideItem(study, request)).toThrow(message);
    }
    const keep = decideItem(study, {
      itemCode: 'TR2',
      action: 'keep',
      domainRationale: 'core traffic item',
      statisticalRationale: '',
    });
    expect(() => reverseDecision(study, keep, { domainRationale: 'x', statisticalRationale: '' })).toThrow(
      /keeping item TR2 changed nothing to undo; to take it out, drop it/,
    );
    expect(() => reverseDecision(study, 9_999, { domainRationale: 'x', statisticalRationale: '' })).toThrow(
      'there is no item decision 9999 in this study',
    );
    expect(study.log.count()).toBe(logRows + 1);
    expect(listDecisions(study)).toHaveLength(decisions + 1);
  });

  it('refuses rounds and decisions once the phase is signed off', () => {
    runRound(study, { bootstrap: null });
    study.change({ phase: 'purification', kind: 'signed-off', target: 'test' }, () =>
      setPhaseStatus(study, 'purification', 'signed-off'),
    );
    const logRows = study.log.count();
    expect(() => runRound(study)).toThrow(/the Purification phase is signed off; reopen it/);
    expect(() =>
      decideItem(study, {
        itemCode: 'OD1',
        action: 'drop',
        domainRationale: OD_DOMAIN,
        statisticalRationale: '',
      }),
    ).toThrow(/signed off/);
    expect(study.log.count()).toBe(logRows);
    expect(() => signOffPhase(study, 'purification', 'again')).toThrow(/already signed off/);
  });

  it('asks for a decision on every flagged item and marks a round on old exclusions as not current', () => {
    const r1 = runRound(study, { bootstrap: null });
    let checklist = phaseOverview(study, 'purification').checklist;
    expect(checklist.find((c) => c.id === 'flagged-items-decided')).toMatchObject({
      met: false,
      detail: expect.stringContaining('OD1'),
    });
    decideItem(study, { itemCode: 'OD1', action: 'keep', domainRationale: 'x', statisticalRationale: 'y' });
    checklist = phaseOverview(study, 'purification').checklist;
    expect(checklist.find((c) => c.id === 'flagged-items-decided')?.met).toBe(true);
    // A keep does not change the item set, so round 1 still reflects every decision.
    expect(checklist.find((c) => c.id === 'final-round-current')?.met).toBe(true);

    study.change({ phase: 'pilot', kind: 'reinstated', target: 'p1' }, () =>
      insertExclusions(study, datasetId, [
        { respondent: fixture.straightLiners[0], excluded: false, reason: 'checked' },
      ]),
    );
    expect(roundSummaries(study).find((r) => r.id === r1.id)?.onCurrentData).toBe(false);
    checklist = phaseOverview(study, 'purification').checklist;
    expect(checklist.find((c) => c.id === 'round-on-current-data')).toMatchObject({
      met: false,
      detail:
        'round 1 is out of date: the exclusions from "Pilot" changed after this round (12 then, 11 now); run a new round',
    });
  });
});

describe('the demo study', () => {
  let demo: Study;
  let demoDir: ReturnType<typeof tempDir>;
  beforeEach(() => {
    demoDir = tempDir();
    demo = Study.create(
      path.join(demoDir.dir, 'demo.scalewright'),
      { actor: TEST_ACTOR, app: 'test' },
      // The demo up to purification, which it leaves open for trying rounds.
      { init: (study) => fillDemoStudy(study, 'purification') },
    );
  });
  afterEach(() => {
    demo.close();
    demoDir.cleanup();
  });

  it('shows the planted off-domain item: low corrected item-total, alpha rises without it; dropped with both reasons', () => {
    const [first, second] = roundSummaries(demo);
    const od = roundDetail(demo, first.id).rows.find((r) => r.code === DEMO_OFF_DOMAIN_ITEM);
    expect(od?.flags.map((f) => f.rule)).toEqual(expect.arrayContaining(['low-item-total', 'alpha-rises']));
    expect(od?.stats.alphaIfDeleted as number).toBeGreaterThan(first.alpha);
    // The planted cross-loading item left too (purification-factor.test.ts follows it).
    expect(second.left).toEqual([DEMO_OFF_DOMAIN_ITEM, DEMO_CROSS_LOADING_ITEM]);
    // Alpha alone would rise without the off-domain item (alpha if deleted, above); round 2 also lost
    // the cross-loading item, which adds to alpha: dropping it is a judgement about the facets, not alpha.
    expect(second.alpha).toBeLessThan(od?.stats.alphaIfDeleted as number);
    const [drop] = decisionViews(demo);
    expect(drop).toMatchObject({ action: 'drop', roundNumber: 1, statisticsOnly: false, inForce: true });
    expect(drop.domainRationale).toMatch(/construct excludes/);
    expect(drop.statisticalRationale).toContain(`alpha would rise from ${first.alpha.toFixed(3).slice(1)}`);
  });

  it('shows how the straight-liners change the item statistics when they are brought back', () => {
    const pilot = currentPilotDataset(demo);
    if (!pilot) throw new Error('the demo has no pilot data');
    const excluded = [...currentExclusions(demo, pilot.id).keys()];
    expect(excluded).toHaveLength(DEMO_STRAIGHT_LINERS);
    const before = roundSummaries(demo).at(-1) as RoundSummary;
    reopenPhase(demo, 'pilot', 'checking what the straight-liners do to the item statistics');
    includeRespondents(demo, pilot.id, { respondents: excluded, reason: 'comparison for the team' });
    const after = runRound(demo, { bootstrap: null });
    expect(after.n).toBe(before.n + DEMO_STRAIGHT_LINERS);
    const r = (id: number) =>
      new Map(roundDetail(demo, id).rows.map((row) => [row.code, row.stats.correctedItemTotal as number]));
    const [rBefore, rAfter] = [r(before.id), r(after.id)];
    // One identical answer to every item inflates every item-rest correlation.
    for (const [code, value] of rAfter) expect(value, code).toBeGreaterThan(rBefore.get(code) as number);
    expect(after.alpha).toBeGreaterThan(before.alpha);
  });
});
