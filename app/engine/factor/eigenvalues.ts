import { EngineError } from '../errors.ts';
import { MACHINE_EPSILON } from '../numeric.ts';

/** QL sweeps allowed per eigenvalue before the iteration is declared non-convergent. */
const MAX_QL_SWEEPS = 60;

/**
 * Eigenvalues (no vectors) of a symmetric matrix held row-major in a Float64Array, in descending
 * order. Householder reduction to tridiagonal form followed by the implicit QL algorithm with Wilkinson
 * shifts (Bowdler, Martin, Reinsch & Wilkinson 1968, the tred2/tql1 procedures of the Handbook for
 * Automatic Computation; registry id `linalg.symmetric-eigen`). Written for the many small matrices of
 * a parallel analysis: no allocation beyond two vectors, and only the lower triangle is read.
 *
 * Cost: about (4/3)·p³ flops. `a` is overwritten (pass a copy to keep it). Throws EngineError when
 * the QL iteration does not converge (non-finite input).
 *
 * @example symmetricEigenvalues(Float64Array.of(2, 1, 1, 2), 2) // Float64Array [3, 1]
 */
export function symmetricEigenvalues(a: Float64Array, p: number): Float64Array {
  const d = new Float64Array(p);
  const e = new Float64Array(p);
  tridiagonalize(a, p, d, e);
  qlImplicit(d, e, p);
  d.sort();
  d.reverse();
  return d;
}

/** Householder reduction of the lower triangle of a (row-major) to diagonal d and sub-diagonal e. */
function tridiagonalize(a: Float64Array, p: number, d: Float64Array, e: Float64Array): void {
  for (let i = p - 1; i > 0; i--) {
    const l = i - 1;
    const ri = i * p;
    let h = 0;
    if (l > 0) {
      let scale = 0;
      for (let k = 0; k <= l; k++) scale += Math.abs(a[ri + k]);
      if (scale === 0) {
        e[i] = a[ri + l];
      } else {
        for (let k = 0; k <= l; k++) {
          a[ri + k] /= scale;
          h += a[ri + k] * a[ri + k];
        }
        let f = a[ri + l];
        let g = f >= 0 ? -Math.sqrt(h) : Math.sqrt(h);
        e[i] = scale * g;
        h -= f * g;
        a[ri + l] = f - g;
        f = 0;
        for (let j = 0; j <= l; j++) {
          const rj = j * p;
          g = 0;
          for (let k = 0; k <= j; k++) g += a[rj + k] * a[ri + k];
          for (let k = j + 1; k <= l; k++) g += a[k * p + j] * a[ri + k];
          e[j] = g / h;
          f += e[j] * a[ri + j];
        }
        const hh = f / (h + h);
        for (let j = 0; j <= l; j++) {
          f = a[ri + j];
          g = e[j] - hh * f;
          e[j] = g;
          const rj = j * p;
          for (let k = 0; k <= j; k++) a[rj + k] -= f * e[k] + g * a[ri + k];
        }
      }
    } else {
      e[i] = a[ri + l];
    }
  }
  e[0] = 0;
  for (let i = 0; i < p; i++) d[i] = a[i * p + i];
}

/** Implicit QL with shifts on the tridiagonal matrix (d, e); eigenvalues are left in d. */
function qlImplicit(d: Float64Array, e: Float64Array, p: number): void {
  for (let i = 1; i < p; i++) e[i - 1] = e[i];
  e[p - 1] = 0;
  for (let l = 0; l < p; l++) {
    let sweeps = 0;
    for (;;) {
      let m = l;
      for (; m < p - 1; m++) {
        const dd = Math.abs(d[m]) + Math.abs(d[m + 1]);
        if (Math.abs(e[m]) <= MACHINE_EPSILON * dd) break;
      }
      if (m === l) break;
      if (sweeps++ === MAX_QL_SWEEPS) {
        throw new EngineError('eigenvalues did not converge (is the matrix finite?)', 'not-converged');
      }
      let g = (d[l + 1] - d[l]) / (2 * e[l]);
      let r = Math.sqrt(g * g + 1);
      g = d[m] - d[l] + e[l] / (g + (g >= 0 ? r : -r));
      let s = 1;
      let c = 1;
      let shift = 0;
      let i = m - 1;
      let underflow = false;
      for (; i >= l; i--) {
        const f = s * e[i];
        const b = c * e[i];
        r = Math.sqrt(f * f + g * g);
        e[i + 1] = r;
        if (r === 0) {
          d[i + 1] -= shift;
          e[m] = 0;
          underflow = true;
          break;
        }
        s = f / r;
        c = g / r;
        g = d[i + 1] - shift;
        r = (d[i] - g) * s + 2 * c * b;
        shift = s * r;
        d[i + 1] = g + shift;
        g = c * r - b;
      }
      if (underflow) continue;
      d[l] -= shift;
      e[l] = g;
      e[m] = 0;
    }
  }
}

/** Relative gap below which two eigenvalues count as tied and inverse iteration gives way. */
const TIED_EIGENVALUES = 1e-8;
/** Inverse-iteration solves per eigenvector (the shift sits within rounding of the eigenvalue). */
const INVERSE_STEPS = 2;

/**
 * All eigenvalues (descending) and the eigenvectors of the m largest of a symmetric matrix: the values
 * by symmetricEigenvalues, each wanted vector by inverse iteration with the eigenvalue itself as the
 * shift (Wilkinson 1965, The Algebraic Eigenvalue Problem, ch. 9, from memory), orthogonalised against
 * the vectors before it. Where two of the first m + 1 eigenvalues are tied to TIED_EIGENVALUES, the full
 * decomposition (`full`) is used instead. vectors[i][k] is component i of eigenvector k, signed so that
 * its largest component is positive. Used by the factor extractions, which need a few vectors of many
 * matrices.
 *
 * Cost: about (4/3)·p³ for the values plus m·p³/3 for the vectors. Throws what symmetricEigenvalues
 * throws.
 */
export function leadingEigenpairs(
  a: number[][],
  m: number,
  full: (a: number[][]) => { values: number[]; vectors: number[][] },
): { values: number[]; vectors: number[][] } {
  const p = a.length;
  const flat = new Float64Array(p * p);
  for (let i = 0; i < p; i++) for (let j = 0; j < p; j++) flat[i * p + j] = a[i][j];
  const values = Array.from(symmetricEigenvalues(flat, p));
  const scale = Math.max(1, Math.abs(values[0]), Math.abs(values[p - 1]));
  for (let k = 0; k < Math.min(m, p - 1); k++) {
    if (values[k] - values[k + 1] <= TIED_EIGENVALUES * scale) {
      const out = full(a);
      return { values: out.values, vectors: out.vectors.map((row) => row.slice(0, m)) };
    }
  }
  const vectors: number[][] = Array.from({ length: p }, () => new Array<number>(m).fill(0));
  const lu = new Float64Array(p * p);
  const perm = new Int32Array(p);
  const x = new Float64Array(p);
  for (let k = 0; k < m; k++) {
    const shift = values[k] + 64 * Number.EPSILON * scale;
    for (let i = 0; i < p; i++) for (let j = 0; j < p; j++) lu[i * p + j] = a[i][j] - (i === j ? shift : 0);
    factorLU(lu, perm, p, scale);
    for (let i = 0; i < p; i++) x[i] = 1 + ((i * 7919) % 13) / 13;
    for (let step = 0; step < INVERSE_STEPS; step++) {
      solveLU(lu, perm, p, x);
      for (let prev = 0; prev < k; prev++) {
        let dot = 0;
        for (let i = 0; i < p; i++) dot += x[i] * vectors[i][prev];
        for (let i = 0; i < p; i++) x[i] -= dot * vectors[i][prev];
      }
      let norm = 0;
      for (let i = 0; i < p; i++) norm += x[i] * x[i];
      norm = Math.sqrt(norm);
      for (let i = 0; i < p; i++) x[i] /= norm;
    }
    let pivot = 0;
    for (let i = 1; i < p; i++) if (Math.abs(x[i]) > Math.abs(x[pivot])) pivot = i;
    const sign = x[pivot] < 0 ? -1 : 1;
    for (let i = 0; i < p; i++) vectors[i][k] = sign * x[i];
  }
  return { values, vectors };
}

/** In-place LU with partial pivoting; a zero pivot (an exact shift) is nudged to rounding size. */
function factorLU(lu: Float64Array, perm: Int32Array, p: number, scale: number): void {
  for (let i = 0; i < p; i++) perm[i] = i;
  for (let k = 0; k < p; k++) {
    let best = k;
    for (let i = k + 1; i < p; i++) if (Math.abs(lu[i * p + k]) > Math.abs(lu[best * p + k])) best = i;
    if (best !== k) {
      for (let j = 0; j < p; j++) {
        const t = lu[k * p + j];
        lu[k * p + j] = lu[best * p + j];
        lu[best * p + j] = t;
      }
      const t = perm[k];
      perm[k] = perm[best];
      perm[best] = t;
    }
    if (lu[k * p + k] === 0) lu[k * p + k] = Number.EPSILON * scale;
    const pivot = lu[k * p + k];
    for (let i = k + 1; i < p; i++) {
      const f = lu[i * p + k] / pivot;
      lu[i * p + k] = f;
      if (f !== 0) for (let j = k + 1; j < p; j++) lu[i * p + j] -= f * lu[k * p + j];
    }
  }
}

function solveLU(lu: Float64Array, perm: Int32Array, p: number, x: Float64Array): void {
  const b = Float64Array.from(perm, (src) => x[src]);
  for (let i = 0; i < p; i++) {
    let s = b[i];
    for (let j = 0; j < i; j++) s -= lu[i * p + j] * b[j];
    b[i] = s;
  }
  for (let i = p - 1; i >= 0; i--) {
    let s = b[i];
    for (let j = i + 1; j < p; j++) s -= lu[i * p + j] * b[j];
    b[i] = s / lu[i * p + i];
  }
  x.set(b);
}
