// The engine's compiled kernels, in AssemblyScript: the loops that dominate an analysis of a large
// file (pairwise moments, column summaries, the answer tally, the symmetric eigendecomposition, LU,
// and the splitting of plain-text records), compiled to WebAssembly so that they run at full speed
// from their first call. Each computes the same IEEE double operations in the same
// order as the TypeScript it replaced, so the results are the same to the last bit.
//
// Memory is laid out by the caller (app/engine/kernels/index.ts): every pointer is a byte offset into
// this module's memory, f64 arrays aligned to 16 bytes. Nothing here allocates.

/** First byte the caller may use: the end of this module's own static data. */
export function heapBase(): usize {
  return __heap_base;
}

// ---------------------------------------------------------------------------------------------------
// Pairwise moments

/**
 * One column's first pass: the mean of its present values (the shift), the present count, the first
 * present value and how often it occurs, written to out[0..3]. Returns the row index of an infinite
 * value, or -1.
 */
export function scanColumn(col: usize, n: i32, out: usize): i32 {
  let s: f64 = 0;
  let c: f64 = 0;
  let f: f64 = NaN;
  let same: f64 = 0;
  for (let i = 0; i < n; i++) {
    const v = load<f64>(col + (<usize>i << 3));
    if (v == v) {
      if (v - v != 0) return i;
      if (c == 0) f = v;
      same += f64(v == f);
      s += v;
      c++;
    }
  }
  store<f64>(out, c > 0 ? s / c : 0);
  store<f64>(out, c, 8);
  store<f64>(out, f, 16);
  store<f64>(out, same, 24);
  return -1;
}

/**
 * Where the pairwise pass finds its arrays: the columns (column j at cols + j·n·8), their count p and
 * length n, the block's row width P (p rounded up to 8), and the pass's arrays. Laid out by the caller
 * as fourteen 32-bit integers in this order.
 */
@unmanaged
class PairwiseLayout {
  cols: usize;
  n: i32;
  p: i32;
  P: i32;
  shift: usize;
  total: usize;
  squares: usize;
  block: usize;
  gap: usize;
  missingAt: usize;
  cross: usize;
  lostSum: usize;
  lostSquares: usize;
  bothMissing: usize;
}

/**
 * One block of rows [start, start + rows) of the pairwise pass: copies each column's piece into the
 * row-major block (row r at block + r·P·8; a missing value as 0, marked in gap and listed in missingAt)
 * and adds its Σd and Σd² to total and squares; sums every pair's cross-products over the block into
 * cross (row stride P); then, for each missing cell, moves the other columns' values in that row to
 * lostSum/lostSquares, or counts them in bothMissing (all p × p).
 */
export function pairwiseBlock(layout: usize, start: i32, rows: i32): void {
  const l = changetype<PairwiseLayout>(layout);
  const missing = fillBlock(l, start, rows);
  crossProducts(l.block, l.p, l.P, rows, l.cross);
  correctForMissing(l, missing);
}

function fillBlock(l: PairwiseLayout, start: i32, rows: i32): i32 {
  const p = l.p;
  const P = l.P;
  const block = l.block;
  const gap = l.gap;
  const missingAt = l.missingAt;
  let missing = 0;
  for (let j = 0; j < p; j++) {
    const s = load<f64>(l.shift + (<usize>j << 3));
    const col = l.cols + ((<usize>j * <usize>l.n + <usize>start) << 3);
    let t: f64 = 0;
    let q: f64 = 0;
    for (let r = 0; r < rows; r++) {
      const v = load<f64>(col + (<usize>r << 3));
      const at = <usize>r * <usize>P + <usize>j;
      if (v == v) {
        const d = v - s;
        store<f64>(block + (at << 3), d);
        store<u8>(gap + at, 0);
        t += d;
        q += d * d;
      } else {
        store<f64>(block + (at << 3), 0);
        store<u8>(gap + at, 1);
        store<i32>(missingAt + (<usize>missing << 3), r);
        store<i32>(missingAt + (<usize>missing << 3), j, 4);
        missing++;
      }
    }
    const tj = l.total + (<usize>j << 3);
    store<f64>(tj, load<f64>(tj) + t);
    const qj = l.squares + (<usize>j << 3);
    store<f64>(qj, load<f64>(qj) + q);
  }
  return missing;
}

/**
 * cross[j·P + k] += Σ_r block[r][j]·block[r][k] for k ≤ j, two columns j against eight (then two)
 * columns k at a time, the eight as four pairs of lanes: each pair's terms are summed in row order into
 * a sum of their own, added to cross at the end of the block. Columns p … P−1 of the block are zero.
 */
function crossProducts(block: usize, p: i32, P: i32, rows: i32, cross: usize): void {
  const stride = <usize>P << 3;
  for (let j = 0; j < p; j += 2) {
    const out0 = cross + <usize>j * stride;
    const out1 = out0 + stride;
    const top = j + 2;
    let k = 0;
    for (; k + 8 <= top; k += 8) {
      let s00 = f64x2.splat(0);
      let s01 = f64x2.splat(0);
      let s02 = f64x2.splat(0);
      let s03 = f64x2.splat(0);
      let s10 = f64x2.splat(0);
      let s11 = f64x2.splat(0);
      let s12 = f64x2.splat(0);
      let s13 = f64x2.splat(0);
      let row = block;
      const xo = <usize>j << 3;
      const yo = <usize>k << 3;
      for (let r = 0; r < rows; r++) {
        const x0 = v128.load64_splat(row + xo);
        const x1 = v128.load64_splat(row + xo + 8);
        const y0 = v128.load(row + yo);
        const y1 = v128.load(row + yo + 16);
        const y2 = v128.load(row + yo + 32);
        const y3 = v128.load(row + yo + 48);
        s00 = f64x2.add(s00, f64x2.mul(x0, y0));
        s01 = f64x2.add(s01, f64x2.mul(x0, y1));
        s02 = f64x2.add(s02, f64x2.mul(x0, y2));
        s03 = f64x2.add(s03, f64x2.mul(x0, y3));
        s10 = f64x2.add(s10, f64x2.mul(x1, y0));
        s11 = f64x2.add(s11, f64x2.mul(x1, y1));
        s12 = f64x2.add(s12, f64x2.mul(x1, y2));
        s13 = f64x2.add(s13, f64x2.mul(x1, y3));
        row += stride;
      }
      const a = out0 + yo;
      const b = out1 + yo;
      v128.store(a, f64x2.add(v128.load(a), s00));
      v128.store(a, f64x2.add(v128.load(a, 16), s01), 16);
      v128.store(a, f64x2.add(v128.load(a, 32), s02), 32);
      v128.store(a, f64x2.add(v128.load(a, 48), s03), 48);
      v128.store(b, f64x2.add(v128.load(b), s10));
      v128.store(b, f64x2.add(v128.load(b, 16), s11), 16);
      v128.store(b, f64x2.add(v128.load(b, 32), s12), 32);
      v128.store(b, f64x2.add(v128.load(b, 48), s13), 48);
    }
    for (; k < top; k += 2) {
      let s0 = f64x2.splat(0);
      let s1 = f64x2.splat(0);
      let row = block;
      const xo = <usize>j << 3;
      const yo = <usize>k << 3;
      for (let r = 0; r < rows; r++) {
        const y = v128.load(row + yo);
        s0 = f64x2.add(s0, f64x2.mul(v128.load64_splat(row + xo), y));
        s1 = f64x2.add(s1, f64x2.mul(v128.load64_splat(row + xo + 8), y));
        row += stride;
      }
      const a = out0 + yo;
      const b = out1 + yo;
      v128.store(a, f64x2.add(v128.load(a), s0));
      v128.store(b, f64x2.add(v128.load(b), s1));
    }
  }
}

function correctForMissing(l: PairwiseLayout, missing: i32): void {
  const p = l.p;
  const P = l.P;
  for (let m = 0; m < missing; m++) {
    const r = load<i32>(l.missingAt + (<usize>m << 3));
    const k = load<i32>(l.missingAt + (<usize>m << 3), 4);
    const row = <usize>r * <usize>P;
    for (let j = 0; j < p; j++) {
      const at = (<usize>j * <usize>p + <usize>k) << 3;
      if (load<u8>(l.gap + row + <usize>j) == 1) {
        store<f64>(l.bothMissing + at, load<f64>(l.bothMissing + at) + 1);
      } else {
        const d = load<f64>(l.block + ((row + <usize>j) << 3));
        store<f64>(l.lostSum + at, load<f64>(l.lostSum + at) + d);
        store<f64>(l.lostSquares + at, load<f64>(l.lostSquares + at) + d * d);
      }
    }
  }
}

// ---------------------------------------------------------------------------------------------------
// Column descriptives

/** Neumaier's compensation term for adding v to s (t = s + v). */
// @ts-ignore: decorator
@inline
function lost(s: f64, v: f64, t: f64): f64 {
  return abs(s) >= abs(v) ? s - t + v : v - t + s;
}

/** Neumaier's compensation term for two lanes at once (each lane as `lost`). */
// @ts-ignore: decorator
@inline
function lost2(s: v128, v: v128, t: v128): v128 {
  const first = f64x2.add(f64x2.sub(s, t), v);
  const second = f64x2.add(f64x2.sub(v, t), s);
  return v128.bitselect(first, second, f64x2.ge(f64x2.abs(s), f64x2.abs(v)));
}

// @ts-ignore: decorator
@inline
function pair(a: f64, b: f64): v128 {
  return f64x2.replace_lane(f64x2.splat(a), 1, b);
}

/** Copies the present (non-NaN) values of col[0, n) in row order to scratch; returns their count. */
function compact(col: usize, n: i32, scratch: usize): i32 {
  let count = 0;
  for (let i = 0; i < n; i++) {
    const v = load<f64>(col + (<usize>i << 3));
    store<f64>(scratch + (<usize>count << 3), v);
    count += i32(v == v);
  }
  return count;
}

/** The index of the first infinite one of count values, its value in out[7]; −1 when all are finite. */
function firstInfinite(values: usize, count: i32, out: usize): f64 {
  for (let i = 0; i < count; i++) {
    const v = load<f64>(values + (<usize>i << 3));
    if (v - v != 0) {
      store<f64>(out, v, 56);
      return i;
    }
  }
  return -1;
}

/** The compensated sums of describePair's two lanes as pairSums and sumTail leave them: sum, compensation. */
const lanes = memory.data(32, 16);

// @ts-ignore: decorator
@inline
function laneSum(lane: i32): f64 {
  return load<f64>(lanes + (<usize>lane << 4));
}

// @ts-ignore: decorator
@inline
function laneComp(lane: i32): f64 {
  return load<f64>(lanes + (<usize>lane << 4), 8);
}

// @ts-ignore: decorator
@inline
function setLane(lane: i32, sum: f64, comp: f64): void {
  store<f64>(lanes + (<usize>lane << 4), sum);
  store<f64>(lanes + (<usize>lane << 4), comp, 8);
}

/**
 * Compensated (Neumaier) sums of a[i] − shiftA and b[i] − shiftB over i < count, side by side in the
 * two lanes of a vector; into laneSum and laneComp.
 */
function pairSums(a: usize, b: usize, count: i32, shiftA: f64, shiftB: f64): void {
  const shift = pair(shiftA, shiftB);
  let s = f64x2.splat(0);
  let c = f64x2.splat(0);
  for (let i = 0; i < count; i++) {
    const v = f64x2.sub(pair(load<f64>(a + (<usize>i << 3)), load<f64>(b + (<usize>i << 3))), shift);
    const t = f64x2.add(s, v);
    c = f64x2.add(c, lost2(s, v, t));
    s = t;
  }
  setLane(0, f64x2.extract_lane(s, 0), f64x2.extract_lane(c, 0));
  setLane(1, f64x2.extract_lane(s, 1), f64x2.extract_lane(c, 1));
}

/** Continues one lane's compensated sum over values[from, count) − shift, alone. */
function sumTail(values: usize, from: i32, count: i32, shift: f64, lane: i32): void {
  let s = laneSum(lane);
  let c = laneComp(lane);
  for (let i = from; i < count; i++) {
    const v = load<f64>(values + (<usize>i << 3)) - shift;
    const t = s + v;
    c += lost(s, v, t);
    s = t;
  }
  setLane(lane, s, c);
}

/**
 * The present (non-NaN) values of two columns of n values (b may be 0: none), copied in row order to
 * scratchA and scratchB, and their moments, each sum compensated (Neumaier): the mean (a first mean
 * corrected by the mean deviation from it), the variance (divisor count − 1, corrected for the
 * deviations' sum), and the second, third and fourth central moments (divisor count) about the mean.
 * The two columns' sums run in the two lanes of one vector while both have values, then on their own;
 * each sum is the same sequence of operations as for one column alone. Writes, per column, eight
 * doubles (a's at out, b's at out + 64): status (−1 done, −2 below two values, else the index among
 * the present values of the first infinite one), count, mean, variance, m2, m3, m4, the infinite value.
 */
export function describePair(a: usize, b: usize, n: i32, scratchA: usize, scratchB: usize, out: usize): void {
  const na = compact(a, n, scratchA);
  const nb = b == 0 ? 0 : compact(b, n, scratchB);
  const both = min(na, nb);
  const outB = out + 64;
  store<f64>(out, na, 8);
  store<f64>(outB, nb, 8);
  store<f64>(out, na < 2 ? -2 : firstInfinite(scratchA, na, out));
  store<f64>(outB, nb < 2 ? -2 : firstInfinite(scratchB, nb, outB));
  // Pass 1: the sums (deviations from 0); pass 2: the deviations from the first means.
  pairSums(scratchA, scratchB, both, 0, 0);
  sumTail(scratchA, both, na, 0, 0);
  sumTail(scratchB, both, nb, 0, 1);
  const firstA = (laneSum(0) + laneComp(0)) / <f64>na;
  const firstB = (laneSum(1) + laneComp(1)) / <f64>nb;
  pairSums(scratchA, scratchB, both, firstA, firstB);
  sumTail(scratchA, both, na, firstA, 0);
  sumTail(scratchB, both, nb, firstB, 1);
  const meanA = firstA + (laneSum(0) + laneComp(0)) / <f64>na;
  const meanB = firstB + (laneSum(1) + laneComp(1)) / <f64>nb;
  // Pass 3: the deviations from the means, and their squares, cubes and fourth powers.
  const m = pair(meanA, meanB);
  let ds = f64x2.splat(0);
  let dc = f64x2.splat(0);
  let s2 = f64x2.splat(0);
  let c2 = f64x2.splat(0);
  let s3 = f64x2.splat(0);
  let c3 = f64x2.splat(0);
  let s4 = f64x2.splat(0);
  let c4 = f64x2.splat(0);
  for (let i = 0; i < both; i++) {
    const d = f64x2.sub(pair(load<f64>(scratchA + (<usize>i << 3)), load<f64>(scratchB + (<usize>i << 3))), m);
    const d2 = f64x2.mul(d, d);
    const d3 = f64x2.mul(d2, d);
    const d4 = f64x2.mul(d2, d2);
    const t = f64x2.add(ds, d);
    dc = f64x2.add(dc, lost2(ds, d, t));
    ds = t;
    const t2 = f64x2.add(s2, d2);
    c2 = f64x2.add(c2, lost2(s2, d2, t2));
    s2 = t2;
    const t3 = f64x2.add(s3, d3);
    c3 = f64x2.add(c3, lost2(s3, d3, t3));
    s3 = t3;
    const t4 = f64x2.add(s4, d4);
    c4 = f64x2.add(c4, lost2(s4, d4, t4));
    s4 = t4;
  }
  centralTail(scratchA, both, na, meanA, ds, dc, s2, c2, s3, c3, s4, c4, 0, out);
  centralTail(scratchB, both, nb, meanB, ds, dc, s2, c2, s3, c3, s4, c4, 1, outB);
}

/**
 * Pass 3 of describePair for one column: its lane of the vector sums, continued over values
 * [from, count) alone; writes mean, variance, m2, m3, m4 to out[2..6].
 */
function centralTail(
  values: usize,
  from: i32,
  count: i32,
  m: f64,
  dsv: v128,
  dcv: v128,
  s2v: v128,
  c2v: v128,
  s3v: v128,
  c3v: v128,
  s4v: v128,
  c4v: v128,
  lane: i32,
  out: usize,
): void {
  let ds = lane == 0 ? f64x2.extract_lane(dsv, 0) : f64x2.extract_lane(dsv, 1);
  let dc = lane == 0 ? f64x2.extract_lane(dcv, 0) : f64x2.extract_lane(dcv, 1);
  let s2 = lane == 0 ? f64x2.extract_lane(s2v, 0) : f64x2.extract_lane(s2v, 1);
  let c2 = lane == 0 ? f64x2.extract_lane(c2v, 0) : f64x2.extract_lane(c2v, 1);
  let s3 = lane == 0 ? f64x2.extract_lane(s3v, 0) : f64x2.extract_lane(s3v, 1);
  let c3 = lane == 0 ? f64x2.extract_lane(c3v, 0) : f64x2.extract_lane(c3v, 1);
  let s4 = lane == 0 ? f64x2.extract_lane(s4v, 0) : f64x2.extract_lane(s4v, 1);
  let c4 = lane == 0 ? f64x2.extract_lane(c4v, 0) : f64x2.extract_lane(c4v, 1);
  for (let i = from; i < count; i++) {
    const d = load<f64>(values + (<usize>i << 3)) - m;
    const d2 = d * d;
    const d3 = d2 * d;
    const d4 = d2 * d2;
    const t = ds + d;
    dc += lost(ds, d, t);
    ds = t;
    const t2 = s2 + d2;
    c2 += lost(s2, d2, t2);
    s2 = t2;
    const t3 = s3 + d3;
    c3 += lost(s3, d3, t3);
    s3 = t3;
    const t4 = s4 + d4;
    c4 += lost(s4, d4, t4);
    s4 = t4;
  }
  const c = <f64>count;
  const s = ds + dc;
  store<f64>(out, m, 16);
  store<f64>(out, max<f64>(0, (s2 + c2 - (s * s) / c) / (c - 1)), 24);
  store<f64>(out, (s2 + c2) / c, 32);
  store<f64>(out, (s3 + c3) / c, 40);
  store<f64>(out, (s4 + c4) / c, 48);
}

/** How many of a column's n values lie within `tolerance` of `value` (a NaN never does). */
export function countNear(col: usize, n: i32, value: f64, tolerance: f64): i32 {
  let count = 0;
  for (let i = 0; i < n; i++) {
    if (abs(load<f64>(col + (<usize>i << 3)) - value) <= tolerance) count++;
  }
  return count;
}

// ---------------------------------------------------------------------------------------------------
// Symmetric eigendecomposition: tred2 and tql2 in the form of the public-domain JAMA package, on V
// stored by columns (v[c·n + r] is V at row r, column c), as app/engine/symmetric-eigen.ts documents.

// @ts-ignore: decorator
@inline
function at(p: usize, i: i32): usize {
  return p + (<usize>i << 3);
}

// @ts-ignore: decorator
@inline
function get(p: usize, i: i32): f64 {
  return load<f64>(p + (<usize>i << 3));
}

// @ts-ignore: decorator
@inline
function put(p: usize, i: i32, x: f64): void {
  store<f64>(p + (<usize>i << 3), x);
}

/** √(a² + b²) as the JAMA form computes it. */
function hypotenuse(a: f64, b: f64): f64 {
  if (abs(a) > abs(b)) {
    const r = b / a;
    return abs(a) * sqrt(1 + r * r);
  }
  if (b != 0) {
    const r = a / b;
    return abs(b) * sqrt(1 + r * r);
  }
  return 0;
}

/**
 * Eigenvalues (ascending, into d) and eigenvectors (the rows of v: row c is the eigenvector of d[c])
 * of the symmetric n × n matrix given in v, stored by columns. e is n doubles of work space.
 */
export function symmetricEigen(n: i32, v: usize, d: usize, e: usize): void {
  householder(n, e, d, v);
  implicitQl(n, e, d, v);
}

function householder(n: i32, e: usize, d: usize, v: usize): void {
  for (let j = 0; j < n; j++) put(d, j, get(v, j * n + n - 1));
  for (let i = n - 1; i > 0; i--) {
    let scale: f64 = 0;
    let h: f64 = 0;
    for (let k = 0; k < i; k++) scale = scale + abs(get(d, k));
    if (scale == 0) {
      put(e, i, get(d, i - 1));
      for (let j = 0; j < i; j++) {
        put(d, j, get(v, j * n + i - 1));
        put(v, j * n + i, 0);
        put(v, i * n + j, 0);
      }
    } else {
      for (let k = 0; k < i; k++) {
        put(d, k, get(d, k) / scale);
        h += get(d, k) * get(d, k);
      }
      let f = get(d, i - 1);
      let g = sqrt(h);
      if (f > 0) g = -g;
      put(e, i, scale * g);
      h = h - f * g;
      put(d, i - 1, f - g);
      for (let j = 0; j < i; j++) put(e, j, 0);
      for (let j = 0; j < i; j++) {
        f = get(d, j);
        put(v, i * n + j, f);
        g = get(e, j) + get(v, j * n + j) * f;
        for (let k = j + 1; k <= i - 1; k++) {
          g += get(v, j * n + k) * get(d, k);
          put(e, k, get(e, k) + get(v, j * n + k) * f);
        }
        put(e, j, g);
      }
      f = 0;
      for (let j = 0; j < i; j++) {
        put(e, j, get(e, j) / h);
        f += get(e, j) * get(d, j);
      }
      const hh = f / (h + h);
      for (let j = 0; j < i; j++) put(e, j, get(e, j) - hh * get(d, j));
      for (let j = 0; j < i; j++) {
        f = get(d, j);
        g = get(e, j);
        for (let k = j; k <= i - 1; k++) {
          put(v, j * n + k, get(v, j * n + k) - (f * get(e, k) + g * get(d, k)));
        }
        put(d, j, get(v, j * n + i - 1));
        put(v, j * n + i, 0);
      }
    }
    put(d, i, h);
  }
  for (let i = 0; i < n - 1; i++) {
    put(v, i * n + n - 1, get(v, i * n + i));
    put(v, i * n + i, 1);
    const h = get(d, i + 1);
    if (h != 0) {
      for (let k = 0; k <= i; k++) put(d, k, get(v, (i + 1) * n + k) / h);
      for (let j = 0; j <= i; j++) {
        let g: f64 = 0;
        for (let k = 0; k <= i; k++) g += get(v, (i + 1) * n + k) * get(v, j * n + k);
        for (let k = 0; k <= i; k++) put(v, j * n + k, get(v, j * n + k) - g * get(d, k));
      }
    }
    for (let k = 0; k <= i; k++) put(v, (i + 1) * n + k, 0);
  }
  for (let j = 0; j < n; j++) {
    put(d, j, get(v, j * n + n - 1));
    put(v, j * n + n - 1, 0);
  }
  put(v, (n - 1) * n + n - 1, 1);
  put(e, 0, 0);
}

function implicitQl(n: i32, e: usize, d: usize, v: usize): void {
  for (let i = 1; i < n; i++) put(e, i - 1, get(e, i));
  put(e, n - 1, 0);
  let f: f64 = 0;
  let tst1: f64 = 0;
  const eps = f64.EPSILON;
  for (let l = 0; l < n; l++) {
    tst1 = max<f64>(tst1, abs(get(d, l)) + abs(get(e, l)));
    let m = l;
    while (m < n) {
      if (abs(get(e, m)) <= eps * tst1) break;
      m++;
    }
    if (m > l) {
      do {
        let g = get(d, l);
        let p = (get(d, l + 1) - g) / (2 * get(e, l));
        let r = hypotenuse(p, 1);
        if (p < 0) r = -r;
        put(d, l, get(e, l) / (p + r));
        put(d, l + 1, get(e, l) * (p + r));
        const dl1 = get(d, l + 1);
        let h = g - get(d, l);
        for (let i = l + 2; i < n; i++) put(d, i, get(d, i) - h);
        f = f + h;
        p = get(d, m);
        let c: f64 = 1;
        let c2 = c;
        let c3 = c;
        const el1 = get(e, l + 1);
        let s: f64 = 0;
        let s2: f64 = 0;
        for (let i = m - 1; i >= l; i--) {
          c3 = c2;
          c2 = c;
          s2 = s;
          g = c * get(e, i);
          h = c * p;
          r = hypotenuse(p, get(e, i));
          put(e, i + 1, s * r);
          s = get(e, i) / r;
          c = p / r;
          p = c * get(d, i) - s * g;
          put(d, i + 1, h + s * (c * g + s * get(d, i)));
          const upper = at(v, (i + 1) * n);
          const lower = at(v, i * n);
          for (let k = 0; k < n; k++) {
            h = get(upper, k);
            put(upper, k, s * get(lower, k) + c * h);
            put(lower, k, c * get(lower, k) - s * h);
          }
        }
        p = (-s * s2 * c3 * el1 * get(e, l)) / dl1;
        put(e, l, s * p);
        put(d, l, c * p);
      } while (abs(get(e, l)) > eps * tst1);
    }
    put(d, l, get(d, l) + f);
    put(e, l, 0);
  }
  for (let i = 0; i < n - 1; i++) {
    let k = i;
    let p = get(d, i);
    for (let j = i + 1; j < n; j++) {
      if (get(d, j) < p) {
        k = j;
        p = get(d, j);
      }
    }
    if (k != i) {
      put(d, k, get(d, i));
      put(d, i, p);
      for (let j = 0; j < n; j++) {
        p = get(v, i * n + j);
        put(v, i * n + j, get(v, k * n + j));
        put(v, k * n + j, p);
      }
    }
  }
}

// ---------------------------------------------------------------------------------------------------
// LU factors with partial pivoting (the left-looking Doolittle/Crout form of the JAMA package), as
// app/engine/lu.ts documents.

/**
 * Factors the n × n row-major matrix in lu, in place: L (unit lower, below the diagonal) and U;
 * pivot (n i32) receives the row order. column is n doubles of work space.
 */
export function luFactor(n: i32, lu: usize, pivot: usize, column: usize): void {
  for (let i = 0; i < n; i++) store<i32>(pivot + (<usize>i << 2), i);
  for (let j = 0; j < n; j++) {
    for (let i = 0; i < n; i++) put(column, i, get(lu, i * n + j));
    for (let i = 0; i < n; i++) {
      const kmax = min(i, j);
      let s: f64 = 0;
      for (let k = 0; k < kmax; k++) s += get(lu, i * n + k) * get(column, k);
      put(column, i, get(column, i) - s);
      put(lu, i * n + j, get(column, i));
    }
    let p = j;
    for (let i = j + 1; i < n; i++) if (abs(get(column, i)) > abs(get(column, p))) p = i;
    if (p != j) {
      for (let k = 0; k < n; k++) {
        const t = get(lu, p * n + k);
        put(lu, p * n + k, get(lu, j * n + k));
        put(lu, j * n + k, t);
      }
      const a = pivot + (<usize>p << 2);
      const b = pivot + (<usize>j << 2);
      const v = load<i32>(a);
      store<i32>(a, load<i32>(b));
      store<i32>(b, v);
    }
    const diagonal = get(lu, j * n + j);
    if (diagonal != 0) for (let i = j + 1; i < n; i++) put(lu, i * n + j, get(lu, i * n + j) / diagonal);
  }
}

/** Solves with the factors for the n × m row-major right-hand side x, already in pivot order, in place. */
export function luSolve(n: i32, m: i32, lu: usize, x: usize): void {
  for (let k = 0; k < n; k++) {
    for (let i = k + 1; i < n; i++) {
      const l = get(lu, i * n + k);
      for (let j = 0; j < m; j++) put(x, i * m + j, get(x, i * m + j) - get(x, k * m + j) * l);
    }
  }
  for (let k = n - 1; k >= 0; k--) {
    const u = get(lu, k * n + k);
    for (let j = 0; j < m; j++) put(x, k * m + j, get(x, k * m + j) / u);
    for (let i = 0; i < k; i++) {
      const l = get(lu, i * n + k);
      for (let j = 0; j < m; j++) put(x, i * m + j, get(x, i * m + j) - get(x, k * m + j) * l);
    }
  }
}

// ---------------------------------------------------------------------------------------------------
// Plain-text records: the reader's line splitting and the command line's reading of single-digit
// answers (app/import/stream-dataset.ts and app/cli/stats/item-columns.ts say what the records mean).

const LINE_FEED: i32 = 10;
const DIGIT_ZERO: i32 = 48;
const DIGIT_NINE: i32 = 57;
/** The digits entry of a field without bytes, and of a field neither empty nor a single digit. */
const FIELD_EMPTY: i8 = -2;
const FIELD_OTHER: i8 = -1;

// @ts-ignore: decorator
@inline
function trimmed(c: i32): bool {
  return c == 0x09 || c == 0x0b || c == 0x0c || c == 0x20;
}

/**
 * Splits the lines of bytes[0, len), from `from`, into records slot, slot + 1, … of starts (width + 1
 * byte offsets each) and digits (width entries each: the single digit, FIELD_EMPTY or FIELD_OTHER):
 * each line feed ends a record, each delimiter a field; a last line without a line feed counts only
 * when `final`. A field that is one digit followed by the delimiter or the line end is taken in one
 * step, any other byte by byte. Goes on while the lines are plain data records (`width` fields, not all
 * blank) and fewer than `capacity` records are filled; returns how many it split. In out (i32): [0]
 * the offset of the first line not counted; [3] 1 when that line is complete but not a plain data
 * record, 0 when it is unfinished or there is none or no room. With [3] = 1 the line is split into the
 * next record all the same, [1] holds its field count (negated when all fields are blank) and [2] the
 * offset after its line feed.
 */
export function splitLines(
  bytes: usize,
  from: i32,
  len: i32,
  final: bool,
  delimiter: i32,
  width: i32,
  slot: i32,
  capacity: i32,
  starts: usize,
  digits: usize,
  out: usize,
): i32 {
  let line = from;
  let count = 0;
  while (slot + count < capacity && line < len) {
    const row = slot + count;
    const base = starts + ((<usize>row * <usize>(width + 1)) << 2);
    const digitBase = digits + <usize>row * <usize>width;
    let p = line;
    let fields = 0;
    let content = false;
    let end = -1;
    for (;;) {
      if (fields <= width) store<i32>(base + (<usize>fields << 2), p);
      const b: i32 = p < len ? <i32>load<u8>(bytes + <usize>p) : -1;
      const next: i32 = p + 1 < len ? <i32>load<u8>(bytes + <usize>p + 1) : -1;
      if (b >= DIGIT_ZERO && b <= DIGIT_NINE && b != delimiter) {
        // One digit and then the field's end: taken in one step, its end read once.
        if (next == delimiter) {
          if (fields < width) store<i8>(digitBase + <usize>fields, <i8>(b - DIGIT_ZERO));
          content = true;
          fields++;
          p += 2;
          continue;
        }
        if (next == LINE_FEED || (next < 0 && final)) {
          if (fields < width) store<i8>(digitBase + <usize>fields, <i8>(b - DIGIT_ZERO));
          content = true;
          fields++;
          end = p + 1;
          break;
        }
      }
      let q = p;
      for (; q < len; q++) {
        const c = <i32>load<u8>(bytes + <usize>q);
        if (c == delimiter || c == LINE_FEED) break;
        if (!content && !trimmed(c)) content = true;
      }
      if (fields < width) store<i8>(digitBase + <usize>fields, q == p ? FIELD_EMPTY : FIELD_OTHER);
      fields++;
      if (q >= len) {
        if (final) end = len;
        break;
      }
      if (<i32>load<u8>(bytes + <usize>q) == LINE_FEED) {
        end = q;
        break;
      }
      p = q + 1;
    }
    if (end < 0) break;
    if (fields != width || !content) {
      store<i32>(out, content ? fields : -fields, 4);
      store<i32>(out, end + 1, 8);
      store<i32>(out, 1, 12);
      store<i32>(out, line);
      return count;
    }
    store<i32>(base + (<usize>width << 2), end + 1);
    count++;
    line = end + 1;
  }
  store<i32>(out, 0, 12);
  store<i32>(out, min(line, len));
  return count;
}

/**
 * Reads the single-digit answers of n records (digits as splitLines writes them, `width` per record)
 * for k items (the header index of item j in columns[j]) into values, item j's n values from
 * values + j·capacity·8: a digit d whose reading is known (known[d] = 1) is table[d] (NaN for a
 * missing answer), an empty field is NaN. Every other cell is left NaN and listed, in record order and
 * item order within a record, as (record, item) in slow. Returns how many are listed.
 */
export function gatherDigits(
  digits: usize,
  n: i32,
  width: i32,
  columns: usize,
  k: i32,
  table: usize,
  known: usize,
  capacity: i32,
  values: usize,
  slow: usize,
): i32 {
  let listed = 0;
  for (let i = 0; i < n; i++) {
    const record = digits + <usize>i * <usize>width;
    for (let j = 0; j < k; j++) {
      const d = <i32>load<i8>(record + <usize>load<i32>(columns + (<usize>j << 2)));
      let v: f64 = NaN;
      if (d >= 0 && load<u8>(known + <usize>d) == 1) {
        v = load<f64>(table + (<usize>d << 3));
      } else if (d != FIELD_EMPTY) {
        store<i32>(slow + (<usize>listed << 3), i);
        store<i32>(slow + (<usize>listed << 3), j, 4);
        listed++;
      }
      store<f64>(values + ((<usize>j * <usize>capacity + <usize>i) << 3), v);
    }
  }
  return listed;
}

// ---------------------------------------------------------------------------------------------------
// Answers by item (app/engine/responses.ts)

/**
 * One item's answers col[0, n) (NaN for a missing one): adds 1 to answered[r] (i32) for each answer
 * given. Returns the row of the first infinite value, else −(missing + 1).
 */
export function tallyColumn(col: usize, n: i32, answered: usize): i32 {
  let missing = 0;
  let infinite = false;
  for (let r = 0; r < n; r++) {
    const v = load<f64>(col + (<usize>r << 3));
    const present = i32(v == v);
    infinite |= v - v != 0 && v == v;
    const a = answered + (<usize>r << 2);
    store<i32>(a, load<i32>(a) + present);
    missing += 1 - present;
  }
  if (infinite) {
    for (let r = 0; r < n; r++) {
      const v = load<f64>(col + (<usize>r << 3));
      if (v - v != 0 && v == v) return r;
    }
  }
  return -(missing + 1);
}
