/**
 * Eigenvalues and eigenvectors of a real symmetric matrix: Householder reduction to tridiagonal form
 * (EISPACK's tred2) followed by the implicit QL algorithm (tql2), in the form of the public-domain
 * JAMA package. The arithmetic is done in the same order as ml-matrix's EigenvalueDecomposition (itself
 * that form), so the results agree with it to the last bit; what differs is the storage and the
 * language: the symmetricEigen kernel (app/engine/kernels) works on one flat array, compiled, which
 * runs many times faster in a short-lived process (a command that decomposes a few matrices once never
 * warms up code read through accessors).
 *
 * Source: linalg.symmetric-eigen (the method registry). Cost O(n³) time, O(n²) memory.
 */
import { Arena } from './kernels/index.ts';

/**
 * Decomposes the symmetric n × n matrix `a` (row-major, read only). Returns the eigenvalues in
 * ascending order and the eigenvectors as the rows of `vectors` (row c holds the eigenvector of
 * values[c]: vectors[c·n + i] is its i-th element).
 *
 * Cost O(n³). Throws nothing; the caller checks symmetry and finiteness.
 */
export function tridiagonalQl(
  a: ArrayLike<number>,
  n: number,
): { values: Float64Array; vectors: Float64Array } {
  if (n === 0) return { values: new Float64Array(0), vectors: new Float64Array(0) };
  const arena = new Arena();
  const at = { v: arena.f64(n * n, true), d: arena.f64(n), e: arena.f64(n) };
  const memory = arena.ready();
  // V is stored by columns (v[c·n + r] is V at row r, column c), so the inner loops, which walk down
  // V's columns, read consecutive memory.
  const v = new Float64Array(memory, at.v, n * n);
  for (let i = 0; i < n; i++) for (let j = 0; j < n; j++) v[j * n + i] = a[i * n + j];
  arena.k.symmetricEigen(n, at.v, at.d, at.e);
  return { values: new Float64Array(memory.slice(at.d, at.d + n * 8)), vectors: v.slice() };
}
