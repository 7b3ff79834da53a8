import { EngineError } from '../errors.ts';
import { symmetricEigen } from '../linalg.ts';
import { createRng, type Rng } from '../rng.ts';
import { checkCorrelationMatrix } from './common.ts';
import { symmetricEigenvalues } from './eigenvalues.ts';

/**
 * Number of eigenvalues above 1 (Kaiser 1960; registry id `efa.kaiser`), eigenvalues in any order.
 *
 * Cost: O(p). Throws nothing.
 *
 * @example kaiserCount([2.1, 1.3, 0.9, 0.7]) // 2
 */
export function kaiserCount(eigenvalues: readonly number[]): number {
  return eigenvalues.filter((v) => v > 1).length;
}

export interface MinimumAveragePartial {
  /** Average squared partial correlation after removing 0, 1, … p − 2 components (index = m). */
  squared: number[];
  /** The same with 4th powers (O'Connor 2000). */
  fourth: number[];
  /** m with the smallest average (0 is a possible answer). */
  suggestedSquared: number;
  suggestedFourth: number;
}

/**
 * Velicer's (1976) minimum average partial test (registry id `efa.map`), with O'Connor's (2000)
 * 4th-power variant (registry id `efa.map-fourth`): for m = 0 … p − 2, partial the first m principal
 * components out of R (C = R − AₘAₘᵀ, Aₘ = Vₘ·√Λₘ), rescale C to partial correlations and average
 * their squared (or 4th-power) off-diagonal entries; the suggested number of components is the m with
 * the smallest average. m = 0 averages the observed correlations themselves.
 *
 * Cost: O(p³) for the eigendecomposition plus O(p⁴) for the p − 1 partial matrices. Throws
 * EngineError for a matrix that is not a correlation matrix or has fewer than three items.
 *
 * @example minimumAveragePartial(r).suggestedSquared
 */
export function minimumAveragePartial(r: number[][]): MinimumAveragePartial {
  const p = checkCorrelationMatrix(r, 'minimum average partial test');
  if (p < 3)
    throw new EngineError('the minimum average partial test requires at least three items', 'too-few-items');
  const { values, vectors } = symmetricEigen(r);
  const squared: number[] = [];
  const fourth: number[] = [];
  const c = r.map((row) => row.slice());
  const pairs = p * (p - 1);
  for (let m = 0; m <= p - 2; m++) {
    if (m > 0) {
      const lambda = Math.max(values[m - 1], 0);
      for (let i = 0; i < p; i++) {
        const ai = vectors[i][m - 1] * Math.sqrt(lambda);
        for (let j = 0; j < p; j++) c[i][j] -= ai * vectors[j][m - 1] * Math.sqrt(lambda);
      }
    }
    let s2 = 0;
    let s4 = 0;
    for (let i = 0; i < p; i++) {
      for (let j = 0; j < p; j++) {
        if (i === j) continue;
        const denom = Math.sqrt(c[i][i] * c[j][j]);
        const partial = denom > 0 ? c[i][j] / denom : 0;
        const sq = partial * partial;
        s2 += sq;
        s4 += sq * sq;
      }
    }
    squared.push(s2 / pairs);
    fourth.push(s4 / pairs);
  }
  return { squared, fourth, suggestedSquared: argMin(squared), suggestedFourth: argMin(fourth) };
}

function argMin(values: number[]): number {
  let best = 0;
  for (let i = 1; i < values.length; i++) if (values[i] < values[best]) best = i;
  return best;
}

const MASK_64 = (1n << 64n) - 1n;
const MASK_53 = (1n << 53n) - 1n;

/**
 * The seed of one replication of a simulation: a SplitMix64 (Steele, Lea & Flood 2014) hash of the
 * run's seed and the replication number, so that every replication has its own stream and a run gives
 * the same result however its replications are split between threads.
 *
 * Cost: O(1). Throws EngineError when the seed or index is not a safe whole number.
 */
export function replicationSeed(seed: number, replication: number): number {
  if (!Number.isSafeInteger(seed) || !Number.isSafeInteger(replication) || replication < 0) {
    throw new EngineError(
      `replication seed needs whole numbers, got seed ${seed} and replication ${replication}`,
    );
  }
  let z = (BigInt.asUintN(64, BigInt(seed)) * 0x9e3779b97f4a7c15n + BigInt(replication) + 1n) & MASK_64;
  z = ((z ^ (z >> 30n)) * 0xbf58476d1ce4e5b9n) & MASK_64;
  z = ((z ^ (z >> 27n)) * 0x94d049bb133111ebn) & MASK_64;
  z ^= z >> 31n;
  return Number(z & MASK_53);
}

/**
 * A χ² deviate with df degrees of freedom as 2·Gamma(df/2), by Marsaglia & Tsang's (2000) squeeze
 * method (shape < 1 through Gamma(a) = Gamma(a + 1)·U^{1/a}).
 */
function chiSquareDeviate(rng: Rng, df: number): number {
  let shape = df / 2;
  let boost = 1;
  if (shape < 1) {
    boost = rng.next() ** (1 / shape);
    shape += 1;
  }
  const d = shape - 1 / 3;
  const c = 1 / Math.sqrt(9 * d);
  for (;;) {
    let x: number;
    let v: number;
    do {
      x = rng.normal();
      v = 1 + c * x;
    } while (v <= 0);
    v = v * v * v;
    const u = rng.next();
    if (u < 1 - 0.0331 * x * x * x * x || Math.log(u) < 0.5 * x * x + d * (1 - v + Math.log(v))) {
      return 2 * d * v * boost;
    }
  }
}

/** Eigenvalues simulated for one block of replications, row-major: replication × position. */
export interface SimulatedEigenvalues {
  /** First replication of the block (0-based). */
  from: number;
  /** Replications in the block. */
  count: number;
  p: number;
  /** Eigenvalues of each simulated correlation matrix, descending, count × p. */
  components: Float64Array;
  /** Eigenvalues of each simulated reduced matrix (SMCs on the diagonal), descending, count × p. */
  factors: Float64Array;
}

/**
 * Eigenvalues of correlation matrices of n independent standard-normal cases on p variables, for
 * replications from … from + count − 1 of a seeded run (Horn 1965; registry id `efa.parallel`), and of
 * the same matrices with squared multiple correlations on the diagonal (the common-factor version;
 * registry id `efa.parallel-factors`).
 *
 * The scatter matrix of n normal cases about their mean is Wishart W_p(n − 1, I); it is drawn directly
 * by Bartlett's decomposition A = L·Lᵀ, L lower triangular with Lᵢᵢ² ~ χ²(n − 1 − i) and
 * Lᵢⱼ ~ N(0, 1) below the diagonal (Bartlett 1933; Smith & Hocking 1972; registry id
 * `rng.wishart-bartlett`), which has exactly the distribution of the raw-data computation at p(p + 1)/2
 * random draws instead of n·p. Replication r uses its own stream, replicationSeed(seed, r).
 *
 * Cost: O(count·p³). Throws EngineError unless n − 1 ≥ p ≥ 2 and count ≥ 0 are whole numbers, and
 * EngineError with code `cancelled` when shouldStop() returns true (checked every replication).
 *
 * @example simulateEigenvalues({ n: 500, p: 40, seed: 1, from: 0, count: 100 }).components.length // 4000
 */
export function simulateEigenvalues(input: {
  n: number;
  p: number;
  seed: number;
  from: number;
  count: number;
  onProgress?: (done: number, total: number) => void;
  shouldStop?: () => boolean;
}): SimulatedEigenvalues {
  const { n, p, seed, from, count } = input;
  if (!Number.isInteger(p) || p < 2)
    throw new EngineError(`parallel analysis requires at least two items, got ${p}`);
  if (!Number.isInteger(n) || n - 1 < p) {
    throw new EngineError(
      `parallel analysis requires more respondents than items (n = ${n}, p = ${p})`,
      'too-few-cases',
    );
  }
  if (!Number.isInteger(from) || from < 0 || !Number.isInteger(count) || count < 0) {
    throw new EngineError(`parallel analysis replication range is invalid (from ${from}, count ${count})`);
  }
  const components = new Float64Array(count * p);
  const factors = new Float64Array(count * p);
  const l = new Float64Array(p * p);
  const a = new Float64Array(p * p);
  const inv = new Float64Array(p * p);
  const sd = new Float64Array(p);
  for (let rep = 0; rep < count; rep++) {
    if (input.shouldStop?.()) throw new EngineError('parallel analysis was cancelled', 'cancelled');
    const rng = createRng(replicationSeed(seed, from + rep));
    // Bartlett factor L (row-major, lower triangle).
    for (let i = 0; i < p; i++) {
      const row = i * p;
      for (let j = 0; j < i; j++) l[row + j] = rng.normal();
      l[row + i] = Math.sqrt(chiSquareDeviate(rng, n - 1 - i));
    }
    // A = L·Lᵀ (lower triangle), then the correlation matrix D^{-1/2}·A·D^{-1/2}.
    for (let i = 0; i < p; i++) {
      const ri = i * p;
      for (let j = 0; j <= i; j++) {
        const rj = j * p;
        let s = 0;
        for (let k = 0; k <= j; k++) s += l[ri + k] * l[rj + k];
        a[ri + j] = s;
      }
      sd[i] = Math.sqrt(a[ri + i]);
    }
    // (R⁻¹)ᵢᵢ = Aᵢᵢ·(A⁻¹)ᵢᵢ with (A⁻¹)ᵢᵢ = Σₖ (L⁻¹)ₖᵢ²; inv holds L⁻¹ (lower triangle).
    for (let j = 0; j < p; j++) {
      inv[j * p + j] = 1 / l[j * p + j];
      for (let i = j + 1; i < p; i++) {
        let s = 0;
        for (let k = j; k < i; k++) s -= l[i * p + k] * inv[k * p + j];
        inv[i * p + j] = s / l[i * p + i];
      }
    }
    for (let i = 0; i < p; i++) {
      const ri = i * p;
      for (let j = 0; j < i; j++) a[ri + j] /= sd[i] * sd[j];
      a[ri + i] = 1;
    }
    const reduced = Float64Array.from(a);
    for (let i = 0; i < p; i++) {
      let s = 0;
      for (let k = i; k < p; k++) s += inv[k * p + i] * inv[k * p + i];
      reduced[i * p + i] = 1 - 1 / (sd[i] * sd[i] * s);
    }
    components.set(symmetricEigenvalues(a, p), rep * p);
    factors.set(symmetricEigenvalues(reduced, p), rep * p);
    input.onProgress?.(rep + 1, count);
  }
  return { from, count, p, components, factors };
}

/** Percentile by linear interpolation between order statistics (Hyndman & Fan 1996, definition 7). */
export function percentileOf(sorted: Float64Array, percentile: number): number {
  const h = (sorted.length - 1) * (percentile / 100);
  const lo = Math.floor(h);
  const hi = Math.min(lo + 1, sorted.length - 1);
  return sorted[lo] + (h - lo) * (sorted[hi] - sorted[lo]);
}

export interface ParallelAnalysis {
  iterations: number;
  seed: number;
  percentile: number;
  components: { observed: number[]; mean: number[]; percentile: number[]; suggested: number };
  factors: { observed: number[]; mean: number[]; percentile: number[]; suggested: number };
}

function compare(observed: number[], sims: Float64Array, iterations: number, p: number, percentile: number) {
  const mean: number[] = [];
  const pct: number[] = [];
  const column = new Float64Array(iterations);
  for (let k = 0; k < p; k++) {
    let s = 0;
    for (let r = 0; r < iterations; r++) {
      column[r] = sims[r * p + k];
      s += column[r];
    }
    mean.push(s / iterations);
    column.sort();
    pct.push(percentileOf(column, percentile));
  }
  let suggested = 0;
  while (suggested < p && observed[suggested] > pct[suggested]) suggested++;
  return { observed, mean, percentile: pct, suggested };
}

/**
 * Horn's (1965) parallel analysis summarised from simulated blocks (in any order, covering replications
 * 0 … iterations − 1 exactly once): for each position the mean and the chosen percentile of the
 * simulated eigenvalues (95th by default; Glorfeld 1995; registry id `efa.parallel`), and the number of
 * leading observed eigenvalues that exceed their percentile — for components (eigenvalues of R) and
 * for common factors (eigenvalues of R with SMCs on the diagonal; registry id `efa.parallel-factors`).
 *
 * Cost: O(iterations·p·log iterations). Throws EngineError when the blocks do not cover the
 * replications exactly once or disagree on p, or the percentile is outside (0, 100).
 */
export function summarizeParallelAnalysis(input: {
  observedComponents: number[];
  observedFactors: number[];
  blocks: SimulatedEigenvalues[];
  iterations: number;
  seed: number;
  percentile: number;
}): ParallelAnalysis {
  const { iterations, percentile } = input;
  const p = input.observedComponents.length;
  if (!(percentile > 0 && percentile < 100))
    throw new EngineError(`percentile must lie between 0 and 100, got ${percentile}`);
  if (!Number.isInteger(iterations) || iterations < 1)
    throw new EngineError(`parallel analysis needs at least one iteration, got ${iterations}`);
  const components = new Float64Array(iterations * p);
  const factors = new Float64Array(iterations * p);
  const covered = new Uint8Array(iterations);
  for (const b of input.blocks) {
    if (b.p !== p) throw new EngineError(`parallel analysis block has ${b.p} items, expected ${p}`);
    for (let r = b.from; r < b.from + b.count; r++) {
      if (r >= iterations || covered[r])
        throw new EngineError(`parallel analysis replication ${r} is out of range or repeated`);
      covered[r] = 1;
    }
    components.set(b.components, b.from * p);
    factors.set(b.factors, b.from * p);
  }
  if (covered.some((c) => c === 0)) throw new EngineError('parallel analysis blocks leave replications out');
  return {
    iterations,
    seed: input.seed,
    percentile,
    components: compare(input.observedComponents, components, iterations, p, percentile),
    factors: compare(input.observedFactors, factors, iterations, p, percentile),
  };
}
