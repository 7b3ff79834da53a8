import { EngineError } from './errors.ts';
import { type LuFactors, luFactor, luSingular, luSolve } from './lu.ts';
import { tridiagonalQl } from './symmetric-eigen.ts';
import {
  columnsFromRows,
  correlationFromCovariance,
  listwiseCovariance,
  pairwiseMoments,
} from './covariance.ts';
import { SINGULAR_RCOND, SYMMETRY_TOL } from './numeric.ts';

export function checkRectangular(a: number[][], fn: string): { rows: number; cols: number } {
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

export function checkSquare(a: number[][], fn: string): number {
  const { rows, cols } = checkRectangular(a, fn);
  if (rows !== cols) throw new EngineError(`${fn} requires a square matrix, got ${rows}×${cols}`, 'shape');
  return rows;
}

export function isSymmetric(a: number[][]): boolean {
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

export function checkSymmetric(a: number[][], fn: string): number {
  const n = checkSquare(a, fn);
  if (!isSymmetric(a)) throw new EngineError(`matrix is not symmetric (${fn})`, 'not-symmetric');
  return n;
}

/**
 * Symmetric eigendecomposition A = V·diag(λ)·Vᵀ.
 *
 * Source: Householder tridiagonalisation followed by the implicit QL algorithm (Bowdler, Martin,
 * Reinsch & Wilkinson 1968, the tred2/tql2 procedures of the Handbook for Automatic Computation, in
 * the arithmetic order of ml-matrix's decomposition: see tridiagonalQl). Eigenvalues are returned in descending order; vectors[i][j] is
 * component i of the eigenvector for values[j] (eigenvectors are columns), each with unit length and
 * signed so that its component of largest magnitude is positive (the first such on ties).
 *
 * Cost: O(n³). Throws EngineError "matrix is not symmetric" and on non-square or non-finite input.
 *
 * @example symmetricEigen([[2, 1], [1, 2]]).values // [3, 1]
 */
export function symmetricEigen(a: number[][]): { values: number[]; vectors: number[][] } {
  const n = checkSymmetric(a, 'eigendecomposition');
  const flat = new Float64Array(n * n);
  for (let i = 0; i < n; i++) for (let j = 0; j < n; j++) flat[i * n + j] = a[i][j];
  const { values: raw, vectors: rows } = tridiagonalQl(flat, n);
  const order = Array.from(raw, (_, i) => i).sort((i, j) => raw[j] - raw[i]);
  const values = order.map((i) => raw[i]);
  const vectors: number[][] = Array.from({ length: n }, () => new Array<number>(n).fill(0));
  for (let col = 0; col < n; col++) {
    // Row `src` of `rows` is the eigenvector of raw[src].
    const at = order[col] * n;
    let pivot = 0;
    for (let i = 1; i < n; i++) if (Math.abs(rows[at + i]) > Math.abs(rows[at + pivot])) pivot = i;
    const sign = rows[at + pivot] < 0 ? -1 : 1;
    for (let i = 0; i < n; i++) vectors[i][col] = sign * rows[at + i];
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
 * LU factors with partial pivoting (luFactor: the Doolittle/Crout form of Golub & Van Loan 2013,
 * §3.4, in ml-matrix's arithmetic order), checked: an exactly zero pivot, or a reciprocal 1-norm
 * condition number 1/(‖A‖₁‖A⁻¹‖₁) below SINGULAR_RCOND (an answer with almost no correct digits), is
 * "matrix is singular". Returns the factors and A⁻¹ (needed for the condition number anyway).
 */
function checkedLu(a: number[][], fn: string): { lu: LuFactors; inv: number[][] } {
  const n = checkSquare(a, fn);
  const flat = new Float64Array(n * n);
  for (let i = 0; i < n; i++) for (let j = 0; j < n; j++) flat[i * n + j] = a[i][j];
  const lu = luFactor(flat, n);
  if (luSingular(lu)) throw new EngineError('matrix is singular (a pivot is exactly zero)', 'singular');
  const eye = new Float64Array(n * n);
  for (let i = 0; i < n; i++) eye[i * n + i] = 1;
  const x = luSolve(lu, eye, n);
  const inv = Array.from({ length: n }, (_, i) => Array.from(x.subarray(i * n, (i + 1) * n)));
  const rcond = 1 / (oneNorm(a, n) * oneNorm(inv, n));
  if (!(rcond >= SINGULAR_RCOND)) {
    throw new EngineError(
      `matrix is singular (reciprocal condition number ${rcond.toExponential(2)})`,
      'singular',
    );
  }
  return { lu, inv };
}

/**
 * Matrix inverse from the checked LU factors (see `solve` for the singularity rule), A·X = I solved
 * column by column. Prefer `solve` or `choleskySolve` when the inverse is only applied to vectors.
 *
 * Source: linalg.lu (the method registry). Cost: O(n³). Throws EngineError "matrix is singular" and on
 * non-square or non-finite input.
 *
 * @example inverse([[4, 7], [2, 6]]) // [[0.6, -0.7], [-0.2, 0.4]]
 */
export function inverse(a: number[][]): number[][] {
  return checkedLu(a, 'inverse').inv;
}

export function checkRightHandSide(b: number[] | number[][], rows: number, fn: string): number[][] {
  const matrix = Array.isArray(b[0]) ? (b as number[][]) : (b as number[]).map((x) => [x]);
  const shape = checkRectangular(matrix, fn);
  if (shape.rows !== rows) {
    throw new EngineError(`${fn} requires a right-hand side with ${rows} rows, got ${shape.rows}`, 'shape');
  }
  return matrix;
}

/**
 * Solves A·x = b (b a vector) or A·X = B (B a matrix, column by column) by LU with partial pivoting.
 * A is declared singular when a pivot is exactly zero or its reciprocal 1-norm condition number is
 * below SINGULAR_RCOND, i.e. when the answer would carry almost no correct digits.
 *
 * Source: linalg.lu (the method registry). Cost: O(n³ + n²·m). Throws EngineError "matrix is
 * singular", and on non-square, mismatched or non-finite input.
 *
 * @example solve([[2, 0], [0, 4]], [2, 2]) // [1, 0.5]
 */
export function solve(a: number[][], b: number[]): number[];
export function solve(a: number[][], b: number[][]): number[][];
export function solve(a: number[][], b: number[] | number[][]): number[] | number[][] {
  const n = checkSquare(a, 'solve');
  const rhs = checkRightHandSide(b, n, 'solve');
  const { lu } = checkedLu(a, 'solve');
  const m = rhs[0].length;
  const x = luSolve(lu, Float64Array.from(rhs.flat()), m);
  const rows = Array.from({ length: n }, (_, i) => Array.from(x.subarray(i * m, (i + 1) * m)));
  return Array.isArray(b[0]) ? rows : rows.map((row) => row[0]);
}

function checkData(data: number[][], fn: string): Float64Array[] {
  if (!Array.isArray(data) || data.length < 2) {
    throw new EngineError(
      `${fn} requires at least two rows (cases), got ${Array.isArray(data) ? data.length : 0}`,
    );
  }
  for (let i = 0; i < data.length; i++) {
    const row = data[i];
    if (!Array.isArray(row)) continue;
    for (let j = 0; j < row.length; j++) {
      if (!Number.isFinite(row[j])) {
        throw new EngineError(
          `${fn} requires finite numbers; row index ${i}, column index ${j} is ${row[j]}`,
          'non-finite',
        );
      }
    }
  }
  return columnsFromRows(data, fn);
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
  const columns = checkData(data, 'constant-column check');
  const out: number[] = [];
  columns.forEach((column, j) => {
    if (column.every((v) => v === column[0])) out.push(j);
  });
  return out;
}

/**
 * Sample covariance matrix with divisor n − 1 of complete data (rows are cases, columns are
 * variables): listwiseCovariance on the columns (two-pass, compensated).
 *
 * Cost: O(n·p²). Throws EngineError with fewer than two rows, on ragged rows or non-finite values
 * (naming row and column index).
 *
 * @example covarianceMatrix([[1, 2], [2, 4], [3, 6]]) // [[1, 2], [2, 4]]
 */
export function covarianceMatrix(data: number[][]): number[][] {
  return listwiseCovariance(checkData(data, 'covariance matrix')).covariance;
}

/**
 * Pearson product-moment correlation matrix of complete data (rows are cases, columns are
 * variables), from the two-pass covariance matrix; the diagonal is exactly 1 and entries are clamped
 * to [−1, 1] against rounding.
 *
 * Source: corr.pearson (the method registry). Cost: O(n·p²). Throws EngineError naming the column
 * index of a column with zero variance, and on the inputs covarianceMatrix rejects.
 *
 * @example correlationMatrix([[1, 2], [2, 1], [3, 3]]) // [[1, 0.5], [0.5, 1]]
 */
export function correlationMatrix(data: number[][]): number[][] {
  const fn = 'correlation matrix';
  const columns = checkData(data, fn);
  const constant = columns.findIndex((column) => column.every((v) => v === column[0]));
  if (constant >= 0) {
    throw new EngineError(
      `${fn} requires variation in every column; column index ${constant} has the same value in every row`,
      'zero-variance',
    );
  }
  return correlationFromCovariance(listwiseCovariance(columns).covariance) as number[][];
}

/**
 * Pearson correlations from pairwise-complete cases (pairwiseMoments): each r[j][k] uses the rows
 * where both columns hold a value (null means missing), with means taken over those same rows;
 * n[j][k] counts them and n[j][j] counts the values present in column j. The matrix need not be
 * positive definite — see smoothToPositiveDefinite.
 *
 * Source: corr.pearson, missing.deletion (the method registry). Cost: O(n·p²). Throws EngineError
 * naming the column indices when a column has fewer than two values or no variance, when a pair shares
 * fewer than two cases or one column is constant on the shared cases, and naming row and column index
 * for a non-finite value.
 *
 * @example pairwiseCorrelation([[1, 2], [2, null], [3, 3], [4, 5]]).n // [[4, 3], [3, 3]]
 */
export function pairwiseCorrelation(data: (number | null)[][]): { r: number[][]; n: number[][] } {
  const fn = 'pairwise correlation';
  const moments = pairwiseMoments(columnsFromRows(data, fn));
  const { n, correlation, constantOn } = moments;
  const cols = n.length;
  for (let j = 0; j < cols; j++) {
    if (n[j][j] < 2) {
      throw new EngineError(`${fn} requires at least two values in column index ${j}, found ${n[j][j]}`);
    }
    if (constantOn[j][j]) {
      throw new EngineError(
        `${fn} requires variation in every column; column index ${j} is constant`,
        'zero-variance',
      );
    }
  }
  for (let j = 0; j < cols; j++) {
    for (let k = 0; k < j; k++) {
      const count = n[j][k];
      if (count < 2) {
        throw new EngineError(
          `${fn} requires at least two cases with both column index ${k} and column index ${j} present, found ${count}`,
        );
      }
      if (Number.isNaN(correlation[j][k])) {
        const flat = constantOn[j][k] ? j : k;
        const other = flat === j ? k : j;
        throw new EngineError(
          `${fn} requires variation on shared cases; column index ${flat} is constant on the ${count} cases where column index ${other} is present`,
          'zero-variance',
        );
      }
    }
  }
  return { r: correlation, n };
}
