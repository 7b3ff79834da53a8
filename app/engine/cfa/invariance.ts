import { chiSquareSf } from '../distributions.ts';
import { EngineError } from '../errors.ts';
import { FIT_CUTOFFS } from './fit-indices.ts';
import { type CfaResult, fitCfa } from './fit.ts';
import type { CfaModel, GroupMoments } from './model.ts';

/** Largest drop in CFI from one step to the next that still counts as invariance (Cheung & Rensvold 2002, from memory). */
export const DELTA_CFI_MAX = 0.01;

export type InvarianceLevel = 'none' | 'configural' | 'metric' | 'scalar';

export interface InvarianceStep {
  step: 'configural' | 'metric' | 'scalar';
  fit: CfaResult;
  /** Against the previous step (null for configural). */
  deltaChiSquare: number | null;
  deltaDf: number | null;
  deltaP: number | null;
  /** CFI of the previous step minus this one's: positive is a loss of fit. */
  deltaCfi: number | null;
  deltaRmsea: number | null;
  holds: boolean;
}

export interface InvarianceResult {
  groups: string[];
  steps: InvarianceStep[];
  level: InvarianceLevel;
  /** One plain sentence saying the level reached and the rule that decided it. */
  statement: string;
  warnings: string[];
}

/**
 * Measurement invariance across groups: the configural, metric (equal loadings) and scalar (equal
 * loadings and intercepts) multi-group ML models, each compared with the previous by Δχ² (with its df
 * and p), ΔCFI and ΔRMSEA. The rule: configural invariance holds when that model converges to a proper
 * solution with CFI ≥ .95; each further step holds when the one before holds and CFI drops by at most
 * .01 (Cheung & Rensvold 2002, from memory). Δχ² is reported beside it; with large groups it rejects
 * trivial differences. Registry: `cfa.invariance`, `invariance.delta-cfi`, `cfa.ml`.
 *
 * Cost: three multi-group fits. Throws EngineError with fewer than two groups, a group without means,
 * and what fitCfa throws.
 */
export function measurementInvariance(model: CfaModel, groups: GroupMoments[]): InvarianceResult {
  if (groups.length < 2)
    throw new EngineError(`an invariance test needs at least two groups; got ${groups.length}`);
  const steps: InvarianceStep[] = [];
  const warnings: string[] = [];
  let previous: InvarianceStep | null = null;
  for (const step of ['configural', 'metric', 'scalar'] as const) {
    const fit = fitCfa(model, groups, step);
    for (const w of fit.warnings) warnings.push(`${step} model: ${w}`);
    let current: InvarianceStep;
    if (previous === null) {
      current = {
        step,
        fit,
        deltaChiSquare: null,
        deltaDf: null,
        deltaP: null,
        deltaCfi: null,
        deltaRmsea: null,
        holds:
          fit.converged &&
          !fit.improper &&
          fit.unidentified.length === 0 &&
          (fit.cfi ?? 0) >= FIT_CUTOFFS.cfi,
      };
    } else {
      const prev = previous.fit;
      const deltaChiSquare = Math.max(fit.chiSquare - prev.chiSquare, 0);
      const deltaDf = fit.df - prev.df;
      const deltaCfi = prev.cfi !== null && fit.cfi !== null ? prev.cfi - fit.cfi : null;
      current = {
        step,
        fit,
        deltaChiSquare,
        deltaDf,
        deltaP: deltaDf > 0 ? chiSquareSf(deltaChiSquare, deltaDf) : null,
        deltaCfi,
        deltaRmsea: prev.rmsea !== null && fit.rmsea !== null ? fit.rmsea - prev.rmsea : null,
        holds: previous.holds && fit.converged && deltaCfi !== null && deltaCfi <= DELTA_CFI_MAX,
      };
    }
    steps.push(current);
    previous = current;
  }
  const reached = steps.filter((s) => s.holds);
  const level: InvarianceLevel = reached.length === 0 ? 'none' : reached[reached.length - 1].step;
  const names = groups.map((g) => `"${g.name}"`).join(', ');
  const rule =
    'rule: the configural model converges to a proper solution with CFI ≥ .95, and each further step loses at most .01 of CFI';
  let statement: string;
  if (level === 'none') {
    statement = `Not even configural invariance was reached across ${names}: the same factor pattern does not fit every group well (${rule}).`;
  } else {
    const meaning =
      level === 'scalar'
        ? 'loadings and intercepts are equal, so factor means and scale scores can be compared across groups'
        : level === 'metric'
          ? 'loadings are equal, so relations (correlations, regressions) can be compared, but not means'
          : 'the same items indicate the same factors, but loadings differ, so neither relations nor means are comparable';
    statement = `${level[0].toUpperCase()}${level.slice(1)} invariance was reached across ${names}: ${meaning} (${rule}).`;
  }
  const flagged = steps.filter((s) => s.holds && s.deltaP !== null && s.deltaP < 0.05);
  if (flagged.length > 0) {
    statement += ` The Δχ² test is significant at .05 for the ${flagged.map((s) => s.step).join(' and ')} step; with large groups it detects small differences.`;
  }
  return { groups: groups.map((g) => g.name), steps, level, statement, warnings };
}
