import { readFileSync } from 'node:fs';
import { describe, expect, it } from 'vitest';
import {
  aikenV,
  analyzeContentValidity,
  cohenKappa,
  contentValidityRatio,
  criticalCvr,
  type ExpertRating,
  fleissKappa,
  formatRatio,
  isRelevant,
  itemCvi,
  kappaBand,
  modifiedKappa,
  scaleCvi,
} from '../../../app/engine/content.ts';
import { EngineError } from '../../../app/engine/errors.ts';

/** Agreement with the numpy/scipy/statsmodels/sklearn fixture (same formulas, double precision). */
const FIXTURE_TOL = 1e-12;
/** Published values are printed to two or three decimals. */
const PUBLISHED_2DP = 0.005;
const PUBLISHED_3DP = 0.0005;

interface FixturePanel {
  scale: { min: number; max: number };
  experts: number;
  ratings: { item: string; expert: string; relevance: number | null; essential?: boolean | null }[];
  items: {
    item: string;
    rated: number;
    relevant: number;
    iCvi: number;
    pc: number;
    modifiedKappa: number;
    aikenV: number;
    essentialAnswered?: number;
    cvr?: number;
  }[];
  sCviAve: number;
  sCviUa: number;
}

interface Fixture {
  versions: Record<string, string>;
  criticalCvr: {
    experts: number;
    essentialNeeded: number | null;
    cvr: number | null;
    tailProbability: number | null;
  }[];
  panels: FixturePanel[];
  fleiss: { categories: string[]; placements: string[][]; counts: number[][]; fleissKappa: number }[];
  cohen: { a: string[]; b: string[]; kappa: number }[];
}

// Written by test/reference/content.py (numpy, scipy.stats.binom, statsmodels fleiss_kappa,
// sklearn cohen_kappa_score); library versions are inside the fixture.
const fixture: Fixture = JSON.parse(
  readFileSync(new URL('../../reference/fixtures/content.json', import.meta.url), 'utf8'),
);

const scale14 = { min: 1, max: 4 };

describe('I-CVI and relevance', () => {
  it('counts 3 and 4 as relevant on the 1-4 scale (Lynn 1986; Polit & Beck 2006)', () => {
    expect([1, 2, 3, 4].map((r) => isRelevant(r, scale14))).toEqual([false, false, true, true]);
  });

  it('takes the upper half of other scales, excluding the midpoint', () => {
    expect([1, 2, 3, 4, 5].map((r) => isRelevant(r, { min: 1, max: 5 }))).toEqual([
      false,
      false,
      false,
      true,
      true,
    ]);
    expect([0, 1, 2, 3].map((r) => isRelevant(r, { min: 0, max: 3 }))).toEqual([false, false, true, true]);
  });

  it('gives 5/6 for five relevant ratings of six', () => {
    expect(itemCvi([4, 3, 4, 2, 4, 3], scale14)).toBeCloseTo(5 / 6, 15);
  });

  it('rejects an empty list and off-scale ratings with a message', () => {
    expect(() => itemCvi([], scale14)).toThrow('I-CVI requires at least one rating');
    expect(() => itemCvi([4, 5], scale14)).toThrow(/whole-number ratings from 1 to 4 \(got 5\)/);
    expect(() => itemCvi([2.5], scale14)).toThrow(EngineError);
    expect(() => itemCvi([3], { min: 4, max: 1 })).toThrow(/min below max/);
  });
});

describe('modified kappa', () => {
  it('reproduces the worked example: N = 6, A = 5 → I-CVI .83, Pc .094, k* .82 (Polit, Beck & Owen 2007)', () => {
    const mk = modifiedKappa(6, 5);
    expect(Math.abs(mk.iCvi - 0.83)).toBeLessThan(PUBLISHED_2DP);
    expect(Math.abs(mk.pc - 0.094)).toBeLessThan(PUBLISHED_3DP);
    expect(Math.abs(mk.kappa - 0.82)).toBeLessThan(PUBLISHED_2DP);
    expect(mk.band).toBe('excellent');
  });

  it('has the exact value from the formula: Pc = 6/64, k* = (5/6 − 6/64)/(1 − 6/64)', () => {
    const mk = modifiedKappa(6, 5);
    expect(mk.pc).toBe(6 / 64);
    expect(mk.kappa).toBeCloseTo((5 / 6 - 6 / 64) / (1 - 6 / 64), 15);
  });

  it('uses the bands > .74 excellent, .60–.74 good, .40–.59 fair, < .40 poor (Polit, Beck & Owen 2007)', () => {
    expect(kappaBand(0.75)).toBe('excellent');
    expect(kappaBand(0.74)).toBe('good');
    expect(kappaBand(0.6)).toBe('good');
    expect(kappaBand(0.59)).toBe('fair');
    expect(kappaBand(0.4)).toBe('fair');
    expect(kappaBand(0.39)).toBe('poor');
    expect(() => kappaBand(Number.NaN)).toThrow(EngineError);
  });

  it('rejects impossible counts', () => {
    expect(() => modifiedKappa(0, 0)).toThrow('modified kappa requires at least one expert (got 0)');
    expect(() => modifiedKappa(5, 6)).toThrow(/0 to 5 agreeing experts/);
  });
});

describe('Lawshe CVR and its exact critical value', () => {
  it('computes CVR = (ne − N/2)/(N/2)', () => {
    expect(contentValidityRatio(8, 10)).toBeCloseTo(0.6, 15);
    expect(contentValidityRatio(0, 7)).toBe(-1);
    expect(contentValidityRatio(7, 7)).toBe(1);
    expect(() => contentValidityRatio(4, 3)).toThrow(/0 to 3 essential judgements/);
  });

  it('matches the published critical values for N = 5..12 (Wilson, Pan & Schumsky 2012; Ayre & Scally 2014)', () => {
    const published: [number, number][] = [
      [5, 1],
      [6, 1],
      [7, 1],
      [8, 0.75],
      [9, 0.778],
      [10, 0.8],
      [11, 0.636],
      [12, 0.667],
    ];
    for (const [n, cvr] of published) {
      const crit = criticalCvr(n);
      expect(crit, `N = ${n}`).not.toBeNull();
      expect(Math.abs((crit?.cvr ?? Number.NaN) - cvr), `N = ${n}`).toBeLessThan(PUBLISHED_3DP);
    }
  });

  it('agrees with scipy.stats.binom for N = 1..40 (fixture)', () => {
    for (const ref of fixture.criticalCvr) {
      const crit = criticalCvr(ref.experts);
      if (ref.cvr === null) {
        expect(crit, `N = ${ref.experts}`).toBeNull();
        continue;
      }
      expect(crit?.essentialNeeded, `N = ${ref.experts}`).toBe(ref.essentialNeeded);
      expect(crit?.cvr).toBeCloseTo(ref.cvr, 12);
      expect(Math.abs((crit?.tailProbability ?? 0) - (ref.tailProbability ?? 1))).toBeLessThan(
        FIXTURE_TOL * 100,
      );
    }
  });

  it('returns null for panels too small to reach .05', () => {
    expect(criticalCvr(4)).toBeNull();
    expect(() => criticalCvr(0)).toThrow(EngineError);
    expect(() => criticalCvr(10, 1.5)).toThrow(/between 0 and 1/);
  });
});

describe("Aiken's V and S-CVI", () => {
  it('gives (3 + 3 + 2)/(3·3) for ratings 4, 4, 3 on 1–4 (Aiken 1985 formula)', () => {
    expect(aikenV([4, 4, 3], scale14)).toBeCloseTo(8 / 9, 15);
    expect(aikenV([1, 1], scale14)).toBe(0);
    expect(aikenV([5, 5], { min: 1, max: 5 })).toBe(1);
  });

  it('averages I-CVIs and counts universal agreement', () => {
    const s = scaleCvi([1, 0.8, 1, 0.6]);
    expect(s.average).toBeCloseTo(0.85, 15);
    expect(s.universal).toBe(0.5);
    expect(() => scaleCvi([])).toThrow('S-CVI requires at least one item');
  });
});

describe('agreement on facets', () => {
  it.each(fixture.fleiss.map((f, i) => [i, f] as const))(
    'Fleiss kappa matches statsmodels (case %i)',
    (_, f) => {
      expect(Math.abs(fleissKappa(f.counts) - f.fleissKappa)).toBeLessThan(FIXTURE_TOL);
    },
  );

  it.each(fixture.cohen.map((c, i) => [i, c] as const))('Cohen kappa matches sklearn (case %i)', (_, c) => {
    expect(Math.abs(cohenKappa(c.a, c.b) - c.kappa)).toBeLessThan(FIXTURE_TOL);
  });

  it('is 1 for perfect agreement and refuses undefined cases', () => {
    expect(cohenKappa(['a', 'b', 'a'], ['a', 'b', 'a'])).toBe(1);
    expect(() => cohenKappa(['a', 'a'], ['a', 'a'])).toThrow(/undefined/);
    expect(() => cohenKappa(['a'], ['a', 'b'])).toThrow(/two ratings per subject/);
    expect(() =>
      fleissKappa([
        [3, 0],
        [3, 0],
      ]),
    ).toThrow(/every rating falls in one category/);
    expect(() =>
      fleissKappa([
        [2, 1],
        [1, 1],
      ]),
    ).toThrow(/same number of raters/);
    expect(() => fleissKappa([[2, 1]])).toThrow(/at least two subjects/);
  });
});

describe('formatRatio', () => {
  it('drops the leading zero as the trade prints ratios', () => {
    expect(formatRatio(0.8333)).toBe('.83');
    expect(formatRatio(1)).toBe('1.00');
    expect(formatRatio(-1 / 3)).toBe('-.33');
    expect(formatRatio(7 / 9, 3)).toBe('.778');
    expect(formatRatio(Number.NaN)).toBe('n/a');
  });
});

function toInput(panel: FixturePanel): ExpertRating[] {
  return panel.ratings.map((r) => ({ ...r }));
}

describe('analyzeContentValidity against the numpy panels (fixture)', () => {
  it.each(fixture.panels.map((p, i) => [i, p] as const))('panel %i', (_, panel) => {
    const hasEssential = panel.ratings.some((r) => r.essential !== undefined);
    const report = analyzeContentValidity({ ratings: toInput(panel), scale: panel.scale, hasEssential });
    expect(report.experts).toHaveLength(panel.experts);
    expect(report.items.map((it) => it.item)).toEqual(panel.items.map((it) => it.item));
    for (const [i, ref] of panel.items.entries()) {
      const got = report.items[i];
      expect(got.rated).toBe(ref.rated);
      expect(got.relevant).toBe(ref.relevant);
      expect(got.missing).toBe(panel.experts - ref.rated);
      expect(Math.abs((got.iCvi as number) - ref.iCvi)).toBeLessThan(FIXTURE_TOL);
      expect(Math.abs((got.pc as number) - ref.pc)).toBeLessThan(FIXTURE_TOL);
      expect(Math.abs((got.modifiedKappa as number) - ref.modifiedKappa)).toBeLessThan(FIXTURE_TOL);
      expect(Math.abs((got.aikenV as number) - ref.aikenV)).toBeLessThan(FIXTURE_TOL);
      if (ref.cvr === undefined) {
        expect(got.cvr).toBeNull();
      } else {
        expect(got.essentialAnswered).toBe(ref.essentialAnswered);
        expect(Math.abs((got.cvr as number) - ref.cvr)).toBeLessThan(FIXTURE_TOL);
      }
    }
    expect(Math.abs(report.sCviAve - panel.sCviAve)).toBeLessThan(FIXTURE_TOL);
    expect(Math.abs(report.sCviUa - panel.sCviUa)).toBeLessThan(FIXTURE_TOL);
    if (!hasEssential) {
      expect(report.cvrCritical).toBeNull();
      expect(report.warnings.join('\n')).toMatch(/no essential column/);
    }
  });
});

function ratingsFor(table: Record<string, number[]>, essential?: Record<string, boolean[]>): ExpertRating[] {
  const out: ExpertRating[] = [];
  for (const [item, values] of Object.entries(table)) {
    values.forEach((relevance, e) => {
      out.push({ item, expert: `E${e + 1}`, relevance, essential: essential?.[item]?.[e] ?? null });
    });
  }
  return out;
}

describe('analyzeContentValidity: flags, missing ratings, facets', () => {
  it('flags an I-CVI of 5/7 with the .78 benchmark and names the source (Polit & Beck 2006)', () => {
    const report = analyzeContentValidity({
      ratings: ratingsFor({ tc1: [4, 4, 3, 4, 3, 2, 1], tc2: [4, 4, 4, 4, 3, 3, 3] }),
      scale: scale14,
      hasEssential: false,
    });
    expect(report.items[0].flags).toContain('I-CVI .71 below .78 (6+ experts; Polit & Beck 2006)');
    expect(report.items[1].flags).toEqual([]);
    expect(report.sCviUa).toBe(0.5);
  });

  it('lets 7 of 9 experts (I-CVI .778) meet the .78 benchmark at its published precision', () => {
    const report = analyzeContentValidity({
      ratings: ratingsFor({ rp1: [4, 4, 3, 4, 3, 3, 4, 2, 1] }),
      scale: scale14,
      hasEssential: false,
    });
    expect(report.items[0].iCvi).toBeCloseTo(7 / 9, 15);
    expect(report.items[0].flags.some((f) => f.startsWith('I-CVI'))).toBe(false);
  });

  it('asks for 1.00 with three to five experts (Lynn 1986) and flags a low S-CVI/Ave', () => {
    const report = analyzeContentValidity({
      ratings: ratingsFor({ bh1: [4, 4, 2, 4], bh2: [3, 2, 2, 4] }),
      scale: scale14,
      hasEssential: false,
    });
    expect(report.items[0].flags).toContain('I-CVI .75 below 1.00 (3–5 experts; Lynn 1986)');
    expect(report.items[1].flags).toContain('modified kappa .20 poor (Polit, Beck & Owen 2007)');
    expect(report.flags).toEqual(['S-CVI/Ave .63 below .90 (Polit & Beck 2006)']);
  });

  it('flags a CVR below the exact critical value for the panel', () => {
    const yes = true;
    const no = false;
    const report = analyzeContentValidity({
      ratings: ratingsFor(
        { rr1: [4, 4, 4, 4, 4, 4, 4, 4, 4], rr2: [4, 4, 4, 4, 4, 4, 4, 4, 4] },
        {
          rr1: [yes, yes, yes, yes, yes, yes, yes, no, no],
          rr2: [yes, yes, yes, yes, yes, yes, yes, yes, no],
        },
      ),
      scale: scale14,
      hasEssential: true,
    });
    expect(report.cvrCritical).toBeCloseTo(7 / 9, 15);
    expect(report.items[0].cvr).toBeCloseTo(5 / 9, 15);
    expect(report.items[0].flags).toContain(
      'CVR .56 below critical .778 for 9 experts (exact binomial, one-tailed .05; Wilson, Pan & Schumsky 2012)',
    );
    expect(report.items[1].flags).toEqual([]);
  });

  it('leaves missing ratings out of each item and reports them', () => {
    const ratings = ratingsFor({ tc1: [4, 3, 4, 4, 4, 4], tc2: [4, 4, 4, 4, 4, 4] });
    ratings[1] = { ...ratings[1], relevance: null };
    const report = analyzeContentValidity({
      ratings: [...ratings, { item: 'tc3', expert: 'E1', relevance: null }],
      scale: scale14,
      hasEssential: false,
    });
    expect(report.items[0].rated).toBe(5);
    expect(report.items[0].missing).toBe(1);
    expect(report.items[0].iCvi).toBe(1);
    expect(report.items[2].iCvi).toBeNull();
    expect(report.sCviAve).toBe(1);
    expect(report.warnings.join('\n')).toMatch(/no relevance ratings for 1 item \(tc3\)/);
    expect(report.warnings.join('\n')).toMatch(/relevance ratings missing for 1 item \(tc1\)/);
  });

  it('computes facet agreement, per-facet S-CVI and Fleiss kappa (fixture placements)', () => {
    const f = fixture.fleiss[0];
    const ratings: ExpertRating[] = [];
    const intendedFacets: Record<string, string> = {};
    f.placements.forEach((row, i) => {
      intendedFacets[`it${i + 1}`] = row[0];
      row.forEach((facet, e) => {
        ratings.push({
          item: `it${i + 1}`,
          expert: `E${e + 1}`,
          relevance: e === 0 && i === 0 ? 2 : 4,
          facet,
        });
      });
    });
    const report = analyzeContentValidity({ ratings, scale: scale14, hasEssential: false, intendedFacets });
    expect(Math.abs((report.facetSorting?.fleissKappa as number) - f.fleissKappa)).toBeLessThan(FIXTURE_TOL);
    expect(report.facetSorting?.itemsUsed).toBe(f.placements.length);
    expect(report.facetSorting?.cohenKappa).toBeNull();
    const first = f.placements[0];
    expect(report.items[0].facetAgreement).toBeCloseTo(
      first.filter((x) => x === first[0]).length / first.length,
      15,
    );
    const facetOfFirst = report.facets.find((x) => x.facet === first[0]);
    expect(facetOfFirst?.sCviUa).toBeLessThan(1);
    expect(report.facets.reduce((s, x) => s + x.items, 0)).toBe(f.placements.length);
  });

  it("adds Cohen's kappa when two experts sorted (sklearn fixture)", () => {
    const c = fixture.cohen[0];
    const ratings: ExpertRating[] = c.a.flatMap((facet, i) => [
      { item: `q${i}`, expert: 'A', relevance: 4, facet },
      { item: `q${i}`, expert: 'B', relevance: 4, facet: c.b[i] },
    ]);
    const report = analyzeContentValidity({ ratings, scale: scale14, hasEssential: false });
    expect(Math.abs((report.facetSorting?.cohenKappa as number) - c.kappa)).toBeLessThan(FIXTURE_TOL);
    expect(report.warnings.join('\n')).toMatch(/only 2 experts/);
  });

  it('refuses duplicates, off-scale values and empty input', () => {
    expect(() => analyzeContentValidity({ ratings: [], scale: scale14, hasEssential: false })).toThrow(
      'content validity requires at least one rating',
    );
    const dup: ExpertRating[] = [
      { item: 'a', expert: 'E1', relevance: 4 },
      { item: 'a', expert: 'E1', relevance: 3 },
    ];
    expect(() => analyzeContentValidity({ ratings: dup, scale: scale14, hasEssential: false })).toThrow(
      'expert E1 rates item a more than once',
    );
    expect(() =>
      analyzeContentValidity({
        ratings: [{ item: 'a', expert: 'E1', relevance: 7 }],
        scale: scale14,
        hasEssential: false,
      }),
    ).toThrow(/outside the scale 1–4/);
    expect(() =>
      analyzeContentValidity({
        ratings: [{ item: 'a', expert: 'E1', relevance: null }],
        scale: scale14,
        hasEssential: false,
      }),
    ).toThrow('content validity requires at least one relevance rating');
  });
});
