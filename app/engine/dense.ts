/**
 * Dense-matrix routines from ml-matrix: the Cholesky factor and what is built on it (solves,
 * log-determinants, the positive-definiteness check, smoothing to positive definite), the SVD
 * condition number, products and transposes. Apart from linalg.ts so that code needing none of them
 * (the item analysis) does not load ml-matrix.
 */
import { CholeskyDecomposition, Matrix, SingularValueDecomposition } from 'ml-matrix';
import { EngineError } from './errors.ts';
import {
  checkRectangular,
  checkRightHandSide,
  checkSquare,
  checkSymmetric,
  isSymmetric,
  symmetricEigen,
} from './linalg.ts';
import { kahanSum, PD_PIVOT_TOL } from './numeric.ts';

/** Default floor for eigenvalues when smoothing an indefinite correlation matrix. */
export const SMOOTHING_MIN_EIGEN = 1e-6;

/** Clip-and-rescale rounds allowed before smoothing gives up (one round suffices in practice). */
const MAX_SMOOTHING_ROUNDS = 10;

/**
 * Cholesky factor of a symmetric matrix from ml-matrix's CholeskyDecomposition (the Cholesky–
 * Banachiewicz recurrence, Golub & Van Loan 2013, §4.2), checked: a pivot at or below PD_PIVOT_TOL
 * times its diagonal entry is failure (null).
 */
function choleskyOrNull(a: number[][]): CholeskyDecomposition | null {
  // The lower triangle, mirrored: ml-matrix refuses a matrix that is not exactly symmetric, and ours
  // may differ from its transpose by rounding (within SYMMETRY_TOL).
  const n = a.length;
  const lower = new Matrix(n, n);
  for (let i = 0; i < n; i++) {
    for (let j = 0; j <= i; j++) {
      lower.set(i, j, a[i][j]);
      lower.set(j, i, a[i][j]);
    }
  }
  const decomposition = new CholeskyDecomposition(lower);
  if (!decomposition.isPositiveDefinite()) return null;
  const l = decomposition.lowerTriangularMatrix;
  for (let i = 0; i < a.length; i++) {
    const pivot = l.get(i, i);
    if (!(pivot * pivot > PD_PIVOT_TOL * a[i][i])) return null;
  }
  return decomposition;
}

function checkedCholesky(a: number[][], fn: string): CholeskyDecomposition {
  checkSymmetric(a, fn);
  const factor = choleskyOrNull(a);
  if (factor === null) throw new EngineError('matrix is not positive definite', 'not-positive-definite');
  return factor;
}

/**
 * Cholesky factor L (lower triangular, A = L·Lᵀ). A pivot at or below PD_PIVOT_TOL times its diagonal
 * entry counts as failure.
 *
 * Source: linalg.cholesky (the method registry). Cost: O(n³/3). Throws EngineError "matrix is not
 * positive definite", "matrix is not symmetric", and on non-square or non-finite input.
 *
 * @example cholesky([[4, 2], [2, 3]]) // [[2, 0], [1, 1.4142135623730951]]
 */
export function cholesky(a: number[][]): number[][] {
  return checkedCholesky(a, 'Cholesky factorisation').lowerTriangularMatrix.to2DArray();
}

/**
 * Solves A·x = b (or A·X = B) for a symmetric positive-definite A by its Cholesky factor: L·y = b
 * forward, then Lᵀ·x = y backward. Half the work of LU and no pivoting; the way to apply S⁻¹ to a
 * vector (Mahalanobis distances, generalized least squares) without forming S⁻¹.
 *
 * Source: linalg.cholesky (the method registry). Cost: O(n³/3 + n²·m). Throws EngineError "matrix is
 * not positive definite", "matrix is not symmetric", and on non-square, mismatched or non-finite
 * input.
 *
 * @example choleskySolve([[4, 2], [2, 3]], [2, 1]) // [0.5, 0]
 */
export function choleskySolve(a: number[][], b: number[]): number[];
export function choleskySolve(a: number[][], b: number[][]): number[][];
export function choleskySolve(a: number[][], b: number[] | number[][]): number[] | number[][] {
  const fn = 'Cholesky solve';
  const n = checkSymmetric(a, fn);
  const rhs = checkRightHandSide(b, n, fn);
  const x = checkedCholesky(a, fn).solve(new Matrix(rhs));
  return Array.isArray(b[0]) ? x.to2DArray() : x.getColumn(0);
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
  const l = checkedCholesky(a, 'log-determinant').lowerTriangularMatrix;
  return 2 * kahanSum(a.map((_, i) => Math.log(l.get(i, i))));
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
  checkSquare(a, 'positive-definiteness check');
  if (!isSymmetric(a)) return false;
  return choleskyOrNull(a) !== null;
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
 * Matrix product A·B (ml-matrix's mmul).
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
  return new Matrix(a).mmul(new Matrix(b)).to2DArray();
}

/**
 * Transpose of a rectangular matrix.
 *
 * Cost: O(n·m). Throws EngineError on ragged or non-finite input.
 *
 * @example transpose([[1, 2, 3]]) // [[1], [2], [3]]
 */
export function transpose(a: number[][]): number[][] {
  checkRectangular(a, 'transpose');
  return new Matrix(a).transpose().to2DArray();
}
