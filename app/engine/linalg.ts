import { EigenvalueDecomposition, Matrix, SingularValueDecomposition } from 'ml-matrix';
import { EngineError } from './errors.ts';
import { kahanSum, mean, PD_PIVOT_TOL, SINGULAR_RCOND, SYMMETRY_TOL } from './numeric.ts';

/** Default floor for eigenvalues when smoothing an indefinite correlation matrix. */
export const SMOOTHING_MIN_EIGEN = 1e-6;

/** Clip-and-rescale rounds allowed before smoothing gives up (one round suffices in practice). */
const MAX_SMOOTHING_ROUNDS = 10;

function checkRectangular(a: number[][], fn: string): { rows: number; cols: number } {
  if (!Array.isArray(a) || a.length === 0)
    throw new EngineError(`${fn} requires a non-empty matrix`, 'shape');
  const cols = Array.isArray(a[0]) ? a[0].length : 0;
  if (cols === 0) throw new EngineError(`${fn} requires a matrix with at least one column`, 'shape');
  for (let i = 0; i < a.length; i++) {
    const row = a[i];
    if (!Array.isArray(row) || row.length !== cols) {
      throw new EngineError(
        `${fn} requires rows of equal length; row ${i} has ${Array.isArray(row) ? row.length : 0} entries, row 0 has ${cols}`,
        'shape',
      );
    }
    for (let j = 0; j < cols; j++) {
      if (!Number.isFinite(row[j])) {
        throw new EngineError(`${fn} requires finite entries; entry [${i}][${j}] is ${row[j]}`, 'non-finite');
      }
    }
  }
  return { rows: a.length, cols };
}

function checkSquare(a: number[][], fn: string): number {
  const { rows, cols } = checkRectangular(a, fn);
  if (rows !== cols) throw new EngineError(`${fn} requires a square matrix, got ${rows}×${cols}`, 'shape');
  return rows;
}

function isSymmetric(a: number[][]): boolean {
  const n = a.length;
  let scale = 1;
  for (let i = 0; i < n; i++) for (let j = 0; j < n; j++) scale = Math.max(scale, Math.abs(a[i][j]));
  for (let i = 0; i < n; i++) {
    for (let j = 0; j < i; j++) {
      if (Math.abs(a[i][j] - a[j][i]) > SYMMETRY_TOL * scale) return false;
    }
  }
  return true;
}

function checkSymmetric(a: number[][], fn: string): number {
  const n = checkSquare(a, fn);
  if (!isSymmetric(a)) throw new EngineError(`matrix is not symmetric (${fn})`, 'not-symmetric');
  return n;
}

/**
 * Symmetric eigendecomposition A = V·diag(λ)·Vᵀ.
 *
 * Source: Householder tridiagonalisation followed by the implicit QL algorithm (Bowdler, Martin,
 * Reinsch & Wilkinson 1968, the tred2/tql2 procedures of the Handbook for Automatic Computation, as
 * implemented in ml-matrix). Eigenvalues are returned in descending order; vectors[i][j] is
 * component i of the eigenvector for values[j] (eigenvectors are columns), each with unit length and
 * signed so that its component of largest magnitude is positive (the first such on ties).
 *
 * Cost: O(n³). Throws EngineError "matrix is not symmetric" and on non-square or non-finite input.
 *
 * @example symmetricEigen([[2, 1], [1, 2]]).values // [3, 1]
 */
export function symmetricEigen(a: number[][]): { values: number[]; vectors: number[][] } {
  const n = checkSymmetric(a, 'eigendecomposition');
  const evd = new EigenvalueDecomposition(new Matrix(a), { assumeSymmetric: true });
  const raw = evd.realEigenvalues;
  const v = evd.eigenvectorMatrix;
  const order = raw.map((_, i) => i).sort((i, j) => raw[j] - raw[i]);
  const values = order.map((i) => raw[i]);
  const vectors: number[][] = Array.from({ length: n }, () => new Array<number>(n).fill(0));
  for (let col = 0; col < n; col++) {
    const src = order[col];
    let pivot = 0;
    for (let i = 1; i < n; i++) if (Math.abs(v.get(i, src)) > Math.abs(v.get(pivot, src))) pivot = i;
    const sign = v.get(pivot, src) < 0 ? -1 : 1;
    for (let i = 0; i < n; i++) vectors[i][col] = sign * v.get(i, src);
  }
  return { values, vectors };
}

function oneNorm(a: ArrayLike<ArrayLike<number>>, n: number): number {
  let best = 0;
  for (let j = 0; j < n; j++) {
    let s = 0;
    for (let i = 0; i < n; i++) s += Math.abs(a[i][j]);
    best = Math.max(best, s);
  }
  return best;
}

/**
 * Matrix inverse by LU decomposition with partial pivoting (Golub & Van Loan 2013, Matrix
 * Computations, 4th ed., §3.4), solving A·X = I column by column.
 *
 * A matrix is declared singular when a pivot is zero or its reciprocal 1-norm condition number
 * 1/(‖A‖₁‖A⁻¹‖₁) is below SINGULAR_RCOND, i.e. when the inverse would carry almost no correct digits.
 *
 * Cost: O(n³). Throws EngineError "matrix is singular" and on non-square or non-finite input.
 *
 * @example inverse([[4, 7], [2, 6]]) // [[0.6, -0.7], [-0.2, 0.4]]
 */
export function inverse(a: number[][]): number[][] {
  const n = checkSquare(a, 'inverse');
  const lu = a.map((row) => Float64Array.from(row));
  const perm = Array.from({ length: n }, (_, i) => i);
  for (let k = 0; k < n; k++) {
    let p = k;
    for (let i = k + 1; i < n; i++) if (Math.abs(lu[i][k]) > Math.abs(lu[p][k])) p = i;
    if (lu[p][k] === 0) throw new EngineError('matrix is singular (a pivot is exactly zero)', 'singular');
    if (p !== k) {
      [lu[p], lu[k]] = [lu[k], lu[p]];
      [perm[p], perm[k]] = [perm[k], perm[p]];
    }
    const pivotRow = lu[k];
    const pivot = pivotRow[k];
    for (let i = k + 1; i < n; i++) {
      const row = lu[i];
      const factor = row[k] / pivot;
      row[k] = factor;
      if (factor !== 0) for (let j = k + 1; j < n; j++) row[j] -= factor * pivotRow[j];
    }
  }
  const inv: number[][] = Array.from({ length: n }, () => new Array<number>(n).fill(0));
  const col = new Float64Array(n);
  for (let c = 0; c < n; c++) {
    for (let i = 0; i < n; i++) col[i] = perm[i] === c ? 1 : 0;
    for (let i = 0; i < n; i++) {
      let s = col[i];
      const row = lu[i];
      for (let j = 0; j < i; j++) s -= row[j] * col[j];
      col[i] = s;
    }
    for (let i = n - 1; i >= 0; i--) {
      let s = col[i];
      const row = lu[i];
      for (let j = i + 1; j < n; j++) s -= row[j] * col[j];
      col[i] = s / row[i];
    }
    for (let i = 0; i < n; i++) inv[i][c] = col[i];
  }
  const rcond = 1 / (oneNorm(a, n) * oneNorm(inv, n));
  if (!(rcond >= SINGULAR_RCOND)) {
    throw new EngineError(
      `matrix is singular (reciprocal condition number ${rcond.toExponential(2)})`,
      'singular',
    );
  }
  return inv;
}

/**
 * Cholesky factor L (lower triangular, A = L·Lᵀ) by the Cholesky–Banachiewicz recurrence (Golub &
 * Van Loan 2013, §4.2). A pivot at or below PD_PIVOT_TOL times its diagonal entry counts as failure.
 *
 * Cost: O(n³/3). Throws EngineError "matrix is not positive definite", "matrix is not symmetric", and
 * on non-square or non-finite input.
 *
 * @example cholesky([[4, 2], [2, 3]]) // [[2, 0], [1, 1.4142135623730951]]
 */
export function cholesky(a: number[][]): number[][] {
  const n = checkSymmetric(a, 'Cholesky factorisation');
  const factor = choleskyOrNull(a, n);
  if (factor === null) throw new EngineError('matrix is not positive definite', 'not-positive-definite');
  return factor;
}

function choleskyOrNull(a: number[][], n: number): number[][] | null {
  const l: number[][] = Array.from({ length: n }, () => new Array<number>(n).fill(0));
  for (let i = 0; i < n; i++) {
    const li = l[i];
    for (let j = 0; j <= i; j++) {
      const lj = l[j];
      let s = a[i][j];
      for (let k = 0; k < j; k++) s -= li[k] * lj[k];
      if (i === j) {
        if (!(s > PD_PIVOT_TOL * a[i][i])) return null;
        li[i] = Math.sqrt(s);
      } else {
        li[j] = s / lj[j];
      }
    }
  }
  return l;
}

/**
 * Natural log of the determinant of a symmetric positive-definite matrix, 2·Σ ln Lᵢᵢ from its Cholesky
 * factor (no overflow for large matrices).
 *
 * Cost: O(n³/3). Throws EngineError "matrix is not positive definite" or "matrix is not symmetric".
 *
 * @example logDeterminant([[2, 0], [0, 3]]) // ln 6
 */
export function logDeterminant(a: number[][]): number {
  const l = cholesky(a);
  return 2 * kahanSum(l.map((row, i) => Math.log(row[i])));
}

/**
 * Whether a matrix is symmetric and numerically positive definite (its Cholesky factorisation
 * succeeds with every pivot above PD_PIVOT_TOL of its diagonal entry). A non-symmetric matrix gives
 * false.
 *
 * Cost: O(n³/3). Throws EngineError only on non-square or non-finite input.
 *
 * @example isPositiveDefinite([[1, 0.5], [0.5, 1]]) // true
 */
export function isPositiveDefinite(a: number[][]): boolean {
  const n = checkSquare(a, 'positive-definiteness check');
  if (!isSymmetric(a)) return false;
  return choleskyOrNull(a, n) !== null;
}

/**
 * 2-norm condition number: max|λ|/min|λ| for a symmetric matrix (from symmetricEigen), otherwise the
 * ratio of the largest to the smallest singular value (Golub–Kahan–Reinsch SVD via ml-matrix).
 * Returns Infinity for a singular matrix.
 *
 * Cost: O(n³). Throws EngineError on non-square or non-finite input.
 *
 * @example conditionNumber([[2, 0], [0, 0.5]]) // 4
 */
export function conditionNumber(a: number[][]): number {
  checkSquare(a, 'condition number');
  let largest: number;
  let smallest: number;
  if (isSymmetric(a)) {
    const magnitudes = symmetricEigen(a).values.map(Math.abs);
    largest = Math.max(...magnitudes);
    smallest = Math.min(...magnitudes);
  } else {
    const singular = new SingularValueDecomposition(new Matrix(a)).diagonal;
    largest = Math.max(...singular);
    smallest = Math.min(...singular);
  }
  return smallest === 0 ? Number.POSITIVE_INFINITY : largest / smallest;
}

function checkData(data: number[][], fn: string): { rows: number; cols: number } {
  if (!Array.isArray(data) || data.length < 2) {
    throw new EngineError(
      `${fn} requires at least two rows (cases), got ${Array.isArray(data) ? data.length : 0}`,
    );
  }
  const cols = Array.isArray(data[0]) ? data[0].length : 0;
  if (cols === 0) throw new EngineError(`${fn} requires at least one column (variable)`, 'shape');
  for (let i = 0; i < data.length; i++) {
    const row = data[i];
    if (!Array.isArray(row) || row.length !== cols) {
      throw new EngineError(
        `${fn} requires every row to have ${cols} values; row index ${i} has ${Array.isArray(row) ? row.length : 0}`,
        'shape',
      );
    }
    for (let j = 0; j < cols; j++) {
      if (!Number.isFinite(row[j])) {
        throw new EngineError(
          `${fn} requires finite numbers; row index ${i}, column index ${j} is ${row[j]}`,
          'non-finite',
        );
      }
    }
  }
  return { rows: data.length, cols };
}

function centeredColumns(data: number[][], rows: number, cols: number): Float64Array[] {
  const out: Float64Array[] = [];
  for (let j = 0; j < cols; j++) {
    const column = new Float64Array(rows);
    for (let i = 0; i < rows; i++) column[i] = data[i][j];
    const m = mean(column);
    for (let i = 0; i < rows; i++) column[i] -= m;
    out.push(column);
  }
  return out;
}

function centeredCrossProduct(x: Float64Array, y: Float64Array, scratch: Float64Array): number {
  for (let i = 0; i < x.length; i++) scratch[i] = x[i] * y[i];
  return kahanSum(scratch.subarray(0, x.length));
}

/**
 * Indices of columns whose values are all identical (zero variance), so callers can name the items
 * before asking for a correlation matrix. Data as in covarianceMatrix.
 *
 * Cost: O(n·p). Throws EngineError on ragged or non-finite data.
 *
 * @example constantColumns([[1, 2], [1, 3]]) // [0]
 */
export function constantColumns(data: number[][]): number[] {
  const { rows, cols } = checkData(data, 'constant-column check');
  const out: number[] = [];
  for (let j = 0; j < cols; j++) {
    let constant = true;
    for (let i = 1; i < rows && constant; i++) constant = data[i][j] === data[0][j];
    if (constant) out.push(j);
  }
  return out;
}

/**
 * Sample covariance matrix with divisor n − 1 (rows are cases, columns are variables), by centring
 * each column on its (refined, compensated) mean and summing cross-products with compensated
 * summation — the two-pass algorithm, which avoids the cancellation of Σxy − n·x̄ȳ.
 *
 * Cost: O(n·p²). Throws EngineError with fewer than two rows, on ragged rows or non-finite values
 * (naming row and column index).
 *
 * @example covarianceMatrix([[1, 2], [2, 4], [3, 6]]) // [[1, 2], [2, 4]]
 */
export function covarianceMatrix(data: number[][]): number[][] {
  const { rows, cols } = checkData(data, 'covariance matrix');
  const centered = centeredColumns(data, rows, cols);
  const scratch = new Float64Array(rows);
  const out: number[][] = Array.from({ length: cols }, () => new Array<number>(cols).fill(0));
  for (let j = 0; j < cols; j++) {
    for (let k = 0; k <= j; k++) {
      const c = centeredCrossProduct(centered[j], centered[k], scratch) / (rows - 1);
      out[j][k] = c;
      out[k][j] = c;
    }
  }
  return out;
}

function clampCorrelation(r: number): number {
  return Math.max(-1, Math.min(1, r));
}

/**
 * Pearson (1896) product-moment correlation matrix of complete data (rows are cases, columns are
 * variables), from the two-pass covariance matrix; the diagonal is exactly 1 and entries are clamped
 * to [−1, 1] against rounding.
 *
 * Cost: O(n·p²). Throws EngineError naming the column index of a column with zero variance, and on the
 * inputs covarianceMatrix rejects.
 *
 * @example correlationMatrix([[1, 2], [2, 1], [3, 3]]) // [[1, 0.5], [0.5, 1]]
 */
export function correlationMatrix(data: number[][]): number[][] {
  const fn = 'correlation matrix';
  const { rows, cols } = checkData(data, fn);
  const constant = constantColumns(data);
  if (constant.length > 0) {
    throw new EngineError(
      `${fn} requires variation in every column; column index ${constant[0]} has the same value in every row`,
      'zero-variance',
    );
  }
  const centered = centeredColumns(data, rows, cols);
  const scratch = new Float64Array(rows);
  const ss = centered.map((c) => centeredCrossProduct(c, c, scratch));
  const out: number[][] = Array.from({ length: cols }, () => new Array<number>(cols).fill(0));
  for (let j = 0; j < cols; j++) {
    out[j][j] = 1;
    for (let k = 0; k < j; k++) {
      const r = clampCorrelation(
        centeredCrossProduct(centered[j], centered[k], scratch) / Math.sqrt(ss[j] * ss[k]),
      );
      out[j][k] = r;
      out[k][j] = r;
    }
  }
  return out;
}

/**
 * Pearson correlations from pairwise-complete cases: each r[j][k] uses the rows where both columns
 * hold a value (null means missing), with means taken over those same rows; n[j][k] counts them and
 * n[j][j] counts the values present in column j. The matrix need not be positive definite — see
 * smoothToPositiveDefinite.
 *
 * Cost: O(n·p²). Throws EngineError naming the column indices when a column has fewer than two values
 * or no variance, when a pair shares fewer than two cases or one column is constant on the shared
 * cases, and naming row and column index for a non-finite value.
 *
 * @example pairwiseCorrelation([[1, 2], [2, null], [3, 3], [4, 5]]).n // [[4, 3], [3, 3]]
 */
export function pairwiseCorrelation(data: (number | null)[][]): { r: number[][]; n: number[][] } {
  const fn = 'pairwise correlation';
  if (!Array.isArray(data) || data.length === 0)
    throw new EngineError(`${fn} requires at least one row`, 'shape');
  const cols = Array.isArray(data[0]) ? data[0].length : 0;
  if (cols === 0) throw new EngineError(`${fn} requires at least one column`, 'shape');
  const rows = data.length;
  const present: Uint8Array[] = Array.from({ length: cols }, () => new Uint8Array(rows));
  const values: Float64Array[] = Array.from({ length: cols }, () => new Float64Array(rows));
  for (let i = 0; i < rows; i++) {
    const row = data[i];
    if (!Array.isArray(row) || row.length !== cols) {
      throw new EngineError(
        `${fn} requires every row to have ${cols} values; row index ${i} has ${Array.isArray(row) ? row.length : 0}`,
        'shape',
      );
    }
    for (let j = 0; j < cols; j++) {
      const v = row[j];
      if (v === null || v === undefined) continue;
      if (!Number.isFinite(v)) {
        throw new EngineError(
          `${fn} requires finite numbers or null; row index ${i}, column index ${j} is ${v}`,
        );
      }
      present[j][i] = 1;
      values[j][i] = v;
    }
  }
  const r: number[][] = Array.from({ length: cols }, () => new Array<number>(cols).fill(0));
  const n: number[][] = Array.from({ length: cols }, () => new Array<number>(cols).fill(0));
  for (let j = 0; j < cols; j++) {
    const idx = indicesWhere(present[j], present[j]);
    const observed = Array.from(idx, (i) => values[j][i]);
    if (observed.length < 2) {
      throw new EngineError(
        `${fn} requires at least two values in column index ${j}, found ${observed.length}`,
      );
    }
    if (observed.every((v) => v === observed[0])) {
      throw new EngineError(
        `${fn} requires variation in every column; column index ${j} is constant`,
        'zero-variance',
      );
    }
    r[j][j] = 1;
    n[j][j] = observed.length;
  }
  for (let j = 0; j < cols; j++) {
    for (let k = 0; k < j; k++) {
      const idx = indicesWhere(present[j], present[k]);
      const count = idx.length;
      if (count < 2) {
        throw new EngineError(
          `${fn} requires at least two cases with both column index ${k} and column index ${j} present, found ${count}`,
        );
      }
      const x = Float64Array.from(idx, (i) => values[j][i]);
      const y = Float64Array.from(idx, (i) => values[k][i]);
      const mx = mean(x);
      const my = mean(y);
      for (let i = 0; i < count; i++) {
        x[i] -= mx;
        y[i] -= my;
      }
      const scratch = new Float64Array(count);
      const sxx = centeredCrossProduct(x, x, scratch);
      const syy = centeredCrossProduct(y, y, scratch);
      if (sxx === 0 || syy === 0) {
        const flat = sxx === 0 ? j : k;
        const other = sxx === 0 ? k : j;
        throw new EngineError(
          `${fn} requires variation on shared cases; column index ${flat} is constant on the ${count} cases where column index ${other} is present`,
          'zero-variance',
        );
      }
      const value = clampCorrelation(centeredCrossProduct(x, y, scratch) / Math.sqrt(sxx * syy));
      r[j][k] = value;
      r[k][j] = value;
      n[j][k] = count;
      n[k][j] = count;
    }
  }
  return { r, n };
}

function indicesWhere(a: Uint8Array, b: Uint8Array): number[] {
  const out: number[] = [];
  for (let i = 0; i < a.length; i++) if (a[i] === 1 && b[i] === 1) out.push(i);
  return out;
}

/**
 * Smooth an indefinite (or nearly singular) symmetric matrix, typically a pairwise or polychoric
 * correlation matrix, into a positive-definite one by eigenvalue clipping: R = V·diag(λ)·Vᵀ is rebuilt
 * with every λ below minEigen raised to minEigen, then rescaled, D^{-1/2}·R̃·D^{-1/2} with D the ratio
 * of the new to the original diagonal, so the diagonal is the input's (unit for a correlation matrix).
 * The round is repeated in the rare case that rescaling leaves a pivot too small.
 *
 * Source: the eigenvalue method described by Wothke, W. (1993). Nonpositive definite matrices in
 * structural modeling. In Bollen & Long (Eds.), Testing Structural Equation Models, 256–293 (from
 * memory); also Bock, Gibbons & Muraki (1988, Applied Psychological Measurement 12, 261–280).
 *
 * Cost: O(p³) per round. Returns a copy with smoothed = false when the smallest eigenvalue already
 * reaches minEigen. Throws EngineError "matrix is not symmetric", when a diagonal entry is not
 * positive, when minEigen is not a positive number, or if smoothing fails to reach positive
 * definiteness.
 *
 * @example smoothToPositiveDefinite([[1, 0.9, 0.1], [0.9, 1, 0.9], [0.1, 0.9, 1]]).smoothed // true
 */
export function smoothToPositiveDefinite(
  r: number[][],
  minEigen: number = SMOOTHING_MIN_EIGEN,
): { matrix: number[][]; smoothed: boolean } {
  const fn = 'smoothing to positive definite';
  const p = checkSymmetric(r, fn);
  if (!(minEigen > 0) || !Number.isFinite(minEigen)) {
    throw new EngineError(`${fn} requires a minimum eigenvalue > 0, got ${minEigen}`);
  }
  for (let i = 0; i < p; i++) {
    if (!(r[i][i] > 0))
      throw new EngineError(`${fn} requires positive diagonal entries; entry [${i}][${i}] is ${r[i][i]}`);
  }
  const target = r.map((_, i) => r[i][i]);
  let current = r.map((row) => row.slice());
  if (symmetricEigen(current).values[p - 1] >= minEigen && isPositiveDefinite(current)) {
    return { matrix: current, smoothed: false };
  }
  for (let round = 0; round < MAX_SMOOTHING_ROUNDS; round++) {
    const { values, vectors } = symmetricEigen(current);
    const clipped = values.map((v) => Math.max(v, minEigen));
    const rebuilt: number[][] = Array.from({ length: p }, () => new Array<number>(p).fill(0));
    for (let i = 0; i < p; i++) {
      for (let j = 0; j <= i; j++) {
        let s = 0;
        for (let k = 0; k < p; k++) s += vectors[i][k] * clipped[k] * vectors[j][k];
        rebuilt[i][j] = s;
        rebuilt[j][i] = s;
      }
    }
    const scale = rebuilt.map((row, i) => Math.sqrt(target[i] / row[i]));
    for (let i = 0; i < p; i++) {
      for (let j = 0; j < p; j++) rebuilt[i][j] *= scale[i] * scale[j];
      rebuilt[i][i] = target[i];
    }
    current = rebuilt;
    if (isPositiveDefinite(current)) return { matrix: current, smoothed: true };
  }
  throw new EngineError(`${fn} did not reach a positive-definite matrix in ${MAX_SMOOTHING_ROUNDS} rounds`);
}

/**
 * Matrix product A·B. The loops run i–k–j so the inner loop walks rows of B and of the result
 * contiguously (row-major arrays), which is several times faster than the textbook i–j–k order.
 *
 * Cost: O(n·m·p). Throws EngineError when the inner dimensions differ, or on ragged or non-finite input.
 *
 * @example matMul([[1, 2]], [[3], [4]]) // [[11]]
 */
export function matMul(a: number[][], b: number[][]): number[][] {
  const sa = checkRectangular(a, 'matrix product');
  const sb = checkRectangular(b, 'matrix product');
  if (sa.cols !== sb.rows) {
    throw new EngineError(
      `matrix product requires matching inner dimensions, got ${sa.rows}×${sa.cols} times ${sb.rows}×${sb.cols}`,
      'shape',
    );
  }
  const out: number[][] = Array.from({ length: sa.rows }, () => new Array<number>(sb.cols).fill(0));
  for (let i = 0; i < sa.rows; i++) {
    const ai = a[i];
    const oi = out[i];
    for (let k = 0; k < sa.cols; k++) {
      const aik = ai[k];
      if (aik === 0) continue;
      const bk = b[k];
      for (let j = 0; j < sb.cols; j++) oi[j] += aik * bk[j];
    }
  }
  return out;
}

/**
 * Transpose of a rectangular matrix.
 *
 * Cost: O(n·m). Throws EngineError on ragged or non-finite input.
 *
 * @example transpose([[1, 2, 3]]) // [[1], [2], [3]]
 */
export function transpose(a: number[][]): number[][] {
  const { rows, cols } = checkRectangular(a, 'transpose');
  const out: number[][] = Array.from({ length: cols }, () => new Array<number>(rows).fill(0));
  for (let i = 0; i < rows; i++) for (let j = 0; j < cols; j++) out[j][i] = a[i][j];
  return out;
}
