import { EngineError } from './errors.ts';
import { kahanSum } from './numeric.ts';
import type { ResponseMatrix, ScaleBounds } from './scoring.ts';

/** How a scale or facet score is formed from its (already reverse-scored) item answers. */
export type ScoreRule = 'sum' | 'mean';

/**
 * Scale scores under a scoring rule with a missing-answer allowance: a respondent who answered at
 * least `minAnswered` of the k items gets the mean of the answered items (rule `mean`) or that mean
 * times k (rule `sum`, so that a score from fewer answers stays on the scale of a complete one); a
 * respondent with every item answered gets the plain sum or mean. Fewer answers: no score (null).
 *
 * Source: scoring.sum-and-mean; scoring.prorated (the method registry; common practice).
 * Cost: O(n·k). Throws EngineError when `minAnswered` is not a whole number from 1 to k.
 */
export function ruleScores(data: ResponseMatrix, rule: ScoreRule, minAnswered: number): (number | null)[] {
  const k = data.length > 0 ? data[0].length : 0;
  if (!Number.isInteger(minAnswered) || minAnswered < 1 || (k > 0 && minAnswered > k)) {
    throw new EngineError(`a score needs between 1 and ${k} answered items (got ${minAnswered})`);
  }
  return data.map((row) => {
    let total = 0;
    let answered = 0;
    for (const x of row) {
      if (x === null) continue;
      total += x;
      answered++;
    }
    if (answered < minAnswered) return null;
    if (answered === row.length) return rule === 'sum' ? total : total / row.length;
    const mean = total / answered;
    return rule === 'sum' ? mean * row.length : mean;
  });
}

/**
 * Every score a respondent who answers all k items can reach, lowest first: the sums k·min … k·max in
 * steps of one, or those sums divided by k for the mean rule.
 *
 * Cost: O(k·(max − min)). Throws EngineError when k is not a positive whole number or the bounds are
 * not whole numbers with min below max.
 */
export function scoreGrid(k: number, bounds: ScaleBounds, rule: ScoreRule): number[] {
  if (!Number.isInteger(k) || k < 1) throw new EngineError(`a score grid needs at least one item (got ${k})`);
  if (!Number.isInteger(bounds.min) || !Number.isInteger(bounds.max) || bounds.min >= bounds.max) {
    throw new EngineError(
      `a score grid needs whole-number bounds with min below max (got ${bounds.min} and ${bounds.max})`,
    );
  }
  const out: number[] = [];
  for (let sum = k * bounds.min; sum <= k * bounds.max; sum++) out.push(rule === 'sum' ? sum : sum / k);
  return out;
}

/**
 * Percentile rank of x in a sample by the mid-point definition: the percentage of the sample scoring
 * below x plus half the percentage scoring exactly x, PR = 100·(below + equal/2)/n (the same as
 * scipy.stats.percentileofscore with kind="mean"). `sorted` must be in ascending order.
 *
 * Source: norms.percentile-rank. Cost: O(log n). Throws EngineError on an empty sample.
 */
export function percentileRank(sorted: readonly number[], x: number): number {
  if (sorted.length === 0) throw new EngineError('a percentile rank needs at least one score');
  const below = lowerBound(sorted, x, false);
  const atOrBelow = lowerBound(sorted, x, true);
  return (100 * (below + (atOrBelow - below) / 2)) / sorted.length;
}

/** The number of entries below x (or, with `inclusive`, at or below x) in an ascending array. */
function lowerBound(sorted: readonly number[], x: number, inclusive: boolean): number {
  let lo = 0;
  let hi = sorted.length;
  while (lo < hi) {
    const mid = (lo + hi) >>> 1;
    if (sorted[mid] < x || (inclusive && sorted[mid] === x)) lo = mid + 1;
    else hi = mid;
  }
  return lo;
}

/** One row of a norms table. */
export interface NormRow {
  score: number;
  /** Mid-point percentile rank in the norm sample, 0–100. */
  percentile: number;
  z: number;
  t: number;
}

export interface NormTable {
  /** Respondents with a score (missing scores left out). */
  n: number;
  /** Respondents without a score under the rule. */
  unscored: number;
  mean: number;
  /** Sample SD with divisor n − 1. */
  sd: number;
  min: number;
  max: number;
  rows: NormRow[];
}

/**
 * Norms of a score: the sample's mean and SD (divisor n − 1), and for each score of `grid` its
 * percentile rank (mid-point definition), z = (score − mean)/SD and T = 50 + 10z.
 *
 * Source: norms.percentile-rank, norms.standard-scores. Cost: O(n log n + g log n) for n scores and
 * g grid points. Throws EngineError with fewer than two scores or when every score is the same (z
 * would divide by zero).
 */
export function normTable(scores: readonly (number | null)[], grid: readonly number[]): NormTable {
  const present = scores.filter((s): s is number => s !== null);
  if (present.length < 2) {
    throw new EngineError(`norms need at least two scored respondents (got ${present.length})`, 'too-few');
  }
  const sorted = [...present].sort((a, b) => a - b);
  const n = sorted.length;
  const mean = kahanSum(sorted) / n;
  const sd = Math.sqrt(kahanSum(sorted.map((x) => (x - mean) ** 2)) / (n - 1));
  if (!(sd > 0)) throw new EngineError('norms need scores that vary; every respondent has the same score');
  return {
    n,
    unscored: scores.length - n,
    mean,
    sd,
    min: sorted[0],
    max: sorted[n - 1],
    rows: grid.map((score) => {
      const z = (score - mean) / sd;
      return { score, percentile: percentileRank(sorted, score), z, t: 50 + 10 * z };
    }),
  };
}
