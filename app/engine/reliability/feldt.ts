import { fQuantile } from '../distributions.ts';
import { EngineError } from '../errors.ts';

/** A confidence interval for alpha by Feldt's F-based method. */
export interface FeldtInterval {
  method: 'feldt';
  level: number;
  lower: number;
  upper: number;
  df1: number;
  df2: number;
}

/**
 * Feldt's confidence interval for Cronbach's alpha. (1 − α)/(1 − α̂) follows an F distribution with
 * df₁ = n − 1 and df₂ = (n − 1)(k − 1), so with γ = 1 − level:
 * lower = 1 − (1 − α̂)·F₁₋γ/₂, upper = 1 − (1 − α̂)·F_γ/₂ (F_p the p-quantile).
 *
 * Source: alpha.feldt-ci (the method registry). Cost: two F quantiles (iterative,
 * independent of n and k).
 * Throws EngineError with fewer than two respondents or items, a level outside (0, 1), or a
 * non-finite alpha.
 */
export function feldtInterval(alpha: number, n: number, k: number, level: number): FeldtInterval {
  if (!Number.isFinite(alpha))
    throw new EngineError(`the Feldt interval needs a finite alpha (got ${alpha})`);
  if (n < 2)
    throw new EngineError('the Feldt interval requires at least two respondents', 'too-few-respondents');
  if (k < 2) throw new EngineError('the Feldt interval requires at least two items', 'too-few-items');
  if (!(level > 0 && level < 1)) {
    throw new EngineError(`the confidence level must lie strictly between 0 and 1 (got ${level})`, 'level');
  }
  const gamma = 1 - level;
  const df1 = n - 1;
  const df2 = (n - 1) * (k - 1);
  return {
    method: 'feldt',
    level,
    lower: 1 - (1 - alpha) * fQuantile(1 - gamma / 2, df1, df2),
    upper: 1 - (1 - alpha) * fQuantile(gamma / 2, df1, df2),
    df1,
    df2,
  };
}
