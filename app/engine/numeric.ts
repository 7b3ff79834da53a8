import { EngineError } from './errors.ts';

/** General-purpose "effectively zero" threshold for quantities of order one. */
export const EPSILON = 1e-12;

/** Default convergence tolerance for iterative fitting (factor extraction, rotation, ML estimation). */
export const CONVERGENCE_TOL = 1e-10;

/** Spacing of doubles at 1 (2⁻⁵²); the stopping rule for series and continued fractions. */
export const MACHINE_EPSILON = Number.EPSILON;

/** Smallest magnitude a continued-fraction denominator may take in the modified Lentz method. */
export const LENTZ_FLOOR = 1e-300;

/** Upper bound on the terms of a series or continued fraction before it is declared non-convergent. */
export const MAX_SERIES_TERMS = 1_000_000;

/** Relative asymmetry |aᵢⱼ − aⱼᵢ| / max(1, max|a|) tolerated before a matrix counts as not symmetric. */
export const SYMMETRY_TOL = 1e-9;

/**
 * A matrix whose reciprocal 1-norm condition number falls below this is treated as singular: fewer
 * than about two significant digits of its inverse would be reliable.
 */
export const SINGULAR_RCOND = 1e-13;

/**
 * A Cholesky pivot at or below this fraction of its original diagonal entry marks the matrix as not
 * positive definite (numerically semidefinite or worse).
 */
export const PD_PIVOT_TOL = 1e-13;

function assertFinite(values: ArrayLike<number>, what: string): void {
  for (let i = 0; i < values.length; i++) {
    if (!Number.isFinite(values[i])) {
      throw new EngineError(`${what} requires finite numbers; the value at index ${i} is ${values[i]}`);
    }
  }
}

/**
 * Compensated (Kahan–Babuška–Neumaier) summation.
 *
 * Source: Neumaier, A. (1974). Rundungsfehleranalyse einiger Verfahren zur Summation endlicher
 * Summen. ZAMM 54, 39–51 — an improvement of Kahan's (1965) compensated sum that also handles a
 * term larger than the running sum. The error is O(ε) independent of n, instead of O(nε).
 *
 * Cost: O(n). Returns 0 for an empty input. Throws nothing; non-finite inputs propagate.
 *
 * @example kahanSum([1e16, 1, -1e16]) // 1
 */
export function kahanSum(values: ArrayLike<number>): number {
  let sum = 0;
  let compensation = 0;
  for (let i = 0; i < values.length; i++) {
    const v = values[i];
    const t = sum + v;
    if (Math.abs(sum) >= Math.abs(v)) {
      compensation += sum - t + v;
    } else {
      compensation += v - t + sum;
    }
    sum = t;
  }
  return sum + compensation;
}

/**
 * Arithmetic mean with compensated summation and one refinement pass (the mean of the residuals is
 * added back), so the result is correctly rounded in all but pathological cases.
 *
 * Cost: O(n). Throws EngineError "mean requires at least one value" on empty input, and names the
 * index of a non-finite value.
 *
 * @example mean([2, 4, 9]) // 5
 */
export function mean(values: ArrayLike<number>): number {
  const n = values.length;
  if (n === 0) throw new EngineError('mean requires at least one value');
  assertFinite(values, 'mean');
  const first = kahanSum(values) / n;
  const residuals = new Float64Array(n);
  for (let i = 0; i < n; i++) residuals[i] = values[i] - first;
  return first + kahanSum(residuals) / n;
}

/**
 * Sample variance with divisor n − 1, by the corrected two-pass algorithm
 * Σ(x − x̄)² − (Σ(x − x̄))²/n (Chan, Golub & LeVeque 1983, "Algorithms for computing the sample
 * variance", The American Statistician 37, 242–247), with compensated sums.
 *
 * Cost: O(n). Throws EngineError "variance requires at least two values" when n < 2, and names the
 * index of a non-finite value.
 *
 * @example variance([1, 2, 3, 4]) // 1.6666666666666667
 */
export function variance(values: ArrayLike<number>): number {
  const n = values.length;
  if (n < 2) throw new EngineError('variance requires at least two values');
  const m = mean(values);
  const dev = new Float64Array(n);
  const sq = new Float64Array(n);
  for (let i = 0; i < n; i++) {
    dev[i] = values[i] - m;
    sq[i] = dev[i] * dev[i];
  }
  const s = kahanSum(dev);
  return Math.max(0, (kahanSum(sq) - (s * s) / n) / (n - 1));
}

/**
 * The mean and the sample variance of one set of values, equal to `mean(values)` and
 * `variance(values)` to the last bit: the same compensated sums over the same terms in the same order,
 * fused into three passes over the values instead of eight, with no scratch arrays.
 *
 * Source: as mean and variance (Neumaier 1974; Chan, Golub & LeVeque 1983). Cost: O(n).
 * Throws EngineError "variance requires at least two values" when n < 2, and names the index of a
 * non-finite value.
 *
 * @example meanAndVariance([1, 2, 3, 4]) // { mean: 2.5, variance: 1.6666666666666667 }
 */
export function meanAndVariance(values: ArrayLike<number>): { mean: number; variance: number } {
  const n = values.length;
  if (n < 2) throw new EngineError('variance requires at least two values');
  let sum = 0;
  let comp = 0;
  for (let i = 0; i < n; i++) {
    const v = values[i];
    if (!Number.isFinite(v)) {
      throw new EngineError(`mean requires finite numbers; the value at index ${i} is ${v}`);
    }
    const t = sum + v;
    comp += Math.abs(sum) >= Math.abs(v) ? sum - t + v : v - t + sum;
    sum = t;
  }
  const first = (sum + comp) / n;
  sum = 0;
  comp = 0;
  for (let i = 0; i < n; i++) {
    const v = values[i] - first;
    const t = sum + v;
    comp += Math.abs(sum) >= Math.abs(v) ? sum - t + v : v - t + sum;
    sum = t;
  }
  const m = first + (sum + comp) / n;
  let ds = 0;
  let dc = 0;
  let qs = 0;
  let qc = 0;
  for (let i = 0; i < n; i++) {
    const d = values[i] - m;
    const q = d * d;
    const t = ds + d;
    dc += Math.abs(ds) >= Math.abs(d) ? ds - t + d : d - t + ds;
    ds = t;
    const u = qs + q;
    qc += Math.abs(qs) >= Math.abs(q) ? qs - u + q : q - u + qs;
    qs = u;
  }
  const s = ds + dc;
  return { mean: m, variance: Math.max(0, (qs + qc - (s * s) / n) / (n - 1)) };
}
