import { readFileSync } from 'node:fs';
import { describe, expect, it } from 'vitest';
import { EngineError } from '../../../app/engine/errors.ts';
import { analyseItems, analyseScaleAndFacets } from '../../../app/engine/reliability.ts';
import { ENGINE_VERSION } from '../../../app/engine/version.ts';

// Expected values: test/reference/reliability.py (numpy + scipy, versions inside the fixture).
const fixture = JSON.parse(
  readFileSync(new URL('../../reference/fixtures/reliability.json', import.meta.url), 'utf8'),
);
const complete = fixture.complete;
const withMissing = fixture.missing;

/** Closed-form quantities agree with numpy/scipy to rounding. */
const REFERENCE_TOL = 1e-10;
/** The one-factor fits are iterative on both sides (PAF here, scipy least_squares there). */
const FIT_TOL = 1e-7;

describe('analyseItems on complete data (numpy/scipy fixture)', () => {
  const a = analyseItems({
    names: complete.names,
    data: complete.data,
    missing: 'listwise',
    bounds: fixture.bounds,
  });
  const e = complete.expected;

  it('reports n, k, alpha, standardized alpha and mean inter-item r', () => {
    expect(a.n).toBe(e.n);
    expect(a.k).toBe(e.k);
    expect(a.alpha.value).toBeCloseTo(e.alpha, 10);
    expect(a.alphaStandardized?.value).toBeCloseTo(e.alphaStandardized, 10);
    expect(a.meanInterItemR).toBeCloseTo(e.meanInterItemR, 10);
  });

  it('matches Feldt limits from scipy.stats.f.ppf', () => {
    expect(Math.abs(a.alphaCI.lower - e.feldt95.lower)).toBeLessThan(REFERENCE_TOL);
    expect(Math.abs(a.alphaCI.upper - e.feldt95.upper)).toBeLessThan(REFERENCE_TOL);
    expect([a.alphaCI.df1, a.alphaCI.df2]).toEqual([e.feldt95.df1, e.feldt95.df2]);
    const at90 = analyseItems({
      names: complete.names,
      data: complete.data,
      missing: 'listwise',
      ciLevel: 0.9,
    });
    expect(Math.abs(at90.alphaCI.lower - e.feldt90.lower)).toBeLessThan(REFERENCE_TOL);
    expect(Math.abs(at90.alphaCI.upper - e.feldt90.upper)).toBeLessThan(REFERENCE_TOL);
  });

  it('matches per-item statistics', () => {
    a.items.forEach((item, i) => {
      const x = e.items[i];
      expect(item.mean).toBeCloseTo(x.mean, 12);
      expect(item.sd).toBeCloseTo(x.sd, 12);
      expect(item.skewness).toBeCloseTo(x.skewness, 10);
      expect(item.kurtosis).toBeCloseTo(x.kurtosis, 10);
      expect(item.floorShare).toBeCloseTo(x.floorShare, 14);
      expect(item.ceilingShare).toBeCloseTo(x.ceilingShare, 14);
      expect(item.correctedItemTotal).toBeCloseTo(x.correctedItemTotal, 10);
      expect(item.alphaIfDeleted).toBeCloseTo(x.alphaIfDeleted, 10);
      expect(item.missing).toBe(0);
    });
  });

  it('matches the correlation matrix, split-half, SEM and MDC95', () => {
    a.correlations.forEach((row, i) => {
      row.forEach((r, j) => {
        expect(r).toBeCloseTo(e.correlation[i][j], 12);
      });
    });
    expect(a.splitHalf?.correlation).toBeCloseTo(e.splitHalf.correlation, 12);
    expect(a.splitHalf?.spearmanBrown).toBeCloseTo(e.splitHalf.spearmanBrown, 12);
    expect(a.measurementError?.sdTotal).toBeCloseTo(e.sdTotal, 10);
    expect(a.measurementError?.sem).toBeCloseTo(e.sem, 10);
    expect(a.measurementError?.mdc95).toBeCloseTo(e.mdc95, 10);
  });

  it('matches omega total from a scipy least-squares one-factor fit', () => {
    expect(a.omegaTotal).not.toBeNull();
    expect(Math.abs((a.omegaTotal?.value ?? 0) - e.omega.omegaTotal)).toBeLessThan(FIT_TOL);
    a.omegaTotal?.fit.loadings.forEach((l, i) => {
      expect(Math.abs(l - e.omega.loadings[i])).toBeLessThan(FIT_TOL);
    });
    expect(a.omegaTotal?.fit.converged).toBe(true);
  });

  it('records its inputs and engine version, and states the missing-data method', () => {
    expect(a.engineVersion).toBe(ENGINE_VERSION);
    expect(a.inputs).toEqual({
      items: complete.names,
      missing: 'listwise',
      ciLevel: 0.95,
      bootstrap: null,
      bounds: fixture.bounds,
    });
    expect(a.missingData.method).toBe('listwise');
    expect(a.missingData.description).toMatch(/listwise deletion/);
    expect(a.warnings).toEqual([]);
  });
});

describe('analyseItems with missing answers (numpy fixture)', () => {
  it('listwise: analyses the complete cases only and says how many were left out', () => {
    const a = analyseItems({
      names: withMissing.names,
      data: withMissing.data,
      missing: 'listwise',
      bounds: fixture.bounds,
    });
    const e = withMissing.listwise;
    expect(a.n).toBe(e.n);
    expect(a.missingData.dropped).toBe(withMissing.data.length - e.n);
    expect(a.alpha.value).toBeCloseTo(e.alpha, 10);
    expect(a.alphaStandardized?.value).toBeCloseTo(e.alphaStandardized, 10);
    expect(Math.abs(a.alphaCI.lower - e.feldt95.lower)).toBeLessThan(REFERENCE_TOL);
    a.items.forEach((item, i) => {
      expect(item.correctedItemTotal).toBeCloseTo(e.items[i].correctedItemTotal, 10);
      expect(item.alphaIfDeleted).toBeCloseTo(e.items[i].alphaIfDeleted, 10);
    });
    expect(Math.abs((a.omegaTotal?.value ?? 0) - e.omega.omegaTotal)).toBeLessThan(FIT_TOL);
    expect(a.warnings.some((w) => w.includes(`left out ${withMissing.data.length - e.n} of`))).toBe(true);
    const missingCounts = withMissing.names.map(
      (_: string, c: number) => withMissing.data.filter((row: (number | null)[]) => row[c] === null).length,
    );
    expect(a.items.map((item) => item.missing)).toEqual(missingCounts);
  });

  it('pairwise: r from pair-complete cases, SDs from each item, alpha from r·sᵢ·sⱼ', () => {
    const a = analyseItems({ names: withMissing.names, data: withMissing.data, missing: 'pairwise' });
    const e = withMissing.pairwise;
    expect(a.n).toBe(e.respondents);
    expect(a.missingData.minPairN).toBe(e.minPairN);
    expect(a.alphaCI.df1).toBe(e.minPairN - 1);
    expect(a.alpha.value).toBeCloseTo(e.alpha, 10);
    expect(a.alphaStandardized?.value).toBeCloseTo(e.alphaStandardized, 10);
    expect(a.meanInterItemR).toBeCloseTo(e.meanInterItemR, 10);
    a.items.forEach((item, i) => {
      expect(item.correctedItemTotal).toBeCloseTo(e.correctedItemTotal[i], 10);
    });
    a.correlations.forEach((row, i) => {
      row.forEach((r, j) => {
        expect(r).toBeCloseTo(e.correlation[i][j], 12);
      });
    });
    expect(Math.abs((a.omegaTotal?.value ?? 0) - e.omega.omegaTotal)).toBeLessThan(FIT_TOL);
    expect(a.missingData.description).toMatch(/pairwise deletion/);
  });
});

describe('analyseItems warnings and errors', () => {
  const base = [
    [1, 2, 3, 3],
    [2, 2, 4, 3],
    [3, 4, 4, 3],
    [4, 5, 5, 3],
    [5, 4, 5, 3],
  ];

  it('throws with fewer than two items or respondents', () => {
    expect(() => analyseItems({ names: ['a'], data: [[1], [2]], missing: 'listwise' })).toThrow(
      'alpha requires at least two items',
    );
    expect(() => analyseItems({ names: ['a', 'b'], data: [[1, 2]], missing: 'listwise' })).toThrow(
      'alpha requires at least two respondents',
    );
    expect(() =>
      analyseItems({
        names: ['a', 'b'],
        data: [
          [1, null],
          [null, 2],
          [3, 3],
        ],
        missing: 'listwise',
      }),
    ).toThrow(/at least two respondents; found 1 complete/);
  });

  it('names the respondent and item of a non-finite value, and a ragged row', () => {
    expect(() =>
      analyseItems({
        names: ['a', 'b'],
        data: [
          [1, 2],
          [2, Number.NaN],
        ],
        missing: 'listwise',
      }),
    ).toThrow('respondent 2, item "b": the value NaN is not a finite number');
    expect(() => analyseItems({ names: ['a', 'b'], data: [[1, 2], [2]], missing: 'listwise' })).toThrow(
      'respondent 2 has 1 answers but there are 2 items',
    );
  });

  it('warns about a zero-variance item and leaves it out of correlations, never NaN', () => {
    const a = analyseItems({ names: ['a', 'b', 'c', 'd'], data: base, missing: 'listwise' });
    expect(a.warnings.some((w) => w.startsWith('zero-variance item(s) "d"'))).toBe(true);
    expect(a.items[3].correctedItemTotal).toBeNull();
    expect(a.correlations[3]).toEqual([null, null, null, null]);
    expect(a.omegaTotal?.items).toEqual(['a', 'b', 'c']);
    expect(JSON.stringify(a)).not.toMatch(/NaN|Infinity/);
    expect(a.warnings.some((w) => w.includes('only 5 respondents'))).toBe(true);
  });

  it('throws when no item varies', () => {
    expect(() =>
      analyseItems({
        names: ['a', 'b'],
        data: [
          [3, 3],
          [3, 3],
          [3, 3],
        ],
        missing: 'listwise',
      }),
    ).toThrow(/alpha requires a total score that varies/);
  });

  it('warns about an item that correlates negatively with the rest and about negative alpha', () => {
    const reversed = base.map((row) => [row[0], row[1], 6 - row[2]]);
    const a = analyseItems({ names: ['a', 'b', 'c'], data: reversed, missing: 'listwise' });
    expect(a.warnings.some((w) => /item "c" correlates negatively.*check its keying/.test(w))).toBe(true);
    const opposite = analyseItems({
      names: ['a', 'b'],
      data: base.map((row) => [row[0], 6 - row[1]]),
      missing: 'listwise',
    });
    expect(opposite.alpha.value).toBeLessThan(0);
    expect(opposite.warnings.some((w) => w.startsWith('alpha is negative'))).toBe(true);
  });

  it('rejects a confidence level outside (0, 1)', () => {
    expect(() => analyseItems({ names: ['a', 'b'], data: base, missing: 'listwise', ciLevel: 95 })).toThrow(
      EngineError,
    );
  });
});

describe('analyseScaleAndFacets', () => {
  it('gives the scale and each facet the same numbers as separate rounds', () => {
    const facets = { traffic: ['traffic1', 'traffic2'], route: ['route1', 'route2', 'handling1'] };
    const both = analyseScaleAndFacets({
      names: complete.names,
      data: complete.data,
      missing: 'listwise',
      facets: Object.entries(facets).map(([facet, items]) => ({ facet, items })),
    });
    expect(both.scale.alpha.value).toBeCloseTo(complete.expected.alpha, 10);
    const columns = facets.route.map((n) => complete.names.indexOf(n));
    const alone = analyseItems({
      names: facets.route,
      data: complete.data.map((row: number[]) => columns.map((c) => row[c])),
      missing: 'listwise',
    });
    expect(both.facets[1].facet).toBe('route');
    expect(both.facets[1].analysis.alpha.value).toBe(alone.alpha.value);
    expect(() =>
      analyseScaleAndFacets({
        names: complete.names,
        data: complete.data,
        missing: 'listwise',
        facets: [{ facet: 'x', items: ['zz', 'traffic1'] }],
      }),
    ).toThrow('facet "x" names item "zz", which is not among the items');
  });
});
