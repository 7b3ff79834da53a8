/**
 * LU factors with partial pivoting (the Doolittle/Crout form with a left-looking dot product, Golub &
 * Van Loan 2013, §3.4, as in the public-domain JAMA package) and solves with them. The arithmetic is
 * done in the same order as ml-matrix's LuDecomposition (itself that form), so the results agree with
 * it to the last bit; the storage is flat Float64Arrays, which run several times faster in a
 * short-lived process than a matrix object read through accessors.
 *
 * Source: linalg.lu (the method registry). Cost O(n³) to factor, O(n²·m) to solve for m columns.
 */

/** The factors of a square matrix: L (unit lower, below the diagonal) and U in one row-major array. */
export interface LuFactors {
  n: number;
  lu: Float64Array;
  /** Row i of the factored matrix is row pivot[i] of the original. */
  pivot: Int32Array;
}

/** Factors the n × n row-major matrix `a` (not changed). Cost O(n³). Throws nothing. */
export function luFactor(a: ArrayLike<number>, n: number): LuFactors {
  const lu = Float64Array.from(a);
  const pivot = new Int32Array(n);
  for (let i = 0; i < n; i++) pivot[i] = i;
  const column = new Float64Array(n);
  for (let j = 0; j < n; j++) {
    for (let i = 0; i < n; i++) column[i] = lu[i * n + j];
    for (let i = 0; i < n; i++) {
      const kmax = Math.min(i, j);
      let s = 0;
      for (let k = 0; k < kmax; k++) s += lu[i * n + k] * column[k];
      column[i] -= s;
      lu[i * n + j] = column[i];
    }
    let p = j;
    for (let i = j + 1; i < n; i++) if (Math.abs(column[i]) > Math.abs(column[p])) p = i;
    if (p !== j) {
      for (let k = 0; k < n; k++) {
        const t = lu[p * n + k];
        lu[p * n + k] = lu[j * n + k];
        lu[j * n + k] = t;
      }
      const v = pivot[p];
      pivot[p] = pivot[j];
      pivot[j] = v;
    }
    const diagonal = lu[j * n + j];
    if (diagonal !== 0) for (let i = j + 1; i < n; i++) lu[i * n + j] = lu[i * n + j] / diagonal;
  }
  return { n, lu, pivot };
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
  const x = new Float64Array(n * m);
  for (let i = 0; i < n; i++) for (let j = 0; j < m; j++) x[i * m + j] = b[pivot[i] * m + j];
  for (let k = 0; k < n; k++) {
    for (let i = k + 1; i < n; i++) {
      const l = lu[i * n + k];
      for (let j = 0; j < m; j++) x[i * m + j] = x[i * m + j] - x[k * m + j] * l;
    }
  }
  for (let k = n - 1; k >= 0; k--) {
    const u = lu[k * n + k];
    for (let j = 0; j < m; j++) x[k * m + j] = x[k * m + j] / u;
    for (let i = 0; i < k; i++) {
      const l = lu[i * n + k];
      for (let j = 0; j < m; j++) x[i * m + j] = x[i * m + j] - x[k * m + j] * l;
    }
  }
  return x;
}
