import { getConstruct, type RelationRecord } from '../../../db/repos/construct.ts';
import type { DatasetSummary } from '../../../db/repos/datasets.ts';
import type { Study } from '../../../db/study.ts';
import { cronbachAlpha } from '../../engine/reliability/alpha.ts';
import { completeCases } from '../../engine/cfa/model.ts';
import { covarianceMatrix } from '../../engine/linalg.ts';
import { reverseScore, type ScaleBounds } from '../../engine/scoring.ts';
import { type CriterionCorrelation, criterionCorrelation } from '../../engine/validity/correlation.ts';
import {
  type AnovaResult,
  oneWayAnova,
  type WelchComparison,
  welchComparison,
} from '../../engine/validity/groups.ts';
import {
  evaluateHypothesis,
  HYPOTHESIS_RULE,
  type HypothesisOutcome,
} from '../../engine/validity/hypotheses.ts';
import { regressOnScore, type SimpleRegression } from '../../engine/validity/regression.ts';
import { scaleScores } from '../../engine/validity/scores.ts';
import { EngineError } from '../../engine/errors.ts';
import { declaredBounds } from '../analysis-data.ts';
import { recordRun, requireOpen } from '../change.ts';
import { RuleError } from '../errors.ts';
import {
  type DataSource,
  itemAnswers,
  PHASE,
  retainedItems,
  sideColumns,
  validationDataset,
} from './data.ts';
import { modelInForce } from './model.ts';
import {
  type GroupSetting,
  groupSettings,
  type MeasureSetting,
  measureSettings,
  plannedRelations,
} from './settings.ts';

/** Points kept for a scatter chart of score against a measure (every point up to this many). */
const MAX_POINTS = 2_000;

export interface MeasureResult {
  column: string;
  relationId: number | null;
  timing: 'concurrent' | 'predictive';
  reliability: number | null;
  correlation: CriterionCorrelation;
  regression: SimpleRegression;
  points: [number, number][];
}

export interface GroupResult {
  column: string;
  relationId: number | null;
  comparison: WelchComparison;
  /** The interval of d: the Welch interval of the mean difference over the pooled SD. */
  dLower: number;
  dUpper: number;
  anova: AnovaResult | null;
}

export interface HypothesisResult {
  relationId: number;
  otherConstruct: string;
  kind: RelationRecord['kind'];
  expectedSign: RelationRecord['expectedSign'];
  expectedStrength: RelationRecord['expectedStrength'];
  /** The column that answers it, or null when none is described. */
  column: string | null;
  metric: 'r' | 'd' | null;
  observed: { estimate: number; lower: number; upper: number } | null;
  outcome: HypothesisOutcome | null;
  /** Why it could not be tested, when it could not. */
  untested: string | null;
}

export interface RelationsResults {
  score: { name: string; items: string[]; reverse: string[]; method: 'sum'; alpha: number; n: number };
  measures: MeasureResult[];
  groups: GroupResult[];
  hypotheses: HypothesisResult[];
  rule: string;
  warnings: string[];
}

/** How the total score is made: its name, the items reverse-keyed and the declared bounds reversal uses. */
export interface ScoreRule {
  name: string;
  reverse: string[];
  bounds: ScaleBounds;
}

/**
 * Everything a relations analysis reads: the dataset and its items, the score rule, how each
 * criterion and group column is read (in the order they were described), the planned relations
 * and the confidence level. The action gathers it from the study's current state; the re-run
 * from what the run stored.
 */
export interface RelationsSetup {
  dataset: DatasetSummary;
  items: string[];
  score: ScoreRule;
  measures: [string, MeasureSetting & { rationale: string }][];
  groups: [string, GroupSetting & { rationale: string }][];
  relations: RelationRecord[];
  level: number;
}

/** The confidence level of every interval of a relations run. */
export const RELATIONS_LEVEL = 0.95;

/**
 * The relations analysis of a setup (see runRelations for what it computes), with where its data
 * came from. Reads only; the one computation behind the action and its re-run.
 */
export function relationsAnalysis(
  study: Study,
  setup: RelationsSetup,
): { results: RelationsResults; source: DataSource; n: number; incomplete: number } {
  const { dataset, items, score, level } = setup;
  if (items.length < 2) throw new RuleError('the measurement model holds fewer than two items');
  const answers = itemAnswers(study, dataset, items);
  const total = scaleScores(
    items,
    answers.data,
    [{ name: score.name, items, reverse: score.reverse }],
    'sum',
    score.bounds,
  )[score.name];
  const { rows } = completeCases(reverseScore(answers.data, items, score.reverse, score.bounds));
  const alpha = cronbachAlpha(covarianceMatrix(rows));
  const side = sideColumns(study, dataset.id);
  const warnings: string[] = [];
  const measures: MeasureResult[] = [];
  for (const [column, setting] of setup.measures) {
    const values = side.measures.get(column);
    if (!values) {
      warnings.push(`column "${column}" is described but not in the current validation data`);
      continue;
    }
    try {
      const correlation = criterionCorrelation(column, total, values, {
        timing: setting.timing,
        reliabilityScore: alpha > 0 ? Math.min(alpha, 1) : undefined,
        reliabilityCriterion: setting.reliability ?? undefined,
        level,
      });
      const regression = regressOnScore(values, total, level);
      const points: [number, number][] = [];
      total.forEach((x, i) => {
        const y = values[i];
        if (x !== null && y !== null && points.length < MAX_POINTS) points.push([x, y]);
      });
      measures.push({ column, ...setting, correlation, regression, points });
    } catch (error) {
      if (!(error instanceof EngineError)) throw error;
      warnings.push(`column "${column}": ${error.message}`);
    }
  }
  const groups: GroupResult[] = [];
  for (const [column, setting] of setup.groups) {
    const labels = side.groups.get(column);
    if (!labels) {
      warnings.push(`group column "${column}" is described but not in the current validation data`);
      continue;
    }
    const valuesOf = (level: string) => total.filter((_, i) => labels[i]?.trim() === level);
    try {
      const comparison = welchComparison(
        { name: setting.higher, values: valuesOf(setting.higher) },
        { name: setting.lower, values: valuesOf(setting.lower) },
        level,
      );
      const pooled = comparison.difference / comparison.cohensD;
      const levels = [...new Set(labels.map((l) => l.trim()).filter((l) => l !== ''))].sort();
      const anova =
        levels.length >= 2 ? oneWayAnova(levels.map((l) => ({ name: l, values: valuesOf(l) }))) : null;
      groups.push({
        column,
        relationId: setting.relationId,
        comparison,
        dLower: comparison.lower / pooled,
        dUpper: comparison.upper / pooled,
        anova,
      });
    } catch (error) {
      if (!(error instanceof EngineError)) throw error;
      warnings.push(`group column "${column}": ${error.message}`);
    }
  }
  const hypotheses = setup.relations.map((r): HypothesisResult => {
    const base = {
      relationId: r.id,
      otherConstruct: r.otherConstruct,
      kind: r.kind,
      expectedSign: r.expectedSign,
      expectedStrength: r.expectedStrength,
    };
    const m = measures.find((x) => x.relationId === r.id);
    const g = groups.find((x) => x.relationId === r.id);
    const observed = m
      ? { estimate: m.correlation.r, lower: m.correlation.lower, upper: m.correlation.upper }
      : g
        ? { estimate: g.comparison.cohensD, lower: g.dLower, upper: g.dUpper }
        : null;
    if (!observed) {
      return {
        ...base,
        column: null,
        metric: null,
        observed: null,
        outcome: null,
        untested: 'no column of the validation data is described as answering it',
      };
    }
    const metric = m ? 'r' : 'd';
    const outcome = evaluateHypothesis(
      { sign: r.expectedSign, strength: r.expectedStrength },
      observed,
      metric,
    );
    return { ...base, column: (m ?? g)?.column ?? null, metric, observed, outcome, untested: null };
  });
  const results: RelationsResults = {
    score: { name: score.name, items, reverse: score.reverse, method: 'sum', alpha, n: rows.length },
    measures,
    groups,
    hypotheses,
    rule: HYPOTHESIS_RULE,
    warnings,
  };
  return { results, source: answers.source, n: rows.length, incomplete: answers.data.length - rows.length };
}

/**
 * Relations to other variables on the current validation data: the total score (retained items,
 * reverse keys applied, summed) against each described measure (Pearson r with its Fisher-z
 * interval, corrected for attenuation with alpha of the score and the measure's stated reliability,
 * and the regression of the measure on the score), the described known groups (Welch t, d, g and the
 * one-way ANOVA over every level), and each planned relation tested by the stated rule. Stored as
 * one run with its log row; its inputs hold what relationsAnalysis needs to compute it again.
 * Registry: `correlation.pearson`, `correlation.fisher-z`, `validity.disattenuation`,
 * `regression.ols`, `t.welch`, `d.cohen`, `g.hedges`, `anova.one-way`, `validity.hypotheses`,
 * `effect.bands`.
 */
export function runRelations(study: Study): number {
  requireOpen(study, PHASE);
  const dataset = validationDataset(study);
  const model = modelInForce(study);
  const items = model.model.factors.flatMap((f) => f.items);
  const keying = new Map(retainedItems(study).items.map((it) => [it.code, it.keying]));
  const score: ScoreRule = {
    name: getConstruct(study).name || 'scale',
    reverse: items.filter((code) => keying.get(code) === 'reverse'),
    bounds: declaredBounds(study),
  };
  const measures = measureSettings(study);
  const groups = groupSettings(study);
  const relations = plannedRelations(study);
  const { results, source, n, incomplete } = relationsAnalysis(study, {
    dataset,
    items,
    score,
    measures: [...measures],
    groups: [...groups],
    relations,
    level: RELATIONS_LEVEL,
  });
  const inputs = {
    source,
    model: model.model,
    items,
    score,
    n,
    incomplete,
    modelDecisionId: model.decision?.id ?? null,
    measures: Object.fromEntries(measures),
    groups: Object.fromEntries(groups),
    relations,
  };
  return recordRun(study, {
    phase: PHASE,
    kind: 'relations',
    label: `Relations to other variables on "${dataset.name}"`,
    inputs,
    options: { score: 'sum of the retained items, reverse keys applied', level: RELATIONS_LEVEL },
    seed: null,
    results,
  });
}
