import {
  currentDatasetChoice,
  type DatasetChoice,
  type DatasetRole,
  type DatasetSummary,
  insertDatasetChoice,
} from '../../../db/repos/datasets.ts';
import type { Study } from '../../../db/study.ts';
import { changeInPhase } from '../change.ts';
import { currentDataset } from '../analysis-data.ts';
import { RuleError } from '../errors.ts';
import { ROLE_LABEL, checkReason, phaseOfRole, requireDataset, roundsOn } from './common.ts';

export function recordChoice(
  study: Study,
  role: DatasetRole,
  datasetId: number | null,
  reason: string,
): void {
  const before = currentDataset(study, role);
  const chosen = datasetId === null ? undefined : requireDataset(study, datasetId);
  const affected = before ? roundsOn(study, before.id) : [];
  const made = chosen !== undefined;
  const subject = made ? chosen : (before as DatasetSummary);
  changeInPhase(
    study,
    {
      phase: phaseOfRole(role),
      kind: made ? 'dataset-made-current' : 'dataset-withdrawn',
      target: `${ROLE_LABEL[role]} "${subject.name}"`,
      rationale: reason,
      detail: {
        role,
        datasetId: made ? chosen.id : null,
        dataset: made ? chosen.name : null,
        fileSha256: made ? chosen.fileSha256 : null,
        previous: before ? { datasetId: before.id, dataset: before.name } : null,
        roundsOnPrevious: affected,
      },
    },
    () => insertDatasetChoice(study, { role, datasetId, reason }),
  );
}

/**
 * Makes a dataset the one its role's analyses use, as a logged decision with the researcher's reason;
 * rounds that ran on another dataset are then out of date (see roundSummaries). Reversible by a later
 * choice. Cost O(rounds). Throws RuleError for an unknown dataset, a dataset already current, a blank
 * or overlong reason, or a signed-off phase.
 */
export function makeDatasetCurrent(study: Study, datasetId: number, reason: string): DatasetChoice {
  const summary = requireDataset(study, datasetId);
  const why = checkReason(reason, `"${summary.name}" becomes the current ${ROLE_LABEL[summary.role]}`);
  if (currentDataset(study, summary.role)?.id === datasetId) {
    throw new RuleError(
      `"${summary.name}" (dataset ${datasetId}) is already the current ${ROLE_LABEL[summary.role]}`,
    );
  }
  recordChoice(study, summary.role, datasetId, why);
  return currentDatasetChoice(study, summary.role) as DatasetChoice;
}

/**
 * Withdraws the current dataset of its role: no dataset of that role is current until one is made
 * current again (the withdrawn one included). A logged decision with the researcher's reason. Cost
 * O(rounds). Throws RuleError for an unknown dataset, one that is not current, a blank or overlong
 * reason, or a signed-off phase.
 */
export function withdrawDataset(study: Study, datasetId: number, reason: string): DatasetChoice {
  const summary = requireDataset(study, datasetId);
  const why = checkReason(reason, `"${summary.name}" is withdrawn`);
  if (currentDataset(study, summary.role)?.id !== datasetId) {
    throw new RuleError(
      `"${summary.name}" (dataset ${datasetId}) is not the current ${ROLE_LABEL[summary.role]}; only the current dataset can be withdrawn`,
    );
  }
  recordChoice(study, summary.role, null, why);
  return currentDatasetChoice(study, summary.role) as DatasetChoice;
}
