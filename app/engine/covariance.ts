import { EngineError } from './errors.ts';
import { kahanSum, mean } from './numeric.ts';

/**
 * Covariances and Pearson correlations of a data set held as columns (one Float64Array per variable,
 * NaN for a missing value), under listwise or pairwise deletion. The one place the engine computes
 * them: item analysis, screening, reliability and the factor analyses build on these.
 *
 * Source: corr.pearson and missing.deletion (the method registry).
 */
export type Columns = readonly Float64Array[];

/** Moments of the complete cases (listwise deletion). */
export interface ListwiseMoments {
  /** Complete cases. */
  n: number;
  /** Row indices of the complete cases, ascending. */
  rows: Int32Array;
  means: Float64Array;
  /** Covariances with divisor n − 1. */
  covariance: number[][];
}

/** Moments of every pair of variables over the cases where both are present (pairwise deletion). */
export interface PairwiseMoments {
  /** n[j][k]: cases with both j and k present; n[j][j]: cases with j present. */
  n: number[][];
  /** Covariance over each pair's shared cases (divisor count − 1); NaN when fewer than two. */
  covariance: number[][];
  /**
   * Pearson r over each pair's shared cases, means taken over those same cases; the diagonal is 1.
   * NaN when the pair shares fewer than two cases or either variable is constant on them.
   */
  correlation: number[][];
  /** constantOn[j][k]: variable j takes one value on the cases it shares with k (diagonal: overall). */
  constantOn: boolean[][];
}

function checkColumns(columns: Columns, fn: string): { n: number; p: number } {
  const p = columns.length;
  if (p === 0) throw new EngineError(`${fn} requires at least one column (variable)`, 'shape');
  const n = columns[0].length;
  for (let j = 1; j < p; j++) {
    if (columns[j].length !== n) {
      throw new EngineError(
        `${fn} requires columns of equal length; column index ${j} has ${columns[j].length} values, column index 0 has ${n}`,
        'shape',
      );
    }
  }
  for (let j = 0; j < p; j++) {
    const c = columns[j];
    for (let i = 0; i < n; i++) {
      const v = c[i];
      if (v === Number.POSITIVE_INFINITY || v === Number.NEGATIVE_INFINITY) {
        throw new EngineError(
          `${fn} requires finite numbers; row index ${i}, column index ${j} is ${v}`,
          'non-finite',
        );
      }
    }
  }
  return { n, p };
}

/**
 * Covariance matrix (divisor n − 1) of the cases with every variable present: each column is centred
 * on its compensated mean over those cases and the cross-products summed with compensated summation —
 * the two-pass algorithm, free of the cancellation in Σxy − n·x̄ȳ.
 *
 * Cost: O(n·p²). Throws EngineError when fewer than two complete cases remain, and on ragged or
 * infinite input.
 *
 * @example listwiseCovariance([Float64Array.of(1, 2, 3, NaN), Float64Array.of(2, 4, 6, 1)]).covariance
 * // [[1, 2], [2, 4]]
 */
export function listwiseCovariance(columns: Columns): ListwiseMoments {
  const fn = 'covariance matrix';
  const { n: total, p } = checkColumns(columns, fn);
  const keep: number[] = [];
  for (let i = 0; i < total; i++) {
    let complete = true;
    for (let j = 0; j < p && complete; j++) complete = !Number.isNaN(columns[j][i]);
    if (complete) keep.push(i);
  }
  const n = keep.length;
  if (n < 2) throw new EngineError(`${fn} requires at least two rows (cases), got ${n}`);
  const centred: Float64Array[] = [];
  const means = new Float64Array(p);
  for (let j = 0; j < p; j++) {
    const column = new Float64Array(n);
    for (let i = 0; i < n; i++) column[i] = columns[j][keep[i]];
    means[j] = mean(column);
    for (let i = 0; i < n; i++) column[i] -= means[j];
    centred.push(column);
  }
  const scratch = new Float64Array(n);
  const covariance: number[][] = Array.from({ length: p }, () => new Array<number>(p).fill(0));
  for (let j = 0; j < p; j++) {
    for (let k = 0; k <= j; k++) {
      const x = centred[j];
      const y = centred[k];
      for (let i = 0; i < n; i++) scratch[i] = x[i] * y[i];
      const c = kahanSum(scratch) / (n - 1);
      covariance[j][k] = c;
      covariance[k][j] = c;
    }
  }
  return { n, rows: Int32Array.from(keep), means, covariance };
}

/**
 * Pairwise-deletion moments in one pass over the rows: for each row, the mask of present variables is
 * taken once and every present pair's running sums of the shifted values (x − x̄ⱼ, with x̄ⱼ the
 * column's mean over all its present cases), their squares and cross-products are updated together.
 * Shifting by a column mean keeps the one-pass sums free of cancellation; each pair's own means over
 * its shared cases are then exact corrections of these sums. Constancy on the shared cases is tracked
 * exactly (a variable that never differs from its first shared value), not by a tolerance.
 *
 * Cost: O(n·p²) time, O(p²) memory. Throws EngineError on ragged or infinite input.
 *
 * @example pairwiseMoments([Float64Array.of(1, 2, 3, 4), Float64Array.of(2, NaN, 3, 5)]).n // [[4, 3], [3, 3]]
 */
export function pairwiseMoments(columns: Columns): PairwiseMoments {
  const { n, p } = checkColumns(columns, 'pairwise correlation');
  const shift = new Float64Array(p);
  for (let j = 0; j < p; j++) {
    let s = 0;
    let c = 0;
    for (let i = 0; i < n; i++) {
      const v = columns[j][i];
      if (!Number.isNaN(v)) {
        s += v;
        c++;
      }
    }
    shift[j] = c > 0 ? s / c : 0;
  }
  const size = p * p;
  // Entry j·p + k (j ≤ k) holds the sums for the pair; sx sums variable j, sy variable k.
  const count = new Float64Array(size);
  const sx = new Float64Array(size);
  const sy = new Float64Array(size);
  const sxx = new Float64Array(size);
  const syy = new Float64Array(size);
  const sxy = new Float64Array(size);
  const firstX = new Float64Array(size);
  const firstY = new Float64Array(size);
  const variesX = new Uint8Array(size);
  const variesY = new Uint8Array(size);
  const present = new Int32Array(p);
  const value = new Float64Array(p);
  for (let i = 0; i < n; i++) {
    let q = 0;
    for (let j = 0; j < p; j++) {
      const v = columns[j][i];
      if (!Number.isNaN(v)) {
        present[q] = j;
        value[q] = v;
        q++;
      }
    }
    for (let a = 0; a < q; a++) {
      const j = present[a];
      const x = value[a];
      const dx = x - shift[j];
      const base = j * p;
      for (let b = a; b < q; b++) {
        const k = present[b];
        const y = value[b];
        const dy = y - shift[k];
        const at = base + k;
        if (count[at] === 0) {
          firstX[at] = x;
          firstY[at] = y;
        } else {
          if (x !== firstX[at]) variesX[at] = 1;
          if (y !== firstY[at]) variesY[at] = 1;
        }
        count[at]++;
        sx[at] += dx;
        sy[at] += dy;
        sxx[at] += dx * dx;
        syy[at] += dy * dy;
        sxy[at] += dx * dy;
      }
    }
  }
  const square = <T>(fill: T) => Array.from({ length: p }, () => new Array<T>(p).fill(fill));
  const counts = square(0);
  const covariance = square(Number.NaN);
  const correlation = square(Number.NaN);
  const constantOn = square(true);
  for (let j = 0; j < p; j++) {
    for (let k = j; k < p; k++) {
      const at = j * p + k;
      const c = count[at];
      counts[j][k] = c;
      counts[k][j] = c;
      constantOn[j][k] = variesX[at] === 0;
      constantOn[k][j] = variesY[at] === 0;
      if (c < 2) continue;
      const ssx = Math.max(0, sxx[at] - (sx[at] * sx[at]) / c);
      const ssy = Math.max(0, syy[at] - (sy[at] * sy[at]) / c);
      const cross = sxy[at] - (sx[at] * sy[at]) / c;
      const cov = cross / (c - 1);
      covariance[j][k] = cov;
      covariance[k][j] = cov;
      if (j === k) {
        if (variesX[at] === 1) correlation[j][j] = 1;
        continue;
      }
      if (variesX[at] === 1 && variesY[at] === 1 && ssx > 0 && ssy > 0) {
        const r = clampCorrelation(cross / Math.sqrt(ssx * ssy));
        correlation[j][k] = r;
        correlation[k][j] = r;
      }
    }
  }
  return { n: counts, covariance, correlation, constantOn };
}

/**
 * Pearson correlations rᵢⱼ = cᵢⱼ/√(cᵢᵢcⱼⱼ) from a covariance matrix, the diagonal exactly 1, entries
 * clamped to [−1, 1] against rounding; null for a variable without variance.
 *
 * Cost: O(p²). Throws nothing.
 *
 * @example correlationFromCovariance([[1, 2], [2, 4]]) // [[1, 1], [1, 1]]
 */
export function correlationFromCovariance(
  covariance: readonly (readonly number[])[],
  zeroVariance = 0,
): (number | null)[][] {
  const sd = covariance.map((row, i) => Math.sqrt(Math.max(0, row[i])));
  return covariance.map((row, i) =>
    row.map((c, j) => {
      if (!(sd[i] > zeroVariance) || !(sd[j] > zeroVariance)) return null;
      return i === j ? 1 : clampCorrelation(c / (sd[i] * sd[j]));
    }),
  );
}

/** A correlation clamped to [−1, 1] (rounding can carry |r| a few ulps past 1). */
export function clampCorrelation(r: number): number {
  return Math.max(-1, Math.min(1, r));
}

/**
 * Rows of values (null or undefined for missing) as columns with NaN for missing. Throws EngineError
 * naming row and column index of a ragged row or a non-finite value (NaN included: a missing value is
 * written as null, so a NaN is a computation gone wrong upstream).
 */
export function columnsFromRows(
  rows: readonly (readonly (number | null | undefined)[])[],
  fn: string,
): Float64Array[] {
  if (!Array.isArray(rows) || rows.length === 0)
    throw new EngineError(`${fn} requires at least one row`, 'shape');
  const p = Array.isArray(rows[0]) ? rows[0].length : 0;
  if (p === 0) throw new EngineError(`${fn} requires at least one column (variable)`, 'shape');
  const n = rows.length;
  const columns = Array.from({ length: p }, () => new Float64Array(n));
  for (let i = 0; i < n; i++) {
    const row = rows[i];
    if (!Array.isArray(row) || row.length !== p) {
      throw new EngineError(
        `${fn} requires every row to have ${p} values; row index ${i} has ${Array.isArray(row) ? row.length : 0}`,
        'shape',
      );
    }
    for (let j = 0; j < p; j++) {
      const v = row[j];
      if (v === null || v === undefined) {
        columns[j][i] = Number.NaN;
      } else if (!Number.isFinite(v)) {
        throw new EngineError(
          `${fn} requires finite numbers${fn === 'pairwise correlation' ? ' or null' : ''}; row index ${i}, column index ${j} is ${v}`,
          'non-finite',
        );
      } else {
        columns[j][i] = v;
      }
    }
  }
  return columns;
}
