import { EngineError } from '../errors.ts';
import { itemMoments, type MissingMethod } from '../item-stats.ts';
import { createRng } from '../rng.ts';
import type { ResponseMatrix } from '../scoring.ts';
import { cronbachAlpha } from './alpha.ts';

/** Resamples between two progress reports (and two checks of `shouldStop`). */
export const BOOTSTRAP_PROGRESS_EVERY = 50;

/** Fewest resamples a percentile interval is drawn from. */
export const MIN_BOOTSTRAP_RESAMPLES = 100;

/** How to run the bootstrap, and how a worker follows or cancels it. */
export interface BootstrapOptions {
  resamples: number;
  seed: number;
  level: number;
  /** Called every BOOTSTRAP_PROGRESS_EVERY resamples and at the end with (done, total). */
  onProgress?: (done: number, total: number) => void;
  /** Polled as often as onProgress; returning true stops the run with EngineError code "cancelled". */
  shouldStop?: () => boolean;
}

/** A seeded percentile bootstrap interval for alpha. */
export interface BootstrapInterval {
  method: 'percentile bootstrap';
  level: number;
  lower: number;
  upper: number;
  resamples: number;
  /** Resamples whose alpha was defined (a resample whose total score does not vary is skipped). */
  used: number;
  seed: number;
  /** Respondents are resampled with replacement; the quantiles interpolate linearly between order statistics. */
  quantiles: 'linear';
  missing: MissingMethod;
}

/**
 * The p-quantile of sorted values by linear interpolation between order statistics (Hyndman & Fan
 * 1996, definition 7). Cost O(1).
 */
function sortedQuantile(sorted: Float64Array, p: number): number {
  const h = (sorted.length - 1) * p;
  const lo = Math.floor(h);
  const hi = Math.min(lo + 1, sorted.length - 1);
  return sorted[lo] + (h - lo) * (sorted[hi] - sorted[lo]);
}

/**
 * Alpha of every resample for complete data. Performance: the data are centred once and copied into
 * one row-major Float64Array with the row totals beside it, so each resample is a single pass over n
 * drawn rows accumulating k item sums and sums of squares plus the total's — O(n·k) with no
 * allocation inside the loop. Centring keeps the sums-of-squares formula free of cancellation.
 */
function completeCaseAlphas(
  data: ResponseMatrix,
  options: BootstrapOptions,
  draw: (n: number) => number,
  report: (done: number) => void,
): Float64Array {
  const n = data.length;
  const k = data[0].length;
  const x = new Float64Array(n * k);
  const totals = new Float64Array(n);
  const centre = new Float64Array(k);
  for (let r = 0; r < n; r++) for (let c = 0; c < k; c++) centre[c] += data[r][c] as number;
  for (let c = 0; c < k; c++) centre[c] /= n;
  for (let r = 0; r < n; r++) {
    let t = 0;
    for (let c = 0; c < k; c++) {
      const v = (data[r][c] as number) - centre[c];
      x[r * k + c] = v;
      t += v;
    }
    totals[r] = t;
  }
  const sums = new Float64Array(k);
  const squares = new Float64Array(k);
  const alphas = new Float64Array(options.resamples);
  let used = 0;
  for (let b = 0; b < options.resamples; b++) {
    sums.fill(0);
    squares.fill(0);
    let tSum = 0;
    let tSq = 0;
    for (let i = 0; i < n; i++) {
      const r = draw(n);
      const offset = r * k;
      for (let c = 0; c < k; c++) {
        const v = x[offset + c];
        sums[c] += v;
        squares[c] += v * v;
      }
      const t = totals[r];
      tSum += t;
      tSq += t * t;
    }
    let itemVar = 0;
    for (let c = 0; c < k; c++) itemVar += squares[c] - (sums[c] * sums[c]) / n;
    const totalVar = tSq - (tSum * tSum) / n;
    if (totalVar > 0) alphas[used++] = (k / (k - 1)) * (1 - itemVar / totalVar);
    report(b + 1);
  }
  return alphas.subarray(0, used);
}

/** Alpha of every resample with pairwise deletion: the pairwise moments are recomputed, O(n·k²) each. */
function pairwiseAlphas(
  names: string[],
  data: ResponseMatrix,
  options: BootstrapOptions,
  draw: (n: number) => number,
  report: (done: number) => void,
): Float64Array {
  const n = data.length;
  const alphas = new Float64Array(options.resamples);
  const sample: ResponseMatrix = new Array(n);
  let used = 0;
  for (let b = 0; b < options.resamples; b++) {
    for (let i = 0; i < n; i++) sample[i] = data[draw(n)];
    try {
      alphas[used] = cronbachAlpha(itemMoments(names, sample, 'pairwise').covariance);
      used++;
    } catch (error) {
      if (!(error instanceof EngineError)) throw error;
    }
    report(b + 1);
  }
  return alphas.subarray(0, used);
}

/**
 * Seeded percentile bootstrap confidence interval for Cronbach's alpha: respondents are drawn with
 * replacement B times, alpha is recomputed on each resample with the same missing-data method as the
 * point estimate, and the interval is the (γ/2, 1 − γ/2) quantiles of the B values (γ = 1 − level).
 * The same seed gives the same interval.
 *
 * Source: Efron & Tibshirani (1993), percentile interval. Cost: O(B·n·k) for complete data,
 * O(B·n·k²) with pairwise deletion.
 * Throws EngineError with fewer than two respondents or items, fewer than MIN_BOOTSTRAP_RESAMPLES
 * resamples, a level outside (0, 1), when fewer than two resamples give a defined alpha, and with
 * code "cancelled" when `shouldStop` returns true.
 */
export function bootstrapAlpha(
  names: string[],
  data: ResponseMatrix,
  missing: MissingMethod,
  options: BootstrapOptions,
): BootstrapInterval {
  const { resamples, seed, level } = options;
  if (data.length < 2)
    throw new EngineError('the bootstrap requires at least two respondents', 'too-few-respondents');
  if (names.length < 2) throw new EngineError('the bootstrap requires at least two items', 'too-few-items');
  if (!Number.isInteger(resamples) || resamples < MIN_BOOTSTRAP_RESAMPLES) {
    throw new EngineError(
      `the bootstrap requires a whole number of at least ${MIN_BOOTSTRAP_RESAMPLES} resamples (got ${resamples})`,
      'resamples',
    );
  }
  if (!(level > 0 && level < 1)) {
    throw new EngineError(`the confidence level must lie strictly between 0 and 1 (got ${level})`, 'level');
  }
  const rng = createRng(seed);
  const draw = (n: number) => rng.int(n);
  const report = (done: number) => {
    if (done % BOOTSTRAP_PROGRESS_EVERY !== 0 && done !== resamples) return;
    options.onProgress?.(done, resamples);
    if (done < resamples && options.shouldStop?.()) {
      throw new EngineError(`the bootstrap was stopped after ${done} of ${resamples} resamples`, 'cancelled');
    }
  };
  const complete = missing === 'listwise' || data.every((row) => row.every((x) => x !== null));
  const alphas = complete
    ? completeCaseAlphas(
        data.filter((row) => row.every((x) => x !== null)),
        options,
        draw,
        report,
      )
    : pairwiseAlphas(names, data, options, draw, report);
  if (alphas.length < 2) {
    throw new EngineError(
      'the bootstrap needs at least two resamples whose total score varies',
      'no-variance',
    );
  }
  const sorted = alphas.slice().sort();
  const gamma = 1 - level;
  return {
    method: 'percentile bootstrap',
    level,
    lower: sortedQuantile(sorted, gamma / 2),
    upper: sortedQuantile(sorted, 1 - gamma / 2),
    resamples,
    used: alphas.length,
    seed,
    quantiles: 'linear',
    missing,
  };
}
