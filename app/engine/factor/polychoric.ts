import { EngineError } from '../errors.ts';
import { normalCdf, normalQuantile } from '../distributions.ts';
import { smoothToPositiveDefinite, isPositiveDefinite } from '../dense.ts';

/** Most distinct values an item may have to be treated as ordinal. */
export const MAX_CATEGORIES = 10;
/** ρ is searched in [−RHO_LIMIT, RHO_LIMIT]. */
export const RHO_LIMIT = 0.9999;
/** Golden-section steps for ρ (the bracket shrinks by 0.618 per step: 1e-12 after about 60). */
const GOLDEN_STEPS = 64;

/** Gauss–Legendre nodes and weights on [−1, 1] by Newton's method on Pₙ (Golub & Welsch give the same). */
function gaussLegendre(n: number): { x: number[]; w: number[] } {
  const x: number[] = [];
  const w: number[] = [];
  for (let i = 1; i <= n; i++) {
    let z = Math.cos((Math.PI * (i - 0.25)) / (n + 0.5));
    let dp = 0;
    for (let it = 0; it < 100; it++) {
      let p0 = 1;
      let p1 = z;
      for (let k = 2; k <= n; k++) {
        const p2 = ((2 * k - 1) * z * p1 - (k - 1) * p0) / k;
        p0 = p1;
        p1 = p2;
      }
      dp = (n * (z * p1 - p0)) / (z * z - 1);
      const dz = p1 / dp;
      z -= dz;
      if (Math.abs(dz) < 1e-16) break;
    }
    x.push(z);
    w.push(2 / ((1 - z * z) * dp * dp));
  }
  return { x, w };
}

const GL6 = gaussLegendre(6);
const GL12 = gaussLegendre(12);
const GL20 = gaussLegendre(20);

/**
 * Upper bivariate normal probability P(X > h, Y > k) with correlation r, by Drezner & Wesolowsky's
 * (1990) Gauss–Legendre method with Genz's (2004) refinements for |r| ≥ 0.925 ("Numerical computation of
 * rectangular bivariate and trivariate normal and t probabilities", Statistics and Computing 14,
 * 251–260; registry id `polychoric.bivariate-normal`). Absolute error about 1e-15.
 */
function upperBivariateNormal(h: number, k: number, r: number): number {
  const twoPi = 2 * Math.PI;
  const gl = Math.abs(r) < 0.3 ? GL6 : Math.abs(r) < 0.75 ? GL12 : GL20;
  let hk = h * k;
  let bvn = 0;
  if (Math.abs(r) < 0.925) {
    const hs = (h * h + k * k) / 2;
    const asr = Math.asin(r);
    for (let i = 0; i < gl.x.length; i++) {
      const sn = Math.sin((asr * (gl.x[i] + 1)) / 2);
      bvn += gl.w[i] * Math.exp((sn * hk - hs) / (1 - sn * sn));
    }
    // The nodes are symmetric on [−1, 1], so one pass covers both halves of the [0, asr] integral.
    return Math.min(1, Math.max(0, (bvn * asr) / (2 * twoPi) + normalCdf(-h) * normalCdf(-k)));
  }
  let kk = k;
  if (r < 0) {
    kk = -k;
    hk = -hk;
  }
  if (Math.abs(r) < 1) {
    const as = (1 - r) * (1 + r);
    let a = Math.sqrt(as);
    const bs = (h - kk) ** 2;
    const c = (4 - hk) / 8;
    const d = (12 - hk) / 16;
    let asr = -(bs / as + hk) / 2;
    if (asr > -100)
      bvn = a * Math.exp(asr) * (1 - (c * (bs - as) * (1 - (d * bs) / 5)) / 3 + (c * d * as * as) / 5);
    if (-hk < 100) {
      const b = Math.sqrt(bs);
      bvn -=
        Math.exp(-hk / 2) *
        Math.sqrt(twoPi) *
        normalCdf(-b / a) *
        b *
        (1 - (c * bs * (1 - (d * bs) / 5)) / 3);
    }
    a /= 2;
    for (let i = 0; i < gl.x.length; i++) {
      const xs = (a * (gl.x[i] + 1)) ** 2;
      const rs = Math.sqrt(1 - xs);
      asr = -(bs / xs + hk) / 2;
      if (asr > -100) {
        bvn +=
          a *
          gl.w[i] *
          Math.exp(asr) *
          (Math.exp((-hk * xs) / (2 * (1 + rs) ** 2)) / rs - (1 + c * xs * (1 + d * xs)));
      }
    }
    bvn = -bvn / twoPi;
  }
  if (r > 0) bvn += normalCdf(-Math.max(h, kk));
  else {
    bvn = -bvn;
    if (kk > h) bvn += normalCdf(kk) - normalCdf(h);
  }
  return Math.min(1, Math.max(0, bvn));
}

/**
 * Bivariate standard normal CDF P(X ≤ x, Y ≤ y) with correlation r (registry id
 * `polychoric.bivariate-normal`); infinite limits allowed.
 *
 * Cost: O(1) (at most 20 Gauss–Legendre nodes). Throws EngineError for |r| > 1 or a NaN argument.
 *
 * @example bivariateNormalCdf(0, 0, 0.5) // 1/3
 */
export function bivariateNormalCdf(x: number, y: number, r: number): number {
  if (Number.isNaN(x) || Number.isNaN(y) || !(Math.abs(r) <= 1)) {
    throw new EngineError(`bivariate normal CDF needs numbers and |r| ≤ 1, got (${x}, ${y}, ${r})`);
  }
  if (x === Number.NEGATIVE_INFINITY || y === Number.NEGATIVE_INFINITY) return 0;
  if (x === Number.POSITIVE_INFINITY) return normalCdf(y);
  if (y === Number.POSITIVE_INFINITY) return normalCdf(x);
  return upperBivariateNormal(-x, -y, r);
}

/** Thresholds of one ordinal item: Φ⁻¹ of its cumulative category proportions. */
export interface OrdinalItem {
  /** The distinct values observed, ascending. */
  categories: number[];
  /** categories.length − 1 thresholds, ascending. */
  thresholds: number[];
}

function codeItem(values: (number | null)[], name: string): { codes: Int32Array; item: OrdinalItem } {
  const distinct = [...new Set(values.filter((v): v is number => v !== null))].sort((a, b) => a - b);
  if (distinct.length < 2) {
    throw new EngineError(
      `polychoric correlations need at least two answer categories; item "${name}" has ${distinct.length}`,
      'zero-variance',
    );
  }
  if (distinct.length > MAX_CATEGORIES) {
    throw new EngineError(
      `item "${name}" has ${distinct.length} distinct values; polychoric correlations are for ordinal items with at most ${MAX_CATEGORIES} categories`,
    );
  }
  const index = new Map(distinct.map((v, i) => [v, i]));
  const codes = Int32Array.from(values, (v) => (v === null ? -1 : (index.get(v) as number)));
  const counts = new Array<number>(distinct.length).fill(0);
  for (const c of codes) if (c >= 0) counts[c]++;
  const total = counts.reduce((a, b) => a + b, 0);
  const thresholds: number[] = [];
  let cum = 0;
  for (let c = 0; c < distinct.length - 1; c++) {
    cum += counts[c];
    thresholds.push(normalQuantile(cum / total));
  }
  return { codes, item: { categories: distinct, thresholds } };
}

/**
 * Log-likelihood of a contingency table under a bivariate normal with thresholds a (rows), b (columns)
 * and correlation ρ: Σ nᵢⱼ ln πᵢⱼ(ρ).
 */
function tableLogLikelihood(table: number[][], a: number[], b: number[], rho: number): number {
  const ra = [Number.NEGATIVE_INFINITY, ...a, Number.POSITIVE_INFINITY];
  const cb = [Number.NEGATIVE_INFINITY, ...b, Number.POSITIVE_INFINITY];
  const cdf: number[][] = ra.map((x) => cb.map((y) => bivariateNormalCdf(x, y, rho)));
  let ll = 0;
  for (let i = 0; i < table.length; i++) {
    for (let j = 0; j < table[i].length; j++) {
      const n = table[i][j];
      if (n === 0) continue;
      const pi = cdf[i + 1][j + 1] - cdf[i][j + 1] - cdf[i + 1][j] + cdf[i][j];
      ll += n * Math.log(Math.max(pi, 1e-300));
    }
  }
  return ll;
}

/**
 * Polychoric correlation of one contingency table by the two-step method: thresholds fixed at
 * Φ⁻¹ of the marginal cumulative proportions, then ρ maximising the bivariate-normal likelihood
 * (Olsson 1979; registry id `polychoric.two-step`), by golden-section search on [−0.9999, 0.9999].
 *
 * Cost: O(steps·r·c) bivariate-normal evaluations. Throws EngineError for a table with an empty margin.
 *
 * @example polychoricFromTable([[40, 10], [10, 40]]).rho // ≈ 0.81
 */
export function polychoricFromTable(table: number[][]): {
  rho: number;
  rowThresholds: number[];
  columnThresholds: number[];
} {
  const rows = table.length;
  const cols = table[0]?.length ?? 0;
  const rowSums = table.map((row) => row.reduce((s, v) => s + v, 0));
  const colSums = Array.from({ length: cols }, (_, j) => table.reduce((s, row) => s + row[j], 0));
  const total = rowSums.reduce((s, v) => s + v, 0);
  if (rows < 2 || cols < 2 || rowSums.some((v) => v === 0) || colSums.some((v) => v === 0)) {
    throw new EngineError('a polychoric table needs at least two non-empty categories on each side');
  }
  const cumThresholds = (sums: number[]) => {
    let cum = 0;
    return sums.slice(0, -1).map((v) => {
      cum += v;
      return normalQuantile(cum / total);
    });
  };
  const a = cumThresholds(rowSums);
  const b = cumThresholds(colSums);
  return { rho: maximizeRho(table, a, b), rowThresholds: a, columnThresholds: b };
}

function maximizeRho(table: number[][], a: number[], b: number[]): number {
  const golden = (Math.sqrt(5) - 1) / 2;
  let lo = -RHO_LIMIT;
  let hi = RHO_LIMIT;
  let x1 = hi - golden * (hi - lo);
  let x2 = lo + golden * (hi - lo);
  let f1 = tableLogLikelihood(table, a, b, x1);
  let f2 = tableLogLikelihood(table, a, b, x2);
  for (let step = 0; step < GOLDEN_STEPS; step++) {
    if (f1 > f2) {
      hi = x2;
      x2 = x1;
      f2 = f1;
      x1 = hi - golden * (hi - lo);
      f1 = tableLogLikelihood(table, a, b, x1);
    } else {
      lo = x1;
      x1 = x2;
      f1 = f2;
      x2 = lo + golden * (hi - lo);
      f2 = tableLogLikelihood(table, a, b, x2);
    }
  }
  return (lo + hi) / 2;
}

export interface PolychoricMatrix {
  items: string[];
  /** The matrix to analyse: positive definite (smoothed when the pairwise estimates were not). */
  matrix: number[][];
  /** The pairwise estimates before any smoothing. */
  raw: number[][];
  smoothed: boolean;
  thresholds: number[][];
  categories: number[][];
  /** Respondents behind each pair. */
  pairN: number[][];
  warnings: string[];
}

/**
 * Polychoric correlation matrix of ordinal items (Olsson 1979, two-step; registry id
 * `polychoric.two-step`): each item's thresholds from all its answers, each pair's ρ from the
 * respondents who answered both (with complete data this is the same as listwise). A pairwise matrix that
 * is not positive definite is smoothed by eigenvalue clipping (registry id `linalg.smoothing`) and the
 * smoothing reported; a pair whose estimate sits at ±0.9999 is reported as a likely empty-cell boundary.
 *
 * Cost: O(n·p²) to tabulate plus O(p²·steps·c²) bivariate-normal evaluations. Throws EngineError for an
 * item with one category or more than MAX_CATEGORIES values, a pair sharing fewer than two
 * respondents, or shouldStop() (code `cancelled`).
 *
 * @example polychoricMatrix(['a', 'b'], rows).matrix[0][1]
 */
export function polychoricMatrix(
  items: string[],
  data: (number | null)[][],
  control: { onProgress?: (done: number, total: number) => void; shouldStop?: () => boolean } = {},
): PolychoricMatrix {
  const p = items.length;
  if (p < 2) throw new EngineError('polychoric correlations need at least two items', 'too-few-items');
  const coded = items.map((name, j) =>
    codeItem(
      data.map((row) => row[j]),
      name,
    ),
  );
  const raw: number[][] = Array.from({ length: p }, (_, i) =>
    Array.from({ length: p }, (_, j) => (i === j ? 1 : 0)),
  );
  const pairN: number[][] = Array.from({ length: p }, () => new Array<number>(p).fill(0));
  const warnings: string[] = [];
  const total = (p * (p - 1)) / 2;
  let done = 0;
  for (let i = 0; i < p; i++) {
    const ci = coded[i];
    pairN[i][i] = ci.codes.filter((c) => c >= 0).length;
    for (let j = 0; j < i; j++) {
      if (control.shouldStop?.())
        throw new EngineError('polychoric correlations were cancelled', 'cancelled');
      const cj = coded[j];
      const table = ci.item.categories.map(() => new Array<number>(cj.item.categories.length).fill(0));
      let n = 0;
      for (let r = 0; r < data.length; r++) {
        const a = ci.codes[r];
        const b = cj.codes[r];
        if (a < 0 || b < 0) continue;
        table[a][b]++;
        n++;
      }
      if (n < 2)
        throw new EngineError(
          `items "${items[j]}" and "${items[i]}" share ${n} respondents; polychoric needs at least two`,
        );
      const rho = maximizeRho(table, ci.item.thresholds, cj.item.thresholds);
      if (Math.abs(rho) > RHO_LIMIT - 1e-6) {
        warnings.push(
          `items "${items[j]}" and "${items[i]}": the polychoric estimate reached the boundary ±${RHO_LIMIT} (empty cells)`,
        );
      }
      raw[i][j] = rho;
      raw[j][i] = rho;
      pairN[i][j] = n;
      pairN[j][i] = n;
      control.onProgress?.(++done, total);
    }
  }
  let matrix = raw.map((row) => row.slice());
  let smoothed = false;
  if (!isPositiveDefinite(raw)) {
    ({ matrix, smoothed } = smoothToPositiveDefinite(raw));
    let largest = 0;
    for (let i = 0; i < p; i++)
      for (let j = 0; j < p; j++) largest = Math.max(largest, Math.abs(matrix[i][j] - raw[i][j]));
    warnings.push(
      `the polychoric matrix was not positive definite and was smoothed (largest change ${largest.toFixed(4)})`,
    );
  }
  return {
    items,
    matrix,
    raw,
    smoothed,
    thresholds: coded.map((c) => c.item.thresholds),
    categories: coded.map((c) => c.item.categories),
    pairN,
    warnings,
  };
}
