import { describe, expect, it } from 'vitest';
import {
  columnsFromRows,
  correlationFromCovariance,
  listwiseCovariance,
  pairwiseMoments,
} from '../../../app/engine/covariance.ts';
import fixture from '../../reference/fixtures/linalg.json' with { type: 'json' };

/*
 * Reference values: test/reference/fixtures/linalg.json, written by test/reference/linalg.py with
 * numpy (cov with ddof = 1 and corrcoef on the complete data; on each pair's shared rows for the
 * pairwise cases).
 */

function maxRelDiff(a: number[][], b: number[][]): number {
  let worst = 0;
  for (let i = 0; i < a.length; i++)
    for (let j = 0; j < a[i].length; j++)
      worst = Math.max(worst, Math.abs(a[i][j] - b[i][j]) / Math.max(1, Math.abs(b[i][j])));
  return worst;
}

describe('pairwiseMoments (one pass over the missing masks) against numpy on each pair', () => {
  for (const [index, c] of fixture.pairwise.entries()) {
    it(`pairwise case ${index}: counts, covariances and correlations`, () => {
      const moments = pairwiseMoments(columnsFromRows(c.data, 'pairwise correlation'));
      expect(moments.n).toEqual(c.n);
      expect(maxRelDiff(moments.covariance, c.covariance)).toBeLessThan(1e-12);
      expect(maxRelDiff(moments.correlation, c.r)).toBeLessThan(1e-12);
    });
  }

  it('marks a variable that is constant on the cases shared with another, exactly', () => {
    const columns = [Float64Array.of(1, 2, 3, 3, 3), Float64Array.of(Number.NaN, Number.NaN, 4, 5, 6)];
    const m = pairwiseMoments(columns);
    expect(m.constantOn[0][1]).toBe(true);
    expect(m.constantOn[1][0]).toBe(false);
    expect(m.constantOn[0][0]).toBe(false);
    expect(m.correlation[0][1]).toBeNaN();
    expect(m.n[0][1]).toBe(3);
  });
});

describe('listwiseCovariance against numpy', () => {
  for (const [index, c] of fixture.data.entries()) {
    it(`data case ${index}: equals numpy.cov of the complete cases when rows with a gap are added`, () => {
      const columns = columnsFromRows([...c.data, c.data[0].map((v, j) => (j === 0 ? null : v))], 'test');
      const m = listwiseCovariance(columns);
      expect(m.n).toBe(c.data.length);
      expect(m.rows.length).toBe(c.data.length);
      expect(maxRelDiff(m.covariance, c.covariance)).toBeLessThan(1e-12);
      const r = correlationFromCovariance(m.covariance) as number[][];
      expect(maxRelDiff(r, c.correlation)).toBeLessThan(1e-12);
    });
  }

  it('refuses fewer than two complete cases and infinite values, naming where', () => {
    expect(() => listwiseCovariance([Float64Array.of(1, Number.NaN), Float64Array.of(2, 3)])).toThrow(
      'at least two rows (cases), got 1',
    );
    expect(() => listwiseCovariance([Float64Array.of(1, Number.POSITIVE_INFINITY)])).toThrow(
      'row index 1, column index 0 is Infinity',
    );
  });
});
