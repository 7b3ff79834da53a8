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
