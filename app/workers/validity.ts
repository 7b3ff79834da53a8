import {
  constructReliability,
  covarianceToCorrelation,
  type FactorReliability,
  htmt,
  type HtmtPair,
} from '../engine/cfa/construct-reliability.ts';
import { type CfaResult, fitCfa } from '../engine/cfa/fit.ts';
import { type InvarianceResult, measurementInvariance } from '../engine/cfa/invariance.ts';
import { type CfaModel, sampleMoments } from '../engine/cfa/model.ts';
import { EngineError } from '../engine/errors.ts';

/** What a context offers a validity job (the same shape as a worker's JobContext). */
interface Control {
  progress(done: number, total: number, note?: string): void;
  shouldStop(): boolean;
}

export interface CfaJobInput {
  model: CfaModel;
  items: string[];
  /** Complete cases, respondents × items in `items` order. */
  rows: number[][];
}

export interface CfaJobOutput {
  fit: CfaResult;
  /** pattern[i][j]: item i indicates factor j (items and factors in the fit's order). */
  pattern: boolean[][];
  reliability: FactorReliability[];
  htmt: HtmtPair[];
}

function stopIfAsked(ctx: Control): void {
  if (ctx.shouldStop()) throw new EngineError('the analysis was cancelled', 'cancelled');
}

/**
 * A confirmatory factor analysis on complete cases, then composite reliability, AVE and the
 * Fornell–Larcker comparison from its standardized solution, and HTMT from the item correlations.
 * Registry: `cfa.ml`, `cr.composite`, `ave`, `fornell-larcker`, `htmt`.
 */
export function cfaJob(input: CfaJobInput, ctx: Control): CfaJobOutput {
  ctx.progress(0, 2, 'fitting the model');
  const moments = sampleMoments('validation sample', input.items, input.rows);
  const fit = fitCfa(input.model, [moments]);
  stopIfAsked(ctx);
  ctx.progress(1, 2, 'composite reliability and HTMT');
  const pattern = fit.items.map((item) =>
    fit.factors.map((f) => input.model.factors.find((x) => x.name === f)?.items.includes(item) ?? false),
  );
  const solution = fit.groups[0];
  const reliability = constructReliability(
    fit.factors,
    fit.items,
    pattern,
    solution.standardizedLoadings,
    solution.standardizedResidualVariances,
    solution.factorCorrelations,
  );
  const order = fit.items.map((item) => input.items.indexOf(item));
  const corr = covarianceToCorrelation(moments.cov);
  const reordered = order.map((a) => order.map((b) => corr[a][b]));
  const pairs = fit.factors.length > 1 ? htmt(fit.factors, fit.items, pattern, reordered) : [];
  ctx.progress(2, 2, 'done');
  return { fit, pattern, reliability, htmt: pairs };
}

export interface InvarianceJobInput {
  model: CfaModel;
  items: string[];
  groups: { name: string; rows: number[][] }[];
}

/** A parameter held equal across groups that differs most between them in the configural model. */
export interface ReleaseCandidate {
  constraint: 'loading' | 'intercept';
  item: string;
  factor: string;
  /** The largest between-group difference of the configural estimate (standardized loading, or intercept). */
  spread: number;
  byGroup: { group: string; value: number }[];
}

export interface InvarianceJobOutput {
  result: InvarianceResult;
  /** For a step that fails: the equality constraints whose configural estimates differ most. */
  candidates: { step: 'metric' | 'scalar'; items: ReleaseCandidate[] }[];
}

const MAX_CANDIDATES = 5;

/**
 * The configural, metric and scalar models across groups, and, for each step that fails, the
 * loadings (metric) or intercepts (scalar) whose group estimates in the configural model lie
 * furthest apart: the first constraints to consider freeing for partial invariance. Registry:
 * `cfa.invariance`, `invariance.delta-cfi`, `rmsea.multigroup`, `invariance.partial`.
 */
export function invarianceJob(input: InvarianceJobInput, ctx: Control): InvarianceJobOutput {
  ctx.progress(0, 1, 'configural, metric and scalar models');
  const moments = input.groups.map((g) => sampleMoments(g.name, input.items, g.rows));
  stopIfAsked(ctx);
  const result = measurementInvariance(input.model, moments);
  ctx.progress(1, 1, 'done');
  const configural = result.steps[0].fit;
  const candidates: InvarianceJobOutput['candidates'] = [];
  for (const step of result.steps) {
    if (step.step === 'configural' || step.holds) continue;
    const items: ReleaseCandidate[] = [];
    configural.items.forEach((item, i) => {
      configural.factors.forEach((factor, j) => {
        const own = input.model.factors.find((f) => f.name === factor)?.items.includes(item);
        if (!own) return;
        const byGroup = configural.groups.map((g) => ({
          group: g.name,
          value: step.step === 'metric' ? g.standardizedLoadings[i][j] : (g.intercepts?.[i] ?? 0),
        }));
        const values = byGroup.map((v) => v.value);
        items.push({
          constraint: step.step === 'metric' ? 'loading' : 'intercept',
          item,
          factor,
          spread: Math.max(...values) - Math.min(...values),
          byGroup,
        });
      });
    });
    items.sort((a, b) => b.spread - a.spread);
    candidates.push({ step: step.step, items: items.slice(0, MAX_CANDIDATES) });
  }
  return { result, candidates };
}
