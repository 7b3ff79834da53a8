import { correctForAttenuation } from '../attenuation.ts';
import { normalQuantile, tSf } from '../distributions.ts';
import { EngineError } from '../errors.ts';
import { kahanSum } from '../numeric.ts';

/** Confidence level of correlation intervals unless the caller chooses another. */
export const DEFAULT_CORRELATION_LEVEL = 0.95;

export interface CorrelationEstimate {
  /** Cases with both values. */
  n: number;
  r: number;
  lower: number;
  upper: number;
  level: number;
  /** Two-sided p of H0: ρ = 0 from t = r√(n − 2)/√(1 − r²). */
  p: number;
}

/** Pairs of values with both present (null or a non-finite number is missing). */
export function completePairs(x: (number | null)[], y: (number | null)[]): { x: number[]; y: number[] } {
  if (x.length !== y.length)
    throw new EngineError(`the two variables have different lengths (${x.length} and ${y.length})`);
  const xs: number[] = [];
  const ys: number[] = [];
  for (let i = 0; i < x.length; i++) {
    const a = x[i];
    const b = y[i];
    if (a !== null && b !== null && Number.isFinite(a) && Number.isFinite(b)) {
      xs.push(a);
      ys.push(b);
    }
  }
  return { x: xs, y: ys };
}

/**
 * Fisher-z confidence interval of a correlation: z = atanh r, SE = 1/√(n − 3), limits tanh(z ± z_q·SE)
 * (Fisher 1921). Registry: `correlation.fisher-z`.
 *
 * Cost: O(1). Throws EngineError for n ≤ 3, r outside [−1, 1], or a level outside (0, 1).
 */
export function fisherInterval(
  r: number,
  n: number,
  level = DEFAULT_CORRELATION_LEVEL,
): { lower: number; upper: number } {
  if (!(n > 3)) throw new EngineError(`a Fisher-z interval needs more than 3 cases (got ${n})`);
  if (!(r >= -1 && r <= 1)) throw new EngineError(`a correlation must lie between −1 and 1 (got ${r})`);
  if (!(level > 0 && level < 1))
    throw new EngineError(`a confidence level must lie strictly between 0 and 1 (got ${level})`);
  if (Math.abs(r) === 1) return { lower: r, upper: r };
  const z = Math.atanh(r);
  const half = normalQuantile(1 - (1 - level) / 2) / Math.sqrt(n - 3);
  return { lower: Math.tanh(z - half), upper: Math.tanh(z + half) };
}

/**
 * Pearson correlation of two variables over the cases where both are present, with its Fisher-z
 * interval and t test. Registry: `correlation.pearson`, `correlation.fisher-z`.
 *
 * Cost: O(n). Throws EngineError with fewer than 4 complete pairs or when a variable does not vary.
 */
export function correlate(
  x: (number | null)[],
  y: (number | null)[],
  level = DEFAULT_CORRELATION_LEVEL,
): CorrelationEstimate {
  const pairs = completePairs(x, y);
  const n = pairs.x.length;
  if (n < 4)
    throw new EngineError(`a correlation with an interval needs at least 4 complete pairs (got ${n})`);
  const mx = kahanSum(pairs.x) / n;
  const my = kahanSum(pairs.y) / n;
  const sxx = kahanSum(pairs.x.map((v) => (v - mx) ** 2));
  const syy = kahanSum(pairs.y.map((v) => (v - my) ** 2));
  if (!(sxx > 0) || !(syy > 0)) throw new EngineError('a correlation needs two variables that vary');
  const sxy = kahanSum(pairs.x.map((v, i) => (v - mx) * (pairs.y[i] - my)));
  const r = Math.max(-1, Math.min(1, sxy / Math.sqrt(sxx * syy)));
  const { lower, upper } = fisherInterval(r, n, level);
  const t = Math.abs(r) === 1 ? Number.POSITIVE_INFINITY : (r * Math.sqrt(n - 2)) / Math.sqrt(1 - r * r);
  const p = Number.isFinite(t) ? 2 * tSf(Math.abs(t), n - 2) : 0;
  return { n, r, lower, upper, level, p };
}

export type CriterionTiming = 'concurrent' | 'predictive';

/** A scale score's correlation with one criterion or other measure, with the disattenuated value. */
export interface CriterionCorrelation extends CorrelationEstimate {
  measure: string;
  timing: CriterionTiming | null;
  disattenuated: number | null;
  warnings: string[];
}

/**
 * Correlates a score with another measure and, when both reliabilities are known, corrects the
 * correlation for attenuation (Spearman 1904). `timing` records whether the criterion was measured at
 * the same time (concurrent) or later (predictive). Registry: `correlation.pearson`,
 * `correlation.fisher-z`, `validity.disattenuation`.
 *
 * Cost: O(n). Throws what correlate and correctForAttenuation throw.
 */
export function criterionCorrelation(
  measure: string,
  score: (number | null)[],
  criterion: (number | null)[],
  options: {
    timing?: CriterionTiming;
    reliabilityScore?: number;
    reliabilityCriterion?: number;
    level?: number;
  } = {},
): CriterionCorrelation {
  const est = correlate(score, criterion, options.level);
  let disattenuated: number | null = null;
  const warnings: string[] = [];
  if (options.reliabilityScore !== undefined && options.reliabilityCriterion !== undefined) {
    const c = correctForAttenuation(est.r, options.reliabilityScore, options.reliabilityCriterion);
    disattenuated = c.value;
    warnings.push(...c.warnings);
  }
  return { ...est, measure, timing: options.timing ?? null, disattenuated, warnings };
}
