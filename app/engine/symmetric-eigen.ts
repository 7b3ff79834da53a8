/**
 * Eigenvalues and eigenvectors of a real symmetric matrix: Householder reduction to tridiagonal form
 * (EISPACK's tred2) followed by the implicit QL algorithm (tql2), in the form of the public-domain
 * JAMA package. The arithmetic is done in the same order as ml-matrix's EigenvalueDecomposition (itself
 * that form), so the results agree with it to the last bit; what differs is the storage: one flat
 * Float64Array instead of a matrix object read through accessors, which runs several times faster in
 * a short-lived process (a command that decomposes a few matrices once never warms the accessors up).
 *
 * Source: linalg.symmetric-eigen (the method registry). Cost O(n³) time, O(n²) memory.
 */

/**
 * √(a² + b²) without needless overflow or underflow, computed as the JAMA form computes it.
 * Cost O(1).
 */
function hypotenuse(a: number, b: number): number {
  if (Math.abs(a) > Math.abs(b)) {
    const r = b / a;
    return Math.abs(a) * Math.sqrt(1 + r * r);
  }
  if (b !== 0) {
    const r = a / b;
    return Math.abs(b) * Math.sqrt(1 + r * r);
  }
  return 0;
}

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
  // v[c·n + r] holds the working matrix V at row r, column c (V stored by columns, so the inner loops,
  // which walk down V's columns, read consecutive memory).
  const v = new Float64Array(n * n);
  for (let i = 0; i < n; i++) for (let j = 0; j < n; j++) v[j * n + i] = a[i * n + j];
  const d = new Float64Array(n);
  const e = new Float64Array(n);
  householder(n, e, d, v);
  implicitQl(n, e, d, v);
  return { values: d, vectors: v };
}

/** tred2: V (stored by columns, see tridiagonalQl) to tridiagonal form, accumulating the transformations. */
function householder(n: number, e: Float64Array, d: Float64Array, v: Float64Array): void {
  // s(r, c) is the stored element r·n + c, i.e. V at row c, column r.
  for (let j = 0; j < n; j++) d[j] = v[j * n + n - 1];
  for (let i = n - 1; i > 0; i--) {
    let scale = 0;
    let h = 0;
    for (let k = 0; k < i; k++) scale = scale + Math.abs(d[k]);
    if (scale === 0) {
      e[i] = d[i - 1];
      for (let j = 0; j < i; j++) {
        d[j] = v[j * n + i - 1];
        v[j * n + i] = 0;
        v[i * n + j] = 0;
      }
    } else {
      for (let k = 0; k < i; k++) {
        d[k] /= scale;
        h += d[k] * d[k];
      }
      let f = d[i - 1];
      let g = Math.sqrt(h);
      if (f > 0) g = -g;
      e[i] = scale * g;
      h = h - f * g;
      d[i - 1] = f - g;
      for (let j = 0; j < i; j++) e[j] = 0;
      for (let j = 0; j < i; j++) {
        f = d[j];
        v[i * n + j] = f;
        g = e[j] + v[j * n + j] * f;
        for (let k = j + 1; k <= i - 1; k++) {
          g += v[j * n + k] * d[k];
          e[k] += v[j * n + k] * f;
        }
        e[j] = g;
      }
      f = 0;
      for (let j = 0; j < i; j++) {
        e[j] /= h;
        f += e[j] * d[j];
      }
      const hh = f / (h + h);
      for (let j = 0; j < i; j++) e[j] -= hh * d[j];
      for (let j = 0; j < i; j++) {
        f = d[j];
        g = e[j];
        for (let k = j; k <= i - 1; k++) v[j * n + k] = v[j * n + k] - (f * e[k] + g * d[k]);
        d[j] = v[j * n + i - 1];
        v[j * n + i] = 0;
      }
    }
    d[i] = h;
  }
  for (let i = 0; i < n - 1; i++) {
    v[i * n + n - 1] = v[i * n + i];
    v[i * n + i] = 1;
    const h = d[i + 1];
    if (h !== 0) {
      for (let k = 0; k <= i; k++) d[k] = v[(i + 1) * n + k] / h;
      for (let j = 0; j <= i; j++) {
        let g = 0;
        for (let k = 0; k <= i; k++) g += v[(i + 1) * n + k] * v[j * n + k];
        for (let k = 0; k <= i; k++) v[j * n + k] = v[j * n + k] - g * d[k];
      }
    }
    for (let k = 0; k <= i; k++) v[(i + 1) * n + k] = 0;
  }
  for (let j = 0; j < n; j++) {
    d[j] = v[j * n + n - 1];
    v[j * n + n - 1] = 0;
  }
  v[(n - 1) * n + n - 1] = 1;
  e[0] = 0;
}

/** tql2: the tridiagonal (d, e) to diagonal by implicit QL shifts, rotating V alongside; sorts ascending. */
function implicitQl(n: number, e: Float64Array, d: Float64Array, v: Float64Array): void {
  for (let i = 1; i < n; i++) e[i - 1] = e[i];
  e[n - 1] = 0;
  let f = 0;
  let tst1 = 0;
  const eps = Number.EPSILON;
  for (let l = 0; l < n; l++) {
    tst1 = Math.max(tst1, Math.abs(d[l]) + Math.abs(e[l]));
    let m = l;
    while (m < n) {
      if (Math.abs(e[m]) <= eps * tst1) break;
      m++;
    }
    if (m > l) {
      do {
        let g = d[l];
        let p = (d[l + 1] - g) / (2 * e[l]);
        let r = hypotenuse(p, 1);
        if (p < 0) r = -r;
        d[l] = e[l] / (p + r);
        d[l + 1] = e[l] * (p + r);
        const dl1 = d[l + 1];
        let h = g - d[l];
        for (let i = l + 2; i < n; i++) d[i] -= h;
        f = f + h;
        p = d[m];
        let c = 1;
        let c2 = c;
        let c3 = c;
        const el1 = e[l + 1];
        let s = 0;
        let s2 = 0;
        for (let i = m - 1; i >= l; i--) {
          c3 = c2;
          c2 = c;
          s2 = s;
          g = c * e[i];
          h = c * p;
          r = hypotenuse(p, e[i]);
          e[i + 1] = s * r;
          s = e[i] / r;
          c = p / r;
          p = c * d[i] - s * g;
          d[i + 1] = h + s * (c * g + s * d[i]);
          const upper = (i + 1) * n;
          const lower = i * n;
          for (let k = 0; k < n; k++) {
            h = v[upper + k];
            v[upper + k] = s * v[lower + k] + c * h;
            v[lower + k] = c * v[lower + k] - s * h;
          }
        }
        p = (-s * s2 * c3 * el1 * e[l]) / dl1;
        e[l] = s * p;
        d[l] = c * p;
      } while (Math.abs(e[l]) > eps * tst1);
    }
    d[l] = d[l] + f;
    e[l] = 0;
  }
  for (let i = 0; i < n - 1; i++) {
    let k = i;
    let p = d[i];
    for (let j = i + 1; j < n; j++) {
      if (d[j] < p) {
        k = j;
        p = d[j];
      }
    }
    if (k !== i) {
      d[k] = d[i];
      d[i] = p;
      for (let j = 0; j < n; j++) {
        p = v[i * n + j];
        v[i * n + j] = v[k * n + j];
        v[k * n + j] = p;
      }
    }
  }
}
