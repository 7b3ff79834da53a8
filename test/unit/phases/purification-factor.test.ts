import fs, { readFileSync } from 'node:fs';
import path from 'node:path';
import { afterAll, afterEach, beforeAll, beforeEach, describe, expect, it } from 'vitest';
import { DEMO_FACETS } from '../../../app/demo/construct.ts';
import { fillDemoStudy } from '../../../app/demo/index.ts';
import { DEMO_OFF_DOMAIN_ITEM } from '../../../app/demo/items.ts';
import { DEMO_CROSS_LOADING, DEMO_CROSS_LOADING_ITEM, DEMO_ITEM_TRUTH } from '../../../app/demo/pilot.ts';
import { RuleError } from '../../../app/phases/errors.ts';
import {
  decisionViews,
  mergeFacets,
  reverseDecision,
  splitFacet,
  prepareRound,
  type RoundDetail,
  roundDetail,
  roundSummaries,
  runRound,
} from '../../../app/phases/purification/index.ts';
import { listFacets } from '../../../db/repos/construct.ts';
import { listDecisions, listRounds } from '../../../db/repos/purification.ts';
import { Study } from '../../../db/study.ts';
import { TEST_ACTOR, tempDir } from '../../helpers/tmp.ts';

/**
 * The demo's population model (app/demo/pilot.ts) has four correlated facet factors and one planted
 * cross-loading item; these tests check that a purification round's factor analysis recovers that
 * structure. The independent reading is test/reference/demo_pilot.py (sklearn's ML factor analysis
 * with varimax on the same file; versions in the fixture).
 */
const reference = JSON.parse(
  readFileSync(new URL('../../reference/fixtures/demo-pilot.json', import.meta.url), 'utf8'),
) as { factorAnalysis: { loadings: Record<string, number[]> } };

let tmp: ReturnType<typeof tempDir>;
let template: string;
let study: Study;
let round1: RoundDetail;

beforeAll(() => {
  tmp = tempDir();
  template = path.join(tmp.dir, 'template.scalewright');
  // Up to purification: the tests run further rounds and decisions, so the phase stays open.
  Study.create(
    template,
    { actor: TEST_ACTOR, app: 'test' },
    { init: (s) => fillDemoStudy(s, 'purification') },
  ).close();
});
afterAll(() => tmp.cleanup());

beforeEach(() => {
  const file = path.join(tmp.dir, `s${Math.random().toString(36).slice(2)}.scalewright`);
  fs.copyFileSync(template, file);
  study = Study.open(file, { actor: TEST_ACTOR, app: 'test' });
  round1 = roundDetail(study, listRounds(study)[0].id);
});
afterEach(() => study.close());

describe('the factor analysis of the demo’s first round', () => {
  it('recovers the number of facets: parallel analysis (components and common factors) and the default count', () => {
    const f = round1.factor;
    expect(f).not.toBeNull();
    expect(f?.facetCount).toBe(DEMO_FACETS.length);
    expect(f?.request.factors).toBe(DEMO_FACETS.length);
    expect(f?.evidence.suggested.parallel).toBe(DEMO_FACETS.length);
    expect(f?.evidence.suggested.parallelFactors).toBe(DEMO_FACETS.length);
    // Every count rule is reported beside the choice, none chosen silently.
    expect(f?.evidence.suggested.kaiser).toBeGreaterThan(0);
    expect(f?.evidence.parallel?.iterations).toBe(1000);
  });

  it('matches each facet to its own factor, and the items of a facet load mostly on it', () => {
    const f = round1.factor;
    const matched = f?.correspondence.map((row) => row.factor) ?? [];
    expect(new Set(matched).size).toBe(DEMO_FACETS.length);
    expect(matched.every((k) => k !== null)).toBe(true);
    const planted = new Set([DEMO_OFF_DOMAIN_ITEM, DEMO_CROSS_LOADING_ITEM]);
    for (const row of f?.solution?.rows ?? []) {
      if (planted.has(row.code)) continue;
      expect(row.primary, row.code).toBe(row.intended);
    }
  });

  it('flags the planted cross-loading item, as the independent sklearn reading shows it', () => {
    const row = round1.factor?.solution?.rows.find((r) => r.code === DEMO_CROSS_LOADING_ITEM);
    expect(row?.flags.map((fl) => fl.rule)).toContain('cross-loading');
    const mags = (row?.loadings ?? []).map(Math.abs).sort((a, b) => b - a);
    expect(mags[1]).toBeGreaterThanOrEqual(0.3);
    // sklearn (varimax) on the same file: the item's two largest loadings both reach .30 (common practice).
    const sk = reference.factorAnalysis.loadings[DEMO_CROSS_LOADING_ITEM].map(Math.abs).sort((a, b) => b - a);
    expect(sk[1]).toBeGreaterThanOrEqual(0.3);
    // It loads on its own facet's factor and on the route-planning factor.
    const truth = DEMO_ITEM_TRUTH.find((it) => it.code === DEMO_CROSS_LOADING_ITEM);
    const byFacet = new Map(round1.factor?.correspondence.map((c) => [c.facetName, c.factor]));
    const own = byFacet.get(DEMO_FACETS[truth?.facet ?? 0].name) as number;
    const other = byFacet.get(DEMO_CROSS_LOADING.facet) as number;
    expect(Math.abs(row?.loadings[own - 1] ?? 0)).toBeGreaterThanOrEqual(0.3);
    expect(Math.abs(row?.loadings[other - 1] ?? 0)).toBeGreaterThanOrEqual(0.3);
    // No other item cross-loads.
    const crossing = round1.factor?.solution?.rows.filter((r) =>
      r.flags.some((fl) => fl.rule === 'cross-loading'),
    );
    expect(crossing?.map((r) => r.code)).toEqual([DEMO_CROSS_LOADING_ITEM]);
  });

  it('flags the off-domain item for a primary loading below .40 (common practice)', () => {
    const row = round1.factor?.solution?.rows.find((r) => r.code === DEMO_OFF_DOMAIN_ITEM);
    expect(row?.flags.map((fl) => fl.rule)).toContain('low-primary');
    // The same flags reach the round's item table.
    const item = round1.rows.find((r) => r.code === DEMO_OFF_DOMAIN_ITEM);
    expect(item?.flags.map((fl) => fl.rule)).toContain('low-primary');
  });

  it('says which model each omega rests on', () => {
    const omega = round1.factor?.solution?.omega;
    expect(omega?.model).toBe('Schmid–Leiman solution of 4 ml factors rotated by oblimin');
    expect(omega?.omegaHierarchical).toBeLessThan(omega?.omegaTotal ?? 0);
    expect(round1.scale.omegaTotal?.items).toHaveLength(round1.scale.k);
  });

  it('the demo dropped the planted item with reasons about the domain and the loadings', () => {
    const drop = decisionViews(study).find((d) => d.itemCode === DEMO_CROSS_LOADING_ITEM);
    expect(drop?.action).toBe('drop');
    expect(drop?.statisticsOnly).toBe(false);
    expect(drop?.statisticalRationale).toMatch(/loads \.\d\d on F\d and \.\d\d on F\d/);
    const last = roundSummaries(study).at(-1);
    expect(last?.items).not.toContain(DEMO_CROSS_LOADING_ITEM);
  });
});

describe('choosing the factor analysis of a round', () => {
  it('runs the researcher’s count, extraction, rotation and correlations, and stores them with the round', () => {
    const round = runRound(study, {
      bootstrap: null,
      factor: { factors: 3, extraction: 'paf', rotation: 'varimax', iterations: 200, seed: 9 },
    });
    const f = roundDetail(study, round.id).factor;
    expect(f?.request).toMatchObject({ factors: 3, extraction: 'paf', rotation: 'varimax', seed: 9 });
    expect(f?.solution?.oblique).toBe(false);
    expect(f?.solution?.rows[0].loadings).toHaveLength(3);
    // Four facets on three factors: one facet is matched to none.
    expect(f?.correspondence.filter((c) => c.factor === null)).toHaveLength(1);
  });

  it('runs none when asked, and says so', () => {
    const round = runRound(study, { bootstrap: null, factor: null });
    const detail = roundDetail(study, round.id);
    expect(detail.factor).toBeNull();
    expect(detail.factorNote).toMatch(/no factor analysis was asked for/);
  });

  it('refuses a count the items cannot carry, or settings out of range, and stores nothing', () => {
    const before = listRounds(study).length;
    const k = roundSummaries(study).at(-1)?.k as number;
    expect(() => prepareRound(study, { factor: { factors: k } })).toThrow(RuleError);
    expect(() => prepareRound(study, { factor: { factors: k } })).toThrow(
      `the number of factors must be a whole number from 1 to ${k - 1} for the round's ${k} items (got ${k})`,
    );
    expect(() => prepareRound(study, { factor: { factors: 0 } })).toThrow(/from 1 to/);
    expect(() => prepareRound(study, { factor: { iterations: 5 } })).toThrow(/100 to 20000 simulated/);
    expect(listRounds(study)).toHaveLength(before);
  });

  it('still opens a round stored before rounds ran a factor analysis or reported Guttman’s lambdas', () => {
    const run = listRounds(study)[0].runId;
    const stored = JSON.parse(
      (study.db.prepare('SELECT results FROM analysis_run WHERE id = ?').get(run) as { results: string })
        .results,
    );
    delete stored.factor;
    delete stored.factorRefused;
    delete stored.correspondence;
    delete stored.factorNote;
    delete stored.scale.lambda2;
    delete stored.scale.lambda6;
    study.db.prepare('UPDATE analysis_run SET results = ? WHERE id = ?').run(JSON.stringify(stored), run);
    const detail = roundDetail(study, listRounds(study)[0].id);
    expect(detail.factor).toBeNull();
    expect(detail.factorNote).toBe('this round was stored before rounds ran a factor analysis');
    expect(detail.scale.lambda2).toBeUndefined();
    expect(detail.rows.length).toBe(round1.rows.length);
  });
});

describe('merging and splitting facets', () => {
  const facetId = (name: string) => listFacets(study).find((f) => f.name === name)?.id as number;
  const snapshot = () => ({
    decisions: listDecisions(study).length,
    facets: listFacets(study).length,
    log: study.log.list({ limit: 1 })[0]?.seq,
  });

  it('merges one facet into another: each item a logged move naming the merge, each reversible', () => {
    const from = facetId('Roadside repairs');
    const into = facetId('Bike handling');
    const ids = mergeFacets(study, {
      fromFacetId: from,
      intoFacetId: into,
      domainRationale: 'Fixing the bike on the road is part of handling it (test).',
      statisticalRationale: '',
    });
    const moved =
      roundSummaries(study)
        .at(-1)
        ?.items.filter((c) => c.startsWith('RR')) ?? [];
    expect(ids).toHaveLength(moved.length);
    const views = decisionViews(study).filter((d) => ids.includes(d.id));
    expect(views.every((d) => d.action === 'move' && d.toFacet === 'Bike handling')).toBe(true);
    expect(study.log.list({ limit: 1 })[0].target).toContain('(merging facet "Roadside repairs")');
    // The next round counts the merged items in the receiving facet.
    const next = prepareRound(study, { bootstrap: null, factor: null });
    expect(next.job.facets.find((f) => f.facetId === into)?.items).toEqual(expect.arrayContaining(moved));
    // Reversing one move puts that item back.
    reverseDecision(study, ids[0], { domainRationale: 'Back for now (test).', statisticalRationale: '' });
    expect(decisionViews(study).at(-1)?.toFacet).toBe('Roadside repairs');
  });

  it('refuses a bad merge with a clear message and changes nothing', () => {
    const before = snapshot();
    const traffic = facetId('Confidence in traffic');
    const routes = facetId('Route planning');
    const reasons = { domainRationale: 'x', statisticalRationale: '' };
    expect(() => mergeFacets(study, { fromFacetId: traffic, intoFacetId: traffic, ...reasons })).toThrow(
      'choose two different facets to merge',
    );
    expect(() =>
      mergeFacets(study, {
        fromFacetId: traffic,
        intoFacetId: routes,
        domainRationale: ' ',
        statisticalRationale: 'r',
      }),
    ).toThrow(/merging facet "Confidence in traffic" into "Route planning" changes what the facets mean/);
    expect(() => mergeFacets(study, { fromFacetId: 999, intoFacetId: routes, ...reasons })).toThrow(
      'the merged facet (999) is not an active facet of this study',
    );
    expect(snapshot()).toEqual(before);
  });

  it('splits a facet: a new facet with its definition, the chosen items moved to it, all logged', () => {
    const routes = facetId('Route planning');
    const out = splitFacet(study, {
      facetId: routes,
      itemCodes: ['RP01', 'rp03'],
      newFacet: { name: 'Route finding on the way', definition: 'Belief in finding the way during a trip.' },
      domainRationale: 'Planning ahead and finding the way en route are different skills (test).',
      statisticalRationale: 'Two items share a second factor (test).',
    });
    expect(listFacets(study).find((f) => f.id === out.facetId)?.definition).toBe(
      'Belief in finding the way during a trip.',
    );
    expect(out.decisions).toHaveLength(2);
    const rows = study.log.list({ limit: 3 });
    expect(rows[2].kind).toBe('facet-split');
    expect(rows[0].target).toContain('(splitting facet "Route planning")');
    const next = prepareRound(study, { bootstrap: null, factor: null });
    expect(next.job.facets.find((f) => f.facetId === out.facetId)?.items).toEqual(['RP01', 'RP03']);
  });

  it('refuses a bad split with a clear message and changes nothing', () => {
    const before = snapshot();
    const routes = facetId('Route planning');
    const base = {
      facetId: routes,
      newFacet: { name: 'New', definition: 'Something.' },
      domainRationale: 'Reason (test).',
      statisticalRationale: '',
    };
    expect(() => splitFacet(study, { ...base, itemCodes: ['BH01'] })).toThrow(
      'not in facet "Route planning" in the latest round: BH01; a split moves items of the facet it splits',
    );
    const all =
      roundSummaries(study)
        .at(-1)
        ?.items.filter((c) => c.startsWith('RP')) ?? [];
    expect(() => splitFacet(study, { ...base, itemCodes: all })).toThrow(/a split leaves some items/);
    expect(() =>
      splitFacet(study, {
        ...base,
        itemCodes: ['RP01'],
        newFacet: { name: 'Bike handling', definition: 'd' },
      }),
    ).toThrow('a facet named "Bike handling" already exists');
    expect(() =>
      splitFacet(study, { ...base, itemCodes: ['RP01'], newFacet: { name: 'N', definition: ' ' } }),
    ).toThrow('define the new facet "N": what its items have in common');
    expect(snapshot()).toEqual(before);
  });
});
