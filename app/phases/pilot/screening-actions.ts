import { currentExclusions, insertExclusions, loadEncodedDataset } from '../../../db/repos/datasets.ts';
import type { Study } from '../../../db/study.ts';
import { decodeColumn } from '../../engine/columnar.ts';
import {
  type ScreeningCheck,
  type ScreeningOptions,
  type ScreeningResult,
  screenRespondents,
} from '../../engine/screening.ts';
import { changeInPhase, recordRun } from '../change.ts';
import { RuleError } from '../errors.ts';
import {
  CHECK_LABEL,
  ROLE_LABEL,
  checkReason,
  latestScreening,
  phaseOfRole,
  plural,
  requireDataset,
} from './common.ts';

/**
 * Screens every respondent of a dataset (excluded or not, so the proposal covers the whole file) on
 * the raw answers of its item columns: longstring, IRV, Mahalanobis D² with its χ² p, attention
 * checks, duplicate ids, speeders (when a duration column exists) and too many missing answers (see
 * screenRespondents). Stored as an analysis run with its log row; it proposes and decides nothing.
 * Cost O(n·k² + k³). Throws RuleError for an unknown dataset or a signed-off phase, and EngineError
 * for thresholds out of range.
 */
export function screenDataset(study: Study, datasetId: number, options: ScreeningOptions = {}): number {
  const summary = requireDataset(study, datasetId);
  const encoded = loadEncodedDataset(study, datasetId);
  if (!encoded) throw new RuleError(`dataset ${datasetId} does not exist in this study`, 'not-found');
  const items = encoded.columns.filter((c) => c.role === 'item');
  const duration = encoded.columns.find((c) => c.role === 'duration');
  const result = screenRespondents(
    {
      ids: encoded.ids,
      items: items.map((c) => ({ name: c.itemCode ?? c.name, values: decodeColumn(c.encoded) })),
      ...(duration ? { durations: decodeColumn(duration.encoded) } : {}),
      attention: encoded.attention.map((a) => ({ name: a.name, outcomes: a.outcomes })),
      rowNumbers: encoded.rowNumbers,
    },
    options,
  );
  return recordRun(study, {
    phase: phaseOfRole(summary.role),
    label: `screening of ${ROLE_LABEL[summary.role]} "${summary.name}"`,
    kind: 'screening',
    inputs: {
      datasetId,
      datasetName: summary.name,
      fileSha256: summary.fileSha256,
      respondents: encoded.n,
      items: items.map((c) => c.itemCode ?? c.name),
      answers: 'raw (not reverse-scored)',
      duration: duration?.name ?? null,
      attention: encoded.attention.map((a) => ({ column: a.name, correctAnswer: a.correctAnswer })),
      covers: 'every respondent in the file, excluded or not',
    },
    options: { ...options, mahalanobis: 'complete cases (respondents who answered every item)' },
    seed: null,
    results: result,
  });
}

export interface ExclusionRequest {
  /** Respondents by position (see ScreenedRespondent.index). */
  respondents?: number[];
  /** Or every respondent the latest screening flagged for any of these checks. */
  checks?: readonly ScreeningCheck[];
  reason: string;
}

function checkPositions(positions: readonly number[], n: number, name: string): number[] {
  const unique = [...new Set(positions)].sort((a, b) => a - b);
  const bad = unique.find((p) => !Number.isInteger(p) || p < 0 || p >= n);
  if (bad !== undefined) {
    throw new RuleError(`dataset "${name}" has no respondent at position ${bad} (it has ${n})`, 'not-found');
  }
  return unique;
}

/**
 * Excludes respondents from every analysis of a dataset, singly (by position) or by rule (every
 * respondent the latest screening flagged for one of the named checks), with the researcher's reason;
 * one logged decision (citing the screening run for a rule). Respondents already excluded are left
 * as they are. Returns the respondents newly excluded. Cost O(respondents).
 * Throws RuleError for a blank reason, an unknown dataset or position, a rule without a screening run,
 * nobody left to exclude, or a signed-off phase.
 */
export function excludeRespondents(
  study: Study,
  datasetId: number,
  request: ExclusionRequest,
): { excluded: number; ids: string[] } {
  const summary = requireDataset(study, datasetId);
  const reason = checkReason(request.reason, 'these respondents are excluded');
  const encoded = loadEncodedDataset(study, datasetId);
  if (!encoded) throw new RuleError(`dataset ${datasetId} does not exist in this study`, 'not-found');
  const already = currentExclusions(study, datasetId);
  let positions: number[];
  let rule: string | undefined;
  let runId: number | null = null;
  const checks: ScreeningCheck[] = [...new Set(request.checks ?? [])];
  if (checks.length > 0) {
    if ((request.respondents ?? []).length > 0) {
      throw new RuleError('exclude either the respondents named or those a rule picks, not both at once');
    }
    const run = latestScreening(study, datasetId);
    if (!run) {
      throw new RuleError(
        `screen "${summary.name}" first: a rule excludes respondents the screening flagged`,
      );
    }
    runId = run.id;
    const result = run.results as ScreeningResult;
    positions = result.respondents
      .filter((r) => r.flags.some((f) => checks.includes(f.check)))
      .map((r) => r.index);
    rule = `flagged by screening run ${run.id} for ${checks.map((c) => CHECK_LABEL[c]).join(' or ')}`;
  } else {
    positions = checkPositions(request.respondents ?? [], encoded.n, summary.name);
    if (positions.length === 0) throw new RuleError('name at least one respondent to exclude');
  }
  const fresh = positions.filter((p) => !already.has(p));
  if (fresh.length === 0) {
    throw new RuleError(
      positions.length === 0
        ? `no respondent of "${summary.name}" is flagged for ${checks.map((c) => CHECK_LABEL[c]).join(' or ')}`
        : `every respondent named is already excluded from "${summary.name}"`,
    );
  }
  const ids = fresh.map((p) => encoded.ids[p]);
  changeInPhase(
    study,
    {
      phase: phaseOfRole(summary.role),
      kind: 'respondents-excluded',
      target: `${plural(fresh.length, 'respondent')} of ${ROLE_LABEL[summary.role]} "${summary.name}"`,
      rationale: reason,
      runId,
      detail: {
        datasetId,
        dataset: summary.name,
        rule: rule ?? null,
        respondents: fresh.length,
        positions: fresh,
        ids,
        rows: fresh.map((p) => encoded.rowNumbers[p]),
        excludedAfter: already.size + fresh.length,
        respondentsInFile: encoded.n,
      },
    },
    () =>
      insertExclusions(
        study,
        datasetId,
        fresh.map((respondent) => ({ respondent, excluded: true, reason, ...(rule ? { rule } : {}) })),
      ),
  );
  return { excluded: fresh.length, ids };
}

/**
 * Reverses exclusions by a later decision: the respondents named count in every analysis again; the
 * earlier decisions stay in the study and the log. Returns the respondents brought back. Cost
 * O(respondents). Throws RuleError for a blank reason, an unknown dataset or position, respondents
 * who are not excluded, or a signed-off phase.
 */
export function includeRespondents(
  study: Study,
  datasetId: number,
  request: { respondents: number[]; reason: string; reversesRow?: number },
): { included: number; ids: string[] } {
  const summary = requireDataset(study, datasetId);
  const reason = checkReason(request.reason, 'these respondents are brought back');
  const encoded = loadEncodedDataset(study, datasetId);
  if (!encoded) throw new RuleError(`dataset ${datasetId} does not exist in this study`, 'not-found');
  const positions = checkPositions(request.respondents, encoded.n, summary.name);
  if (positions.length === 0) throw new RuleError('name at least one respondent to bring back');
  const already = currentExclusions(study, datasetId);
  const back = positions.filter((p) => already.has(p));
  if (back.length === 0) {
    throw new RuleError(`none of the respondents named is excluded from "${summary.name}"`);
  }
  const ids = back.map((p) => encoded.ids[p]);
  changeInPhase(
    study,
    {
      phase: phaseOfRole(summary.role),
      kind: 'exclusions-reversed',
      target: `${plural(back.length, 'respondent')} of ${ROLE_LABEL[summary.role]} "${summary.name}"`,
      rationale: reason,
      detail: {
        datasetId,
        dataset: summary.name,
        respondents: back.length,
        positions: back,
        ids,
        rows: back.map((p) => encoded.rowNumbers[p]),
        earlierReasons: back.map((p) => already.get(p)?.reason ?? ''),
        excludedAfter: already.size - back.length,
        respondentsInFile: encoded.n,
        ...(request.reversesRow === undefined ? {} : { reverses: request.reversesRow }),
      },
    },
    () =>
      insertExclusions(
        study,
        datasetId,
        back.map((respondent) => ({ respondent, excluded: false, reason })),
      ),
  );
  return { included: back.length, ids };
}

// ── Phase rules ─────────────────────────────────────────────────────────────────────────────────
