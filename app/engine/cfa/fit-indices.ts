import { chiSquareSf, noncentralChiSquareCdf } from '../distributions.ts';
import { EngineError } from '../errors.ts';

/** Cut-offs shown beside the fit indices (Hu & Bentler 1999, from memory). Registry: `cfa.cutoffs`. */
export const FIT_CUTOFFS = { cfi: 0.95, tli: 0.95, rmsea: 0.06, srmr: 0.08 } as const;
/** RMSEA bands (Browne & Cudeck 1993): ≤ .05 close fit, ≤ .08 reasonable. Registry: `rmsea.bands`. */
export const RMSEA_BANDS = { close: 0.05, reasonable: 0.08 } as const;

export interface FitIndices {
  chiSquare: number;
  df: number;
  p: number | null;
  baseline: { chiSquare: number; df: number };
  cfi: number | null;
  tli: number | null;
  rmsea: number | null;
  rmseaCI: [number, number] | null;
  srmr: number;
}

/**
 * The noncentrality λ at which P(χ²(df, λ) ≤ T) equals `target`, by bisection on the monotone CDF;
 * 0 when even the central distribution is below the target.
 */
function noncentralityFor(t: number, df: number, target: number): number {
  if (noncentralChiSquareCdf(t, df, 0) < target) return 0;
  let lo = 0;
  let hi = Math.max(1, t);
  while (noncentralChiSquareCdf(t, df, hi) > target) {
    hi *= 2;
    if (hi > 1e9) return hi;
  }
  for (let i = 0; i < 200 && hi - lo > 1e-10 * Math.max(1, hi); i++) {
    const mid = (lo + hi) / 2;
    if (noncentralChiSquareCdf(t, df, mid) > target) lo = mid;
    else hi = mid;
  }
  return (lo + hi) / 2;
}

/**
 * RMSEA = √(G·max(T − df, 0)/(df·(N − G))) for G groups (for one group, Steiger's (1990) √(max(T − df,
 * 0)/(df·(N − 1)))), with the 90% interval from the noncentralities at which T sits at the 95th and 5th
 * percentiles of the noncentral χ² (Browne & Cudeck 1993). Registry: `rmsea.steiger`, `rmsea.multigroup`.
 *
 * Cost: a few hundred noncentral χ² evaluations. Returns nulls for df = 0. Throws EngineError for
 * N ≤ G or a negative T.
 */
export function rmseaWithInterval(
  t: number,
  df: number,
  n: number,
  groups = 1,
): { rmsea: number | null; ci: [number, number] | null } {
  if (!(n > groups)) throw new EngineError(`RMSEA needs more cases than groups (N = ${n})`);
  if (!(t >= 0)) throw new EngineError(`a model chi-square must be non-negative (got ${t})`);
  if (df <= 0) return { rmsea: null, ci: null };
  const scale = (lambda: number) => Math.sqrt((groups * Math.max(lambda, 0)) / (df * (n - groups)));
  const lower = noncentralityFor(t, df, 0.95);
  const upper = noncentralityFor(t, df, 0.05);
  return { rmsea: scale(t - df), ci: [scale(lower), scale(upper)] };
}

/**
 * χ² test, CFI (Bentler 1990), TLI (Tucker & Lewis 1973), RMSEA with its 90% interval, from the model
 * and independence-model statistics. CFI = 1 − max(T − df, 0)/max(T₀ − df₀, T − df, 0); TLI =
 * (T₀/df₀ − T/df)/(T₀/df₀ − 1). Registry: `cfa.chi-square`, `fit.cfi`, `fit.tli`, `rmsea.steiger`.
 *
 * Cost: as rmseaWithInterval. Returns null for indices undefined at df = 0.
 */
export function fitIndices(
  t: number,
  df: number,
  t0: number,
  df0: number,
  n: number,
  srmr: number,
  groups = 1,
): FitIndices {
  const excess = Math.max(t - df, 0);
  const denom = Math.max(t0 - df0, t - df, 0);
  const cfi = denom > 0 ? 1 - excess / denom : df > 0 ? 1 : null;
  const tli = df > 0 && df0 > 0 && t0 / df0 !== 1 ? (t0 / df0 - t / df) / (t0 / df0 - 1) : null;
  const { rmsea, ci } = rmseaWithInterval(t, df, n, groups);
  return {
    chiSquare: t,
    df,
    p: df > 0 ? chiSquareSf(t, df) : null,
    baseline: { chiSquare: t0, df: df0 },
    cfi,
    tli,
    rmsea,
    rmseaCI: ci,
    srmr,
  };
}

/**
 * Standardized residuals s_ij/√(s_ii s_jj) − σ_ij/√(σ_ii σ_jj) (the observed minus the implied
 * correlations) and SRMR, the root mean square over the p(p + 1)/2 entries on and below the diagonal
 * (Hu & Bentler 1999; the diagonal entries are zero). Registry: `fit.srmr`.
 *
 * Cost: O(p²).
 */
export function standardizedResiduals(
  s: number[][],
  sigma: number[][],
): { residuals: number[][]; srmr: number } {
  const p = s.length;
  const residuals = Array.from({ length: p }, () => new Array<number>(p).fill(0));
  let sum = 0;
  for (let i = 0; i < p; i++) {
    for (let j = 0; j < i; j++) {
      const r = s[i][j] / Math.sqrt(s[i][i] * s[j][j]) - sigma[i][j] / Math.sqrt(sigma[i][i] * sigma[j][j]);
      residuals[i][j] = r;
      residuals[j][i] = r;
      sum += r * r;
    }
  }
  return { residuals, srmr: Math.sqrt(sum / ((p * (p + 1)) / 2)) };
}
