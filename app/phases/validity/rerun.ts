import type { RunRecord } from '../../../db/repos/analysis-runs.ts';
import { getDatasetSummary } from '../../../db/repos/datasets.ts';
import type { Study } from '../../../db/study.ts';
import { completeCases } from '../../engine/cfa/model.ts';
import { cfaJob, invarianceJob } from '../../workers/validity.ts';
import { RuleError } from '../errors.ts';
import { InputsGone, type RerunKind } from '../history/rerun-kind.ts';
import { itemAnswers, sideColumns } from './data.ts';
import { engineModel } from './model.ts';
import { MIN_INVARIANCE_GROUP, type StructureInputs } from './structure.ts';

/**
 * Re-runs of the validity phase's structural analyses for `project verify`: the stored dataset's
 * rows of the stored items, complete cases, the stored measurement model, through the same worker
 * job the phase ran. A run made before respondents were excluded or readmitted cannot be rebuilt
 * from the file, and says so.
 */

const QUIET = { progress: () => {}, shouldStop: () => false };

function storedRows(study: Study, run: RunRecord) {
  const inputs = run.inputs as unknown as StructureInputs;
  const dataset = getDatasetSummary(study, inputs.source.datasetId);
  if (!dataset) {
    throw new RuleError(
      `dataset ${inputs.source.datasetId} ("${inputs.source.datasetName}") is no longer in the study`,
    );
  }
  const answers = itemAnswers(study, dataset, inputs.items);
  if (answers.source.excluded !== inputs.source.excluded) {
    throw new InputsGone(
      `the exclusions in "${dataset.name}" changed after this run (${inputs.source.excluded} respondents excluded then, ${answers.source.excluded} now)`,
    );
  }
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

/** The validity phase's entries in the registry of re-runnable run kinds. */
export const VALIDITY_RERUNS: Readonly<Record<string, RerunKind>> = { cfa, invariance };
