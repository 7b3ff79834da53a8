import { EngineError } from './errors.ts';
import { asResident, type ResidentColumns } from './kernels/index.ts';
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

/** Checks the shape, and unless `finiteChecked` (the caller checks as it reads), that every value is finite. */
function checkColumns(columns: Columns, fn: string, finiteChecked = false): { n: number; p: number } {
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
  if (!finiteChecked) {
    for (let j = 0; j < p; j++) {
      const c = columns[j];
      for (let i = 0; i < n; i++) checkFinite(c[i], fn, i, j);
    }
  }
  return { n, p };
}

function checkFinite(v: number, fn: string, i: number, j: number): void {
  if (v === Number.POSITIVE_INFINITY || v === Number.NEGATIVE_INFINITY) {
    throw new EngineError(
      `${fn} requires finite numbers; row index ${i}, column index ${j} is ${v}`,
      'non-finite',
    );
  }
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

/** Rows per block of the pairwise pass: p such row pieces stay in cache while every pair is summed. */
const PAIRWISE_BLOCK_ROWS = 512;

/**
 * Pairwise-deletion moments from the missing masks: each value is shifted by its column's mean over
 * the column's present cases (x − x̄ⱼ, which keeps the sums below free of cancellation) and a missing
 * value counts as 0, so that the cross-products Σ dⱼdₖ over all rows are already sums over each pair's
 * shared cases. The per-pair sums Σ dⱼ and Σ dⱼ² over the cases shared with k, and the pair counts,
 * are the column totals less the rows where k is missing: a pass over the missing cells only. Each
 * pair's own means over its shared cases are then exact corrections of these sums. Constancy on the
 * shared cases is decided exactly (a variable that never differs from one value there), not by a
 * tolerance: from how often the column takes its first value, with a scan of the shared cases only
 * when the rows a pair loses could hold every case of all but one value.
 *
 * The rows are taken in blocks of PAIRWISE_BLOCK_ROWS so that the block's pieces of every column stay
 * in cache while every pair's products are summed.
 *
 * Cost: O(n·p²/2) multiply–adds for the cross-products, O(m·p) for m missing cells, O(p²) memory
 * beyond one block. Throws EngineError on ragged or infinite input.
 *
 * @example pairwiseMoments([Float64Array.of(1, 2, 3, 4), Float64Array.of(2, NaN, 3, 5)]).n // [[4, 3], [3, 3]]
 */
export function pairwiseMoments(given: Columns | ResidentColumns): PairwiseMoments {
  const fn = 'pairwise correlation';
  const columns = 'base' in given ? given.source : given;
  const { n, p } = checkColumns(columns, fn, true);
  const resident = asResident(given);
  // The block holds rows of P values (p rounded up to the kernel's eight lanes, the rest zero).
  const P = Math.ceil(p / 8) * 8;
  const B = PAIRWISE_BLOCK_ROWS;
  const { arena } = resident;
  const at = {
    cols: resident.base,
    scan: arena.f64(4),
    shift: arena.f64(p),
    // total[j]/squares[j]: Σ dⱼ and Σ dⱼ² over every present case of j. lostSum[j·p + k],
    // lostSquares[j·p + k]: the same over the cases where k is missing (and j present); bothMissing
    // counts the rows where both are missing. cross[j·P + k] (k ≤ j): Σ dⱼdₖ over the shared cases.
    total: arena.f64(p),
    squares: arena.f64(p),
    lostSum: arena.f64(p * p),
    lostSquares: arena.f64(p * p),
    bothMissing: arena.f64(p * p),
    cross: arena.f64(P * P),
    block: arena.f64(P * B),
    gap: arena.u8(P * B),
    // Block row and column of each missing cell of the block.
    missingAt: arena.i32(2 * p * B),
    layout: arena.i32(14),
  };
  const memory = arena.ready();
  const { scanColumn, pairwiseBlock } = arena.k;
  const scan = new Float64Array(memory, at.scan, 4);
  const shift = new Float64Array(memory, at.shift, p);
  const present = new Float64Array(p);
  const first = new Float64Array(p);
  const atFirst = new Float64Array(p);
  for (let j = 0; j < p; j++) {
    const infinite = scanColumn(at.cols + j * n * 8, n, at.scan);
    if (infinite >= 0) checkFinite(columns[j][infinite], fn, infinite, j);
    [shift[j], present[j], first[j], atFirst[j]] = scan;
  }
  // The pass's arrays, as fourteen 32-bit integers in the order the kernel reads them.
  new Int32Array(memory, at.layout, 14).set([
    at.cols,
    n,
    p,
    P,
    at.shift,
    at.total,
    at.squares,
    at.block,
    at.gap,
    at.missingAt,
    at.cross,
    at.lostSum,
    at.lostSquares,
    at.bothMissing,
  ]);
  for (let start = 0; start < n; start += B) pairwiseBlock(at.layout, start, Math.min(B, n - start));
  // Read where the kernel left them: nothing below lays out the kernels' memory again.
  const total = new Float64Array(memory, at.total, p);
  const squares = new Float64Array(memory, at.squares, p);
  const lostSum = new Float64Array(memory, at.lostSum, p * p);
  const lostSquares = new Float64Array(memory, at.lostSquares, p * p);
  const bothMissing = new Float64Array(memory, at.bothMissing, p * p);
  const cross = new Float64Array(memory, at.cross, P * P);
  const square = <T>(fill: T) => Array.from({ length: p }, () => new Array<T>(p).fill(fill));
  const counts = square(0);
  const covariance = square(Number.NaN);
  const correlation = square(Number.NaN);
  const constantOn = square(true);
  /** Whether variable j takes one value on the c cases it shares with k (see the comment above). */
  const constantOnShared = (j: number, k: number, c: number): boolean => {
    const same = atFirst[j];
    if (same === present[j]) return true;
    const lost = present[j] - c;
    if (lost < Math.min(same, present[j] - same)) return false;
    const x = columns[j];
    const y = columns[k];
    let seen = Number.NaN;
    for (let i = 0; i < n; i++) {
      const v = x[i];
      const w = y[i];
      if (Number.isNaN(v) || Number.isNaN(w)) continue;
      if (Number.isNaN(seen)) seen = v;
      else if (v !== seen) return false;
    }
    return true;
  };
  for (let j = 0; j < p; j++) {
    for (let k = 0; k <= j; k++) {
      const c = j === k ? present[j] : n - (n - present[j]) - (n - present[k]) + bothMissing[j * p + k];
      counts[j][k] = c;
      counts[k][j] = c;
      const jConstant = j === k ? atFirst[j] === present[j] : constantOnShared(j, k, c);
      const kConstant = j === k ? jConstant : constantOnShared(k, j, c);
      constantOn[j][k] = jConstant;
      constantOn[k][j] = kConstant;
      if (c < 2) continue;
      // Sums of j and of k over the shared cases, and their squares.
      const sx = total[j] - lostSum[j * p + k];
      const sy = total[k] - lostSum[k * p + j];
      const sxx = squares[j] - lostSquares[j * p + k];
      const syy = squares[k] - lostSquares[k * p + j];
      const ssx = Math.max(0, sxx - (sx * sx) / c);
      const ssy = Math.max(0, syy - (sy * sy) / c);
      const productSum = cross[j * P + k] - (sx * sy) / c;
      const cov = productSum / (c - 1);
      covariance[j][k] = cov;
      covariance[k][j] = cov;
      if (j === k) {
        if (!jConstant) correlation[j][j] = 1;
        continue;
      }
      if (!jConstant && !kConstant && ssx > 0 && ssy > 0) {
        const r = clampCorrelation(productSum / Math.sqrt(ssx * ssy));
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
