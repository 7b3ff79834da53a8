import type { RunRecord } from '../../../db/repos/analysis-runs.ts';
import { type DatasetSummary, getDatasetSummary } from '../../../db/repos/datasets.ts';
import type { Study } from '../../../db/study.ts';
import { completeCases } from '../../engine/cfa/model.ts';
import { DEFAULT_ICC_LEVEL } from '../../engine/icc.ts';
import { cfaJob, invarianceJob } from '../../workers/validity.ts';
import { declaredBounds } from '../analysis-data.ts';
import { RuleError } from '../errors.ts';
import { InputsGone, type RerunKind } from '../history/rerun-kind.ts';
import { type DataSource, exclusionsChange, itemAnswers, sideColumns } from './data.ts';
import { engineModel } from './model.ts';
import { RELATIONS_LEVEL, type RelationsResults, relationsAnalysis, type ScoreRule } from './relations.ts';
import { linkOccasions, occasion, retestAnalysis } from './retest.ts';
import type { GroupSetting, MeasureSetting } from './settings.ts';
import type { RelationRecord } from '../../../db/repos/construct.ts';
import { MIN_INVARIANCE_GROUP, type StructureInputs } from './structure.ts';

/**
 * Re-runs of the validity phase's analyses for `project verify`: each from the datasets its run
 * stored (by id), the stored items, keys, model, column settings and options, through the same
 * computation the phase ran. A run made before respondents were excluded or readmitted cannot be
 * rebuilt from the file, and says so.
 */

const QUIET = { progress: () => {}, shouldStop: () => false };

/**
 * A dataset a run read, by its stored source: a break when the study no longer holds it; its
 * inputs gone when its exclusions changed after the run (the file keeps only the current ones).
 */
function storedDataset(study: Study, source: DataSource): DatasetSummary {
  const dataset = getDatasetSummary(study, source.datasetId);
  if (!dataset) {
    throw new RuleError(`dataset ${source.datasetId} ("${source.datasetName}") is no longer in the study`);
  }
  const change = exclusionsChange(study, source);
  if (change !== null) {
    throw new InputsGone(`the exclusions in "${dataset.name}" changed after this run (${change})`);
  }
  return dataset;
}

function storedRows(study: Study, run: RunRecord) {
  const inputs = run.inputs as unknown as StructureInputs;
  const dataset = storedDataset(study, inputs.source);
  const answers = itemAnswers(study, dataset, inputs.items);
  return { inputs, dataset, ...completeCases(answers.data) };
}

const cfa: RerunKind = {
  title: 'confirmatory factor analysis',
  rerun(study, run) {
    const { inputs, rows } = storedRows(study, run);
    return cfaJob({ model: engineModel(inputs.model), items: inputs.items, rows }, QUIET);
  },
};

const invariance: RerunKind = {
  title: 'measurement invariance',
  rerun(study, run) {
    const { inputs, dataset, rows, kept } = storedRows(study, run);
    const column = inputs.groupColumn ?? '';
    const labels = sideColumns(study, dataset.id).groups.get(column);
    if (!labels) throw new RuleError(`dataset "${dataset.name}" has no group column "${column}"`);
    const minimum = Number((run.options as { minimumGroup?: unknown }).minimumGroup ?? MIN_INVARIANCE_GROUP);
    const byLevel = new Map<string, number[][]>();
    kept.forEach((r, i) => {
      const level = labels[r]?.trim() ?? '';
      if (level !== '') byLevel.set(level, [...(byLevel.get(level) ?? []), rows[i]]);
    });
    const groups = [...byLevel.entries()]
      .sort(([a], [b]) => a.localeCompare(b))
      .filter(([, r]) => r.length >= minimum)
      .map(([name, r]) => ({ name, rows: r }));
    return invarianceJob({ model: engineModel(inputs.model), items: inputs.items, groups }, QUIET);
  },
};

/** The confidence level a run stored among its options, else the level the phase uses. */
function storedLevel(run: RunRecord, fallback: number): number {
  const level = (run.options as { level?: unknown }).level;
  return typeof level === 'number' ? level : fallback;
}

/**
 * `recomputed` in the order `stored` lists the same entries (by key), entries it does not list
 * last. The order of the criterion and group columns is the order they were described in, which
 * the stored inputs (an object by column) do not keep; it is presentation, not a result.
 */
function inStoredOrder<T>(recomputed: T[], stored: T[] | undefined, key: (x: T) => string): T[] {
  const position = new Map((stored ?? []).map((x, i) => [key(x), i]));
  const at = (x: T) => position.get(key(x)) ?? Number.POSITIVE_INFINITY;
  return [...recomputed].sort((a, b) => at(a) - at(b));
}

interface StoredRelationsInputs {
  source: DataSource;
  items: string[];
  /** Absent in runs stored before the score rule was kept among the inputs. */
  score?: ScoreRule;
  measures: Record<string, MeasureSetting & { rationale: string }>;
  groups: Record<string, GroupSetting & { rationale: string }>;
  relations: RelationRecord[];
}

/**
 * Relations to other variables: the stored dataset's rows of the stored items, scored with the
 * stored score rule, against the criterion and group columns as the run's stored settings read
 * them, with the planned relations it stored. A run stored before the score rule was kept among
 * its inputs is scored with the name and keys its results report and the declared bounds.
 */
const relations: RerunKind = {
  title: 'analysis of relations to other variables',
  rerun(study, run) {
    const inputs = run.inputs as unknown as StoredRelationsInputs;
    const stored = run.results as Partial<RelationsResults>;
    const score = inputs.score ?? {
      name: stored.score?.name ?? '',
      reverse: stored.score?.reverse ?? [],
      bounds: declaredBounds(study),
    };
    const { results } = relationsAnalysis(study, {
      dataset: storedDataset(study, inputs.source),
      items: inputs.items,
      score,
      measures: Object.entries(inputs.measures ?? {}),
      groups: Object.entries(inputs.groups ?? {}),
      relations: inputs.relations ?? [],
      level: storedLevel(run, RELATIONS_LEVEL),
    });
    return {
      ...results,
      measures: inStoredOrder(results.measures, stored.measures, (m) => m.column),
      groups: inStoredOrder(results.groups, stored.groups, (g) => g.column),
      warnings: inStoredOrder(results.warnings, stored.warnings, (w) => w),
    };
  },
};

interface StoredRetestInputs {
  first: DataSource;
  second: DataSource;
  items: string[];
  reverse: string[];
  /** Absent in runs stored before the bounds were kept among the inputs. */
  bounds?: { min: number; max: number };
}

/**
 * Test–retest reliability: the stored retest dataset's totals of the stored items and keys,
 * linked to the stored first-occasion dataset as the phase links them (retest-link column or
 * respondent id, whichever links more), at the stored confidence level.
 */
const retest: RerunKind = {
  title: 'test–retest analysis',
  rerun(study, run) {
    const inputs = run.inputs as unknown as StoredRetestInputs;
    const score = {
      items: inputs.items,
      reverse: inputs.reverse,
      bounds: inputs.bounds ?? declaredBounds(study),
    };
    const first = storedDataset(study, inputs.first);
    const second = occasion(study, storedDataset(study, inputs.second), score);
    const link = linkOccasions(study, first, score, second);
    if (!link) {
      throw new RuleError(
        `no respondent of "${second.dataset.name}" links to "${first.name}" by respondent id or retest link`,
      );
    }
    return retestAnalysis(link, second, storedLevel(run, DEFAULT_ICC_LEVEL));
  },
};

/** The validity phase's entries in the registry of re-runnable run kinds. */
export const VALIDITY_RERUNS: Readonly<Record<string, RerunKind>> = { cfa, invariance, relations, retest };
