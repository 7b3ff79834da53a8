/**
 * LU factors with partial pivoting (the Doolittle/Crout form with a left-looking dot product, Golub &
 * Van Loan 2013, §3.4, as in the public-domain JAMA package) and solves with them. The arithmetic is
 * done in the same order as ml-matrix's LuDecomposition (itself that form), so the results agree with
 * it to the last bit; the loops are the luFactor and luSolve kernels (app/engine/kernels) on flat
 * arrays, compiled, which run many times faster in a short-lived process than a matrix object read
 * through accessors.
 *
 * Source: linalg.lu (the method registry). Cost O(n³) to factor, O(n²·m) to solve for m columns.
 */

import { Arena } from './kernels/index.ts';

/** The factors of a square matrix: L (unit lower, below the diagonal) and U in one row-major array. */
export interface LuFactors {
  n: number;
  lu: Float64Array;
  /** Row i of the factored matrix is row pivot[i] of the original. */
  pivot: Int32Array;
}

/** Factors the n × n row-major matrix `a` (not changed) with the luFactor kernel. Cost O(n³). Throws nothing. */
export function luFactor(a: ArrayLike<number>, n: number): LuFactors {
  const arena = new Arena();
  const at = { lu: arena.f64(n * n, true), pivot: arena.i32(n), column: arena.f64(n) };
  const memory = arena.ready();
  const lu = new Float64Array(memory, at.lu, n * n);
  lu.set(a);
  arena.k.luFactor(n, at.lu, at.pivot, at.column);
  return { n, lu: lu.slice(), pivot: new Int32Array(memory, at.pivot, n).slice() };
}

/** Whether a pivot is exactly zero (the factors cannot solve). Cost O(n). */
export function luSingular(f: LuFactors): boolean {
  for (let j = 0; j < f.n; j++) if (f.lu[j * f.n + j] === 0) return true;
  return false;
}

/**
 * Solves A·X = B for the n × m row-major B (not changed); returns X, n × m row-major.
 * Cost O(n²·m). Throws nothing; check luSingular first.
 */
export function luSolve(f: LuFactors, b: ArrayLike<number>, m: number): Float64Array {
  const { n, lu, pivot } = f;
  const arena = new Arena();
  const at = { lu: arena.f64(n * n, true), x: arena.f64(n * m, true) };
  const memory = arena.ready();
  new Float64Array(memory, at.lu, n * n).set(lu);
  const x = new Float64Array(memory, at.x, n * m);
  for (let i = 0; i < n; i++) for (let j = 0; j < m; j++) x[i * m + j] = b[pivot[i] * m + j];
  arena.k.luSolve(n, m, at.lu, at.x);
  return x.slice();
}
