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

/** Rows per block of the pairwise pass: p such column pieces stay in cache while every pair is summed. */
const PAIRWISE_BLOCK_ROWS = 512;

/**
 * Adds to cross[j·p + k] (k ≤ j) the sum over r < rows of block[j·B + r]·block[k·B + r]: the
 * cross-products of one block of rows. Two columns j against four columns k at a time, so that each
 * loaded value serves several products (six loads for eight multiply–adds); every pair's terms are still
 * summed in row order into a sum of their own, so the result does not depend on the blocking.
 * Cost O(rows·p²/2).
 */
function blockCrossProducts(
  block: Float64Array,
  B: number,
  rows: number,
  p: number,
  cross: Float64Array,
): void {
  const single = (j: number, k: number) => {
    const a = j * B;
    const b = k * B;
    let s = 0;
    for (let r = 0; r < rows; r++) s += block[a + r] * block[b + r];
    cross[j * p + k] += s;
  };
  let j = 0;
  for (; j + 1 < p; j += 2) {
    const a0 = j * B;
    const a1 = a0 + B;
    const base0 = j * p;
    const base1 = base0 + p;
    let k = 0;
    for (; k + 3 <= j; k += 4) {
      const b0 = k * B;
      const b1 = b0 + B;
      const b2 = b1 + B;
      const b3 = b2 + B;
      let s00 = 0;
      let s01 = 0;
      let s02 = 0;
      let s03 = 0;
      let s10 = 0;
      let s11 = 0;
      let s12 = 0;
      let s13 = 0;
      for (let r = 0; r < rows; r++) {
        const x0 = block[a0 + r];
        const x1 = block[a1 + r];
        const y0 = block[b0 + r];
        const y1 = block[b1 + r];
        const y2 = block[b2 + r];
        const y3 = block[b3 + r];
        s00 += x0 * y0;
        s01 += x0 * y1;
        s02 += x0 * y2;
        s03 += x0 * y3;
        s10 += x1 * y0;
        s11 += x1 * y1;
        s12 += x1 * y2;
        s13 += x1 * y3;
      }
      cross[base0 + k] += s00;
      cross[base0 + k + 1] += s01;
      cross[base0 + k + 2] += s02;
      cross[base0 + k + 3] += s03;
      cross[base1 + k] += s10;
      cross[base1 + k + 1] += s11;
      cross[base1 + k + 2] += s12;
      cross[base1 + k + 3] += s13;
    }
    for (; k <= j; k++) {
      single(j, k);
      single(j + 1, k);
    }
    single(j + 1, j + 1);
  }
  if (j < p) for (let k = 0; k <= j; k++) single(j, k);
}

/**
 * The first pass of pairwiseMoments over one column: its present count, the mean of its present
 * values (the shift), its first present value and how often that value occurs; checks finiteness.
 * A function of its own so that the engine compiles it once for every column. Cost O(n).
 */
function scanColumn(
  column: Float64Array,
  j: number,
  fn: string,
  shift: Float64Array,
  present: Float64Array,
  first: Float64Array,
  atFirst: Float64Array,
): void {
  const n = column.length;
  let s = 0;
  let c = 0;
  let f = Number.NaN;
  let same = 0;
  for (let i = 0; i < n; i++) {
    const v = column[i];
    if (!Number.isNaN(v)) {
      if (v - v !== 0) checkFinite(v, fn, i, j);
      if (c === 0) f = v;
      if (v === f) same++;
      s += v;
      c++;
    }
  }
  shift[j] = c > 0 ? s / c : 0;
  present[j] = c;
  first[j] = f;
  atFirst[j] = same;
}

/**
 * Copies rows [start, start + rows) of column j into its piece of the block, shifted (a missing value
 * as 0, marked in `gap` and listed in `missingAt`), and adds the piece's Σ d and Σ d² to the column's
 * totals. Returns the block's count of missing cells so far. Cost O(rows).
 */
function fillBlock(
  column: Float64Array,
  j: number,
  start: number,
  rows: number,
  B: number,
  shift: Float64Array,
  total: Float64Array,
  squares: Float64Array,
  block: Float64Array,
  gap: Uint8Array,
  missingAt: Int32Array,
  missingSoFar: number,
): number {
  const s = shift[j];
  const offset = j * B;
  let missing = missingSoFar;
  let t = 0;
  let q = 0;
  for (let r = 0; r < rows; r++) {
    const v = column[start + r];
    if (!Number.isNaN(v)) {
      const d = v - s;
      block[offset + r] = d;
      gap[offset + r] = 0;
      t += d;
      q += d * d;
    } else {
      block[offset + r] = 0;
      gap[offset + r] = 1;
      missingAt[2 * missing] = r;
      missingAt[2 * missing + 1] = j;
      missing++;
    }
  }
  total[j] += t;
  squares[j] += q;
  return missing;
}

/**
 * For each missing cell (row r, column k) of the block: every other column's value in that row is
 * not shared with k, so it goes to lostSum and lostSquares at (j, k), or, missing too, to bothMissing.
 * Cost O(missing · p).
 */
function correctForMissing(
  missingAt: Int32Array,
  missing: number,
  block: Float64Array,
  gap: Uint8Array,
  B: number,
  p: number,
  lostSum: Float64Array,
  lostSquares: Float64Array,
  bothMissing: Float64Array,
): void {
  for (let m = 0; m < missing; m++) {
    const r = missingAt[2 * m];
    const k = missingAt[2 * m + 1];
    for (let j = 0; j < p; j++) {
      const at = j * p + k;
      if (gap[j * B + r] === 1) {
        bothMissing[at]++;
      } else {
        const d = block[j * B + r];
        lostSum[at] += d;
        lostSquares[at] += d * d;
      }
    }
  }
}

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
export function pairwiseMoments(columns: Columns): PairwiseMoments {
  const fn = 'pairwise correlation';
  const { n, p } = checkColumns(columns, fn, true);
  const shift = new Float64Array(p);
  const present = new Float64Array(p);
  const first = new Float64Array(p);
  const atFirst = new Float64Array(p);
  for (let j = 0; j < p; j++) scanColumn(columns[j], j, fn, shift, present, first, atFirst);
  const size = p * p;
  // total[j]/squares[j]: Σ dⱼ and Σ dⱼ² over every present case of j. lostSum[j·p + k],
  // lostSquares[j·p + k]: the same over the cases where k is missing (and j present); bothMissing
  // counts the rows where both are missing. cross[j·p + k] (k ≤ j): Σ dⱼdₖ over the shared cases.
  const total = new Float64Array(p);
  const squares = new Float64Array(p);
  const lostSum = new Float64Array(size);
  const lostSquares = new Float64Array(size);
  const bothMissing = new Float64Array(size);
  const cross = new Float64Array(size);
  const B = PAIRWISE_BLOCK_ROWS;
  const block = new Float64Array(p * B);
  const gap = new Uint8Array(p * B);
  // missingAt[2m], missingAt[2m + 1]: block row and column of the block's m-th missing cell.
  const missingAt = new Int32Array(2 * p * B);
  for (let start = 0; start < n; start += B) {
    const rows = Math.min(B, n - start);
    let missing = 0;
    for (let j = 0; j < p; j++) {
      missing = fillBlock(
        columns[j],
        j,
        start,
        rows,
        B,
        shift,
        total,
        squares,
        block,
        gap,
        missingAt,
        missing,
      );
    }
    blockCrossProducts(block, B, rows, p, cross);
    correctForMissing(missingAt, missing, block, gap, B, p, lostSum, lostSquares, bothMissing);
  }
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
      const productSum = cross[j * p + k] - (sx * sy) / c;
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
