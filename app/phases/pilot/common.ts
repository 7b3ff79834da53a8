import { listRuns, type RunRecord } from '../../../db/repos/analysis-runs.ts';
import { listRounds } from '../../../db/repos/purification.ts';
import { type DatasetRole, type DatasetSummary, getDatasetSummary } from '../../../db/repos/datasets.ts';
import type { PhaseId } from '../../../db/repos/phase-state.ts';
import type { Study } from '../../../db/study.ts';
import type { ScreeningCheck } from '../../engine/screening.ts';
import { DECIMAL_MARK_ROWS } from '../../import/limits.ts';
import type { TableError } from '../../import/table-error.ts';
import { currentDataset } from '../analysis-data.ts';
import { RuleError } from '../errors.ts';

/**
 * The pilot data phase: importing data files into the study (pilot, validation and retest data),
 * screening respondents, and the researcher's exclusions. Nothing is stored until an import is
 * confirmed; screening proposes and the researcher decides; every exclusion is a logged decision with
 * its reason and can be reversed by a later one. The stored responses are never altered: reverse keys
 * are applied at scoring time, from the item pool.
 */

/** Largest file the desktop and browser screens send (it travels as base64 inside one command). */
export const MAX_UPLOAD_BYTES = 128 * 1024 * 1024;

/** Rows of the file shown in the preview. */
export const PREVIEW_SHOWN_ROWS = 20;

/** Rows of the file's start looked at for likely missing-value codes. */
export const SUGGESTION_ROWS = DECIMAL_MARK_ROWS;

/** Most suggested missing-value codes shown. */
export const MAX_SUGGESTIONS = 8;

/** Longest dataset name and exclusion reason accepted. */
export const MAX_DATASET_NAME = 200;
export const MAX_REASON = 10_000;

/** Most declared missing-value codes per dataset. */
export const MAX_MISSING_CODES = 20;

export const DATASET_ROLES = ['pilot', 'validation', 'retest'] as const satisfies readonly DatasetRole[];

export const ROLE_LABEL: Record<DatasetRole, string> = {
  pilot: 'pilot data',
  validation: 'validation data',
  retest: 'retest data',
};

/**
 * The phase whose log an import and its exclusions belong to: pilot and retest data to the pilot
 * phase (a retest of the pilot sample), validation data to the validity phase.
 */
export function phaseOfRole(role: DatasetRole): PhaseId {
  return role === 'validation' ? 'validity' : 'pilot';
}

/** Screening checks in words, for tables, filters and the log. */
export const CHECK_LABEL: Record<ScreeningCheck, string> = {
  longstring: 'long run of one answer',
  irv: 'no variation',
  mahalanobis: 'multivariate outlier',
  attention: 'attention check',
  duplicateId: 'duplicate id',
  speeder: 'too fast',
  missing: 'many unanswered',
};

/** Every screening check, in the order tables show them. */
export const SCREENING_CHECKS = [
  'longstring',
  'irv',
  'mahalanobis',
  'attention',
  'duplicateId',
  'speeder',
  'missing',
] as const satisfies readonly ScreeningCheck[];

export function plural(n: number, word: string, many = `${word}s`): string {
  return `${n} ${n === 1 ? word : many}`;
}

/** "480 respondents, 12 excluded": how every count of a dataset is stated. */
export function respondentCount(respondents: number, excluded: number): string {
  return `${plural(respondents, 'respondent')}, ${excluded} excluded`;
}

/** The message for a file that cannot be read, as the researcher sees it (row and column included). */
export function fileError(fileName: string, error: TableError): RuleError {
  const message = error.message.includes(fileName) ? error.message : `${fileName}: ${error.message}`;
  return new RuleError(message, 'file');
}

export function requireDataset(study: Study, id: number): DatasetSummary {
  const summary = getDatasetSummary(study, id);
  if (!summary) throw new RuleError(`dataset ${id} does not exist in this study`, 'not-found');
  return summary;
}

// ── Preview ─────────────────────────────────────────────────────────────────────────────────────

/** Purification rounds that ran on a dataset (only pilot data has rounds). */
export function roundsOn(study: Study, datasetId: number): number[] {
  return listRounds(study)
    .filter((r) => r.datasetId === datasetId)
    .map((r) => r.number);
}

function roundList(numbers: number[]): string {
  return numbers.length === 1 ? `round ${numbers[0]}` : `rounds ${list(numbers.map(String))}`;
}

/**
 * What an import into a role does to the study's choice of data, in words the import screen and the
 * command line show before and after: the current dataset (if any) and the rounds that ran on it.
 */
export function importChoice(study: Study, role: DatasetRole) {
  const current = currentDataset(study, role);
  const rounds = current ? roundsOn(study, current.id) : [];
  return {
    role,
    current: current ? { id: current.id, name: current.name, respondents: current.respondents } : null,
    roundsOnCurrent: rounds,
    /** Without a choice, the import becomes current only when there is no current dataset. */
    defaultMakeCurrent: current === undefined,
    ifMadeCurrent: current
      ? `the new file replaces "${current.name}" as the current ${ROLE_LABEL[role]}` +
        (rounds.length > 0
          ? `; ${roundList(rounds)} ran on "${current.name}" and will be marked out of date`
          : '')
      : `the new file becomes the current ${ROLE_LABEL[role]}`,
    ifKept: current
      ? `"${current.name}" stays the current ${ROLE_LABEL[role]}; the new file is stored beside it and can be made current later`
      : `no ${ROLE_LABEL[role]} is current; the new file is stored and can be made current later`,
  };
}

export function latestScreening(study: Study, datasetId: number): RunRecord | undefined {
  return listRuns(study, { kind: 'screening' })
    .filter((r) => (r.inputs as { datasetId?: number }).datasetId === datasetId)
    .at(-1);
}

export function checkReason(reason: string, what: string): string {
  const why = reason.trim();
  if (why === '') throw new RuleError(`say why ${what}; the reason goes into the decision log`);
  if (why.length > MAX_REASON) throw new RuleError(`a reason may have at most ${MAX_REASON} characters`);
  return why;
}

export function list(codes: readonly string[]): string {
  return codes.length > 6 ? `${codes.slice(0, 6).join(', ')} and ${codes.length - 6} more` : codes.join(', ');
}
