import { EngineError } from '../errors.ts';
import type { MissingMethod } from '../item-stats.ts';
import { ruleThreshold } from '../methods/index.ts';
import { createRng } from '../rng.ts';
import type { ResponseMatrix } from '../scoring.ts';

/** Resamples between two progress reports (and two checks of `shouldStop`). */
export const BOOTSTRAP_PROGRESS_EVERY = 50;

/** Fewest resamples a percentile interval is drawn from: rule bootstrap.minimum-resamples (the method registry). */
export const MIN_BOOTSTRAP_RESAMPLES = ruleThreshold('bootstrap.minimum-resamples', 'minimum');

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

/**
 * Relative size below which a pair's sum of squared deviations counts as zero: the item does not vary
 * among the respondents it shares with the other item, and the resample is skipped (as the full
 * computation would refuse it).
 */
export const PAIR_VARIANCE_FLOOR = 1e-10;

/**
 * Alpha of every resample with pairwise deletion, by the same convention as itemMoments (rᵢⱼ over the
 * pair's shared respondents, sᵢ over each item's answers, cᵢⱼ = rᵢⱼsᵢsⱼ). Performance: a resample is
 * a weight per respondent (how often it was drawn), so undrawn rows cost nothing. Complete rows add to
 * per-item sums once and only their cross-products are per pair; rows with a missing answer add to
 * per-pair sums for the items they answered. Values are centred once; all sums live in Float64Arrays
 * reused across resamples. Cost O(n·k²) per resample.
 */
function pairwiseAlphas(
  data: ResponseMatrix,
  options: BootstrapOptions,
  draw: (n: number) => number,
  report: (done: number) => void,
): Float64Array {
  const n = data.length;
  const k = data[0].length;
  const x = new Float64Array(n * k);
  const complete = new Uint8Array(n);
  const answered: Int32Array[] = new Array(n);
  const centre = new Float64Array(k);
  const count = new Float64Array(k);
  for (const row of data) {
    for (let c = 0; c < k; c++) {
      const v = row[c];
      if (v !== null) {
        centre[c] += v;
        count[c]++;
      }
    }
  }
  for (let c = 0; c < k; c++) centre[c] /= count[c];
  for (let r = 0; r < n; r++) {
    const cols: number[] = [];
    for (let c = 0; c < k; c++) {
      const v = data[r][c];
      if (v !== null) {
        x[r * k + c] = v - centre[c];
        cols.push(c);
      }
    }
    complete[r] = cols.length === k ? 1 : 0;
    answered[r] = Int32Array.from(cols);
  }
  const weights = new Int32Array(n);
  const itemN = new Float64Array(k);
  const itemSum = new Float64Array(k);
  const itemSq = new Float64Array(k);
  const itemFirst = new Float64Array(k);
  const itemVaries = new Uint8Array(k);
  const itemVar = new Float64Array(k);
  const itemSd = new Float64Array(k);
  const fullSum = new Float64Array(k);
  const fullSq = new Float64Array(k);
  const pairN = new Float64Array(k * k);
  const pairSumI = new Float64Array(k * k);
  const pairSumJ = new Float64Array(k * k);
  const pairSqI = new Float64Array(k * k);
  const pairSqJ = new Float64Array(k * k);
  const cross = new Float64Array(k * k);
  const alphas = new Float64Array(options.resamples);
  let used = 0;
  for (let b = 0; b < options.resamples; b++) {
    weights.fill(0);
    for (let i = 0; i < n; i++) weights[draw(n)]++;
    itemN.fill(0);
    itemSum.fill(0);
    itemSq.fill(0);
    itemFirst.fill(Number.NaN);
    itemVaries.fill(0);
    fullSum.fill(0);
    fullSq.fill(0);
    pairN.fill(0);
    pairSumI.fill(0);
    pairSumJ.fill(0);
    pairSqI.fill(0);
    pairSqJ.fill(0);
    cross.fill(0);
    let fullN = 0;
    for (let r = 0; r < n; r++) {
      const w = weights[r];
      if (w === 0) continue;
      const offset = r * k;
      const cols = answered[r];
      for (const c of cols) {
        const v = data[r][c] as number;
        if (Number.isNaN(itemFirst[c])) itemFirst[c] = v;
        else if (v !== itemFirst[c]) itemVaries[c] = 1;
      }
      if (complete[r]) {
        fullN += w;
        for (let i = 0; i < k; i++) {
          const v = x[offset + i];
          fullSum[i] += w * v;
          fullSq[i] += w * v * v;
          const wv = w * v;
          const base = i * k;
          for (let j = i + 1; j < k; j++) cross[base + j] += wv * x[offset + j];
        }
        continue;
      }
      for (let a = 0; a < cols.length; a++) {
        const i = cols[a];
        const vi = x[offset + i];
        itemN[i] += w;
        itemSum[i] += w * vi;
        itemSq[i] += w * vi * vi;
        const base = i * k;
        for (let c = a + 1; c < cols.length; c++) {
          const j = cols[c];
          const vj = x[offset + j];
          const at = base + j;
          pairN[at] += w;
          pairSumI[at] += w * vi;
          pairSumJ[at] += w * vj;
          pairSqI[at] += w * vi * vi;
          pairSqJ[at] += w * vj * vj;
          cross[at] += w * vi * vj;
        }
      }
    }
    let valid = true;
    let trace = 0;
    for (let i = 0; i < k && valid; i++) {
      const m = itemN[i] + fullN;
      if (m < 2) valid = false;
      const s = itemSum[i] + fullSum[i];
      const v = itemVaries[i] ? Math.max(0, (itemSq[i] + fullSq[i] - (s * s) / m) / (m - 1)) : 0;
      itemVar[i] = v;
      itemSd[i] = Math.sqrt(v);
      trace += v;
    }
    let total = trace;
    for (let i = 0; i < k && valid; i++) {
      if (!itemVaries[i]) continue;
      for (let j = i + 1; j < k; j++) {
        if (!itemVaries[j]) continue;
        const at = i * k + j;
        const m = pairN[at] + fullN;
        if (m < 2) {
          valid = false;
          break;
        }
        const si = pairSumI[at] + fullSum[i];
        const sj = pairSumJ[at] + fullSum[j];
        const qi = pairSqI[at] + fullSq[i];
        const qj = pairSqJ[at] + fullSq[j];
        const di = qi - (si * si) / m;
        const dj = qj - (sj * sj) / m;
        if (!(di > PAIR_VARIANCE_FLOOR * qi) || !(dj > PAIR_VARIANCE_FLOOR * qj)) {
          valid = false;
          break;
        }
        const r = Math.max(-1, Math.min(1, (cross[at] - (si * sj) / m) / Math.sqrt(di * dj)));
        total += 2 * r * itemSd[i] * itemSd[j];
      }
    }
    if (valid && total > 0) alphas[used++] = (k / (k - 1)) * (1 - trace / total);
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
 * Source: alpha.bootstrap-ci (the method registry), percentile interval. Cost: O(B·n·k) for complete data,
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
  const rows = complete ? data.filter((row) => row.every((x) => x !== null)) : data;
  if (rows.length < 2) {
    throw new EngineError(
      `the bootstrap requires at least two respondents; found ${rows.length} complete respondents`,
      'too-few-respondents',
    );
  }
  const alphas = complete
    ? completeCaseAlphas(rows, options, draw, report)
    : pairwiseAlphas(rows, options, draw, report);
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
