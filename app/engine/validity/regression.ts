import { tQuantile, tSf } from '../distributions.ts';
import { EngineError } from '../errors.ts';
import { kahanSum } from '../numeric.ts';
import { completePairs } from './correlation.ts';

export interface SimpleRegression {
  n: number;
  intercept: number;
  slope: number;
  interceptSE: number;
  slopeSE: number;
  /** t and two-sided p of the slope on n − 2 df. */
  t: number;
  p: number;
  slopeLower: number;
  slopeUpper: number;
  level: number;
  rSquared: number;
  /** Slope in SD units (equal to r with one predictor). */
  standardizedSlope: number;
  residualSD: number;
}

/**
 * Ordinary least-squares regression of a criterion on one predictor (the scale score) over complete
 * pairs: slope, intercept, their standard errors, the slope's t test and interval on n − 2 df, and R².
 * Registry: `regression.ols`.
 *
 * Cost: O(n). Throws EngineError with fewer than 3 complete pairs, a predictor that does not vary,
 * or a level outside (0, 1).
 */
export function regressOnScore(
  criterion: (number | null)[],
  score: (number | null)[],
  level = 0.95,
): SimpleRegression {
  if (!(level > 0 && level < 1))
    throw new EngineError(`a confidence level must lie strictly between 0 and 1 (got ${level})`);
  const { x, y } = completePairs(score, criterion);
  const n = x.length;
  if (n < 3) throw new EngineError(`a regression needs at least 3 complete pairs (got ${n})`);
  const mx = kahanSum(x) / n;
  const my = kahanSum(y) / n;
  const sxx = kahanSum(x.map((v) => (v - mx) ** 2));
  const syy = kahanSum(y.map((v) => (v - my) ** 2));
  if (!(sxx > 0)) throw new EngineError('a regression needs a predictor that varies');
  const sxy = kahanSum(x.map((v, i) => (v - mx) * (y[i] - my)));
  const slope = sxy / sxx;
  const intercept = my - slope * mx;
  const sse = Math.max(0, kahanSum(y.map((v, i) => (v - intercept - slope * x[i]) ** 2)));
  const s2 = sse / (n - 2);
  const slopeSE = Math.sqrt(s2 / sxx);
  const interceptSE = Math.sqrt(s2 * (1 / n + (mx * mx) / sxx));
  const t = slopeSE > 0 ? slope / slopeSE : Math.sign(slope) * Number.POSITIVE_INFINITY;
  const half = tQuantile(1 - (1 - level) / 2, n - 2) * slopeSE;
  return {
    n,
    intercept,
    slope,
    interceptSE,
    slopeSE,
    t,
    p: Number.isFinite(t) ? 2 * tSf(Math.abs(t), n - 2) : 0,
    slopeLower: slope - half,
    slopeUpper: slope + half,
    level,
    rSquared: syy > 0 ? 1 - sse / syy : 1,
    standardizedSlope: syy > 0 ? slope * Math.sqrt(sxx / syy) : 0,
    residualSD: Math.sqrt(s2),
  };
}
