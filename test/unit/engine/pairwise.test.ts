import { readFileSync } from 'node:fs';
import { describe, expect, it } from 'vitest';
import { columnsFromRows, pairwiseMoments } from '../../../app/engine/covariance.ts';
import { analyseItems } from '../../../app/engine/reliability.ts';

/*
 * Expected values: test/reference/fixtures/pairwise.json, written by test/reference/pairwise.py with
 * numpy and scipy pair by pair (numpy.corrcoef on each pair's shared rows, each item's SD over its own
 * answers, c = r·sᵢ·sⱼ), versions inside the fixture. The engine sums over the missing masks instead,
 * so these checks hold its sums against the definition.
 */
const fixture = JSON.parse(
  readFileSync(new URL('../../reference/fixtures/pairwise.json', import.meta.url), 'utf8'),
);

/** Closed-form quantities agree with numpy/scipy to rounding. */
const TOL = 1e-10;

function worst(a: readonly (readonly (number | null)[])[], b: number[][]): number {
  let w = 0;
  a.forEach((row, i) => {
    row.forEach((x, j) => {
      w = Math.max(w, Math.abs((x ?? Number.NaN) - b[i][j]));
    });
  });
  return Number.isNaN(w) ? Number.POSITIVE_INFINITY : w;
}

describe('pairwise deletion over the missing masks against numpy pair by pair', () => {
  for (const c of fixture.cases) {
    const e = c.expected;
    it(`${c.name}: pair counts, covariances and correlations`, () => {
      const data = c.data.filter((row: (number | null)[]) => row.some((x) => x !== null));
      const m = pairwiseMoments(columnsFromRows(data, 'pairwise correlation'));
      expect(m.n).toEqual(e.pairN);
      expect(worst(m.correlation, e.correlation)).toBeLessThan(TOL);
    });

    it(`${c.name}: alpha, standardized alpha, mean r and every item statistic`, () => {
      const a = analyseItems({ names: c.names, data: c.data, missing: 'pairwise' });
      expect(a.missingData.analysed).toBe(e.analysed);
      expect(a.missingData.dropped).toBe(e.dropped);
      expect(a.missingData.minPairN).toBe(e.minPairN);
      expect(Math.abs(a.alpha.value - e.alpha)).toBeLessThan(TOL);
      expect(Math.abs((a.alphaStandardized?.value ?? 0) - e.alphaStandardized)).toBeLessThan(TOL);
      expect(Math.abs((a.meanInterItemR ?? 0) - e.meanInterItemR)).toBeLessThan(TOL);
      expect(worst(a.correlations, e.correlation)).toBeLessThan(TOL);
      a.items.forEach((item, i) => {
        const x = e.items[i];
        expect([item.n, item.missing]).toEqual([x.n, x.missing]);
        for (const key of ['mean', 'sd', 'skewness', 'kurtosis', 'correctedItemTotal', 'alphaIfDeleted']) {
          const ours = item[key as keyof typeof item] as number;
          expect(Math.abs(ours - x[key]), `${item.name} ${key}`).toBeLessThan(TOL);
        }
      });
    });
  }
});
