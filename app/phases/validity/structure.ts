import { getRun, listRuns, type RunRecord } from '../../../db/repos/analysis-runs.ts';
import type { Study } from '../../../db/study.ts';
import { completeCases } from '../../engine/cfa/model.ts';
import { canonicalJson } from '../../../db/canonical-json.ts';
import {
  type CfaJobInput,
  type CfaJobOutput,
  cfaJob,
  type InvarianceJobInput,
  type InvarianceJobOutput,
  invarianceJob,
} from '../../workers/validity.ts';
import { recordRun, requireOpen } from '../change.ts';
import { RuleError } from '../errors.ts';
import {
  type DataSource,
  exclusionsChange,
  itemAnswers,
  PHASE,
  sideColumns,
  validationDataset,
} from './data.ts';
import { engineModel, type MeasurementModel, modelInForce } from './model.ts';

/** Smallest group an invariance test takes (common practice: a CFA per group needs cases). */
export const MIN_INVARIANCE_GROUP = 100;

/** What every stored run of this phase records as its inputs. */
export interface StructureInputs {
  source: DataSource;
  model: MeasurementModel;
  items: string[];
  /** Respondents analysed (complete cases) and those left out for a missing answer. */
  n: number;
  incomplete: number;
  /** Which model decision was in force (null: the model built from purification). */
  modelDecisionId: number | null;
  groupColumn?: string;
  groups?: { name: string; n: number }[];
}

export interface PreparedCfa {
  studyPath: string;
  inputs: StructureInputs;
  job: CfaJobInput;
}

function modelData(study: Study) {
  requireOpen(study, PHASE);
  const dataset = validationDataset(study);
  const inForce = modelInForce(study);
  const items = inForce.model.factors.flatMap((f) => f.items);
  if (items.length === 0)
    throw new RuleError('the measurement model holds no items; finish purification or set the model first');
  const answers = itemAnswers(study, dataset, items);
  const { rows, kept } = completeCases(answers.data);
  return { dataset, inForce, items, answers, rows, kept };
}

/** Gathers what a CFA of the model in force on the current validation data needs. Writes nothing. */
export function prepareCfa(study: Study): PreparedCfa {
  const { inForce, items, answers, rows } = modelData(study);
  if (rows.length <= items.length) {
    throw new RuleError(
      `the validation data has ${rows.length} respondents with every item answered, too few for ${items.length} items`,
    );
  }
  return {
    studyPath: study.path,
    inputs: {
      source: answers.source,
      model: inForce.model,
      items,
      n: rows.length,
      incomplete: answers.data.length - rows.length,
      modelDecisionId: inForce.decision?.id ?? null,
    },
    job: { model: engineModel(inForce.model), items, rows },
  };
}

/** Stores a CFA run with its log row and returns the run id. */
export function storeCfa(study: Study, prepared: PreparedCfa, output: CfaJobOutput): number {
  return recordRun(study, {
    phase: PHASE,
    kind: 'cfa',
    label: `CFA on "${prepared.inputs.source.datasetName}" (n = ${prepared.inputs.n})`,
    inputs: { ...prepared.inputs },
    options: { estimator: 'ML', missing: 'listwise (complete cases)' },
    seed: null,
    results: output,
  });
}

/** A CFA run now, in this thread (the command line and the demo). */
export function runCfa(study: Study): number {
  const prepared = prepareCfa(study);
  const output = cfaJob(prepared.job, { progress: () => {}, shouldStop: () => false });
  return storeCfa(study, prepared, output);
}

export interface PreparedInvariance {
  studyPath: string;
  inputs: StructureInputs;
  job: InvarianceJobInput;
}

/**
 * Gathers an invariance test of the model in force across the levels of a group column of the
 * validation data (levels with fewer than MIN_INVARIANCE_GROUP complete cases are left out and
 * named). Writes nothing.
 */
export function prepareInvariance(study: Study, groupColumn: string): PreparedInvariance {
  const { dataset, inForce, items, answers, rows, kept } = modelData(study);
  const side = sideColumns(study, dataset.id);
  const labels = side.groups.get(groupColumn);
  if (!labels) {
    const known = [...side.groups.keys()];
    throw new RuleError(
      `the validation data has no group column "${groupColumn}"${known.length ? `; its group columns: ${known.join(', ')}` : ''}`,
    );
  }
  const byLevel = new Map<string, number[][]>();
  kept.forEach((r, i) => {
    const level = labels[r]?.trim() ?? '';
    if (level === '') return;
    byLevel.set(level, [...(byLevel.get(level) ?? []), rows[i]]);
  });
  const levels = [...byLevel.entries()].sort(([a], [b]) => a.localeCompare(b));
  const big = levels.filter(([, r]) => r.length >= MIN_INVARIANCE_GROUP);
  if (big.length < 2) {
    throw new RuleError(
      `an invariance test needs two groups of at least ${MIN_INVARIANCE_GROUP} complete cases; "${groupColumn}" has ${levels.map(([l, r]) => `${l}: ${r.length}`).join(', ') || 'no values'}`,
    );
  }
  return {
    studyPath: study.path,
    inputs: {
      source: answers.source,
      model: inForce.model,
      items,
      n: big.reduce((s, [, r]) => s + r.length, 0),
      incomplete: answers.data.length - rows.length,
      modelDecisionId: inForce.decision?.id ?? null,
      groupColumn,
      groups: levels.map(([name, r]) => ({ name, n: r.length })),
    },
    job: { model: engineModel(inForce.model), items, groups: big.map(([name, r]) => ({ name, rows: r })) },
  };
}

export function storeInvariance(
  study: Study,
  prepared: PreparedInvariance,
  output: InvarianceJobOutput,
): number {
  return recordRun(study, {
    phase: PHASE,
    kind: 'invariance',
    label: `Invariance across "${prepared.inputs.groupColumn}" on "${prepared.inputs.source.datasetName}"`,
    inputs: { ...prepared.inputs },
    options: { estimator: 'ML', missing: 'listwise (complete cases)', minimumGroup: MIN_INVARIANCE_GROUP },
    seed: null,
    results: output,
  });
}

export function runInvariance(study: Study, groupColumn: string): number {
  const prepared = prepareInvariance(study, groupColumn);
  const output = invarianceJob(prepared.job, { progress: () => {}, shouldStop: () => false });
  return storeInvariance(study, prepared, output);
}

/** A stored run with whether it still describes the current data and model. */
export interface StoredRun<R> {
  run: RunRecord;
  inputs: StructureInputs;
  results: R;
  /** Null when current; else why it no longer is. */
  outOfDate: string | null;
}

/** Why a run's inputs no longer match the current validation data and model (null if they do). */
export function outOfDateReason(study: Study, inputs: StructureInputs): string | null {
  let dataset: ReturnType<typeof validationDataset>;
  try {
    dataset = validationDataset(study);
  } catch {
    return 'no validation data is current now';
  }
  if (dataset.id !== inputs.source.datasetId)
    return `it ran on "${inputs.source.datasetName}"; the current validation data is "${dataset.name}"`;
  const model = modelInForce(study).model;
  if (canonicalJson(model) !== canonicalJson(inputs.model)) return 'the measurement model changed since';
  const change = exclusionsChange(study, inputs.source);
  return change === null ? null : `exclusions changed since (${change})`;
}

export function storedRun<R>(study: Study, run: RunRecord): StoredRun<R> {
  const inputs = run.inputs as unknown as StructureInputs;
  return { run, inputs, results: run.results as R, outOfDate: outOfDateReason(study, inputs) };
}

/** The latest run of a kind in this phase, if any. */
export function latestRun<R>(study: Study, kind: string): StoredRun<R> | null {
  const run = listRuns(study, { phase: PHASE, kind }).at(-1);
  return run ? storedRun<R>(study, run) : null;
}

/** One stored run of this phase by id; refuses runs of other phases. */
export function validityRun(study: Study, id: number): StoredRun<unknown> {
  const run = getRun(study, id);
  if (!run || run.phase !== PHASE)
    throw new RuleError(`analysis run ${id} is not a validity run`, 'not-found');
  return storedRun(study, run);
}
