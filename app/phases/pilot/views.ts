import { getConstruct, listFacets } from '../../../db/repos/construct.ts';
import {
  currentExclusions,
  type DatasetChoice,
  type DatasetRole,
  type DatasetSummary,
  listDatasetChoices,
  listDatasets,
  listExclusionDecisions,
  loadEncodedDataset,
} from '../../../db/repos/datasets.ts';
import { listItems } from '../../../db/repos/items.ts';
import type { Study } from '../../../db/study.ts';
import { decodeColumn } from '../../engine/columnar.ts';
import type { RespondentScreening, ScreeningCheck, ScreeningResult } from '../../engine/screening.ts';
import { delimiterName } from '../../import/detect-format.ts';
import type { ColumnMapping } from '../../import/mapping.ts';
import type { MissingCodes } from '../../import/numbers.ts';
import { currentPilotDataset, declaredBounds } from '../analysis-data.ts';
import { RuleError } from '../errors.ts';
import {
  CHECK_LABEL,
  DATASET_ROLES,
  MAX_UPLOAD_BYTES,
  ROLE_LABEL,
  SCREENING_CHECKS,
  importChoice,
  latestScreening,
  phaseOfRole,
  requireDataset,
  respondentCount,
} from './common.ts';

/** Why a dataset is (or is not) current: the latest choice that named it, in words. */
export interface CurrentStanding {
  current: boolean;
  /** The choice that made it current, or withdrew it; null when no choice ever named it. */
  choice: { reason: string; decidedAt: string; decidedBy: string; withdrawn: boolean } | null;
  /** One line for lists: "current since … : reason" or "withdrawn …" or "not current". */
  text: string;
}

function standings(study: Study): Map<number, CurrentStanding> {
  const out = new Map<number, CurrentStanding>();
  const choices = listDatasetChoices(study);
  const byRole = new Map<DatasetRole, DatasetChoice>();
  for (const c of choices) byRole.set(c.role, c);
  // Walk every choice in order: a dataset's last "made current" and a withdrawal of it while current.
  const holder = new Map<DatasetRole, number | null>();
  const last = new Map<number, DatasetChoice & { withdrawn: boolean }>();
  for (const c of choices) {
    if (c.datasetId === null) {
      const was = holder.get(c.role);
      if (was != null) last.set(was, { ...c, withdrawn: true });
    } else last.set(c.datasetId, { ...c, withdrawn: false });
    holder.set(c.role, c.datasetId);
  }
  for (const d of listDatasets(study)) {
    const current = byRole.get(d.role)?.datasetId === d.id;
    const c = last.get(d.id);
    const day = c ? c.decidedAt.slice(0, 10) : '';
    out.set(d.id, {
      current,
      choice: c
        ? { reason: c.reason, decidedAt: c.decidedAt, decidedBy: c.decidedBy, withdrawn: c.withdrawn }
        : null,
      text: current
        ? `current since ${day}: ${c?.reason ?? ''}`
        : c?.withdrawn
          ? `withdrawn ${day}: ${c.reason}`
          : c
            ? `was current from ${day}; another dataset was made current since`
            : 'never made current',
    });
  }
  return out;
}

// ── Views ───────────────────────────────────────────────────────────────────────────────────────

export interface DatasetListEntry {
  id: number;
  role: DatasetRole;
  roleLabel: string;
  name: string;
  fileName: string;
  fileSha256: string;
  fileSize: number;
  respondents: number;
  excluded: number;
  /** "480 respondents, 12 excluded". */
  counts: string;
  importedAt: string;
  importedBy: string;
  items: number;
  encoding: string;
  delimiterName: string;
  decimalMark: string;
  missingCodes: MissingCodes;
  /** True for the dataset of its role that analyses use (the latest logged choice). */
  current: boolean;
  /** Why it is current or not: the choice that made it current or withdrew it. */
  standing: CurrentStanding;
  screening: { runId: number; at: string; flagged: number } | null;
}

function listEntry(study: Study, d: DatasetSummary, standing: CurrentStanding): DatasetListEntry {
  const excluded = currentExclusions(study, d.id).size;
  const run = latestScreening(study, d.id);
  const mapping = d.mapping as ColumnMapping;
  const codes = d.reading.missingCodes as MissingCodes;
  return {
    id: d.id,
    role: d.role,
    roleLabel: ROLE_LABEL[d.role],
    name: d.name,
    fileName: d.fileName,
    fileSha256: d.fileSha256,
    fileSize: d.fileSize,
    respondents: d.respondents,
    excluded,
    counts: respondentCount(d.respondents, excluded),
    importedAt: d.importedAt,
    importedBy: d.importedBy,
    items: Object.values(mapping).filter((r) => r.role === 'item').length,
    encoding: d.reading.encoding,
    delimiterName: d.reading.delimiter === '' ? '' : delimiterName(d.reading.delimiter),
    decimalMark: d.reading.decimalMark,
    missingCodes: { text: codes?.text ?? [], numeric: codes?.numeric ?? [] },
    current: standing.current,
    standing,
    screening: run
      ? { runId: run.id, at: run.createdAt, flagged: (run.results as ScreeningResult).flagged }
      : null,
  };
}

/** Everything the pilot screen lists: datasets with their counts, the pool, the response format. */
export function pilotView(study: Study) {
  const construct = getConstruct(study);
  const facets = new Map(listFacets(study, { includeRetired: true }).map((f) => [f.id, f.name]));
  const current = currentPilotDataset(study);
  const standing = standings(study);
  return {
    datasets: listDatasets(study).map((d) => listEntry(study, d, standing.get(d.id) as CurrentStanding)),
    currentPilotId: current?.id ?? null,
    importChoices: DATASET_ROLES.map((role) => importChoice(study, role)),
    pool: listItems(study).map((it) => ({
      code: it.code,
      text: it.text,
      facetName: it.facetId === null ? null : (facets.get(it.facetId) ?? null),
      keying: it.keying,
      state: it.state,
    })),
    bounds: declaredBounds(study),
    anchors: construct.anchors,
    maxUploadBytes: MAX_UPLOAD_BYTES,
    roles: DATASET_ROLES.map((role) => ({ role, label: ROLE_LABEL[role], phase: phaseOfRole(role) })),
    checks: SCREENING_CHECKS.map((check) => ({ check, label: CHECK_LABEL[check] })),
  };
}

/** Missing answers of one dataset: per item, per respondent, and the complete cases. */
export interface MissingData {
  perItem: { column: string; itemCode: string; missing: number; answered: number }[];
  /** How many respondents left 0, 1, 2, … items unanswered (index = number unanswered). */
  perRespondent: number[];
  /** Respondents who answered every item (what listwise deletion keeps). */
  completeCases: number;
  /** The respondents this counts (all in the file, or the file minus the current exclusions). */
  respondents: number;
}

function missingData(
  itemValues: { column: string; itemCode: string; values: Float64Array }[],
  keep: (r: number) => boolean,
  n: number,
): MissingData {
  const perRespondent = new Array<number>(itemValues.length + 1).fill(0);
  const perItem = itemValues.map((c) => ({
    column: c.column,
    itemCode: c.itemCode,
    missing: 0,
    answered: 0,
  }));
  let respondents = 0;
  for (let r = 0; r < n; r++) {
    if (!keep(r)) continue;
    respondents++;
    let missing = 0;
    itemValues.forEach((c, j) => {
      if (Number.isNaN(c.values[r])) {
        missing++;
        perItem[j].missing++;
      } else perItem[j].answered++;
    });
    perRespondent[missing]++;
  }
  return { perItem, perRespondent, completeCases: perRespondent[0] ?? 0, respondents };
}

/**
 * One dataset in full: how it was read and mapped, its columns, group and attention summaries, and
 * missing data counted both over the whole file and over the file minus the current exclusions.
 * Cost O(respondents × columns). Throws RuleError for an unknown dataset.
 */
export function datasetDetail(study: Study, datasetId: number) {
  const summary = requireDataset(study, datasetId);
  const encoded = loadEncodedDataset(study, datasetId);
  if (!encoded) throw new RuleError(`dataset ${datasetId} does not exist in this study`, 'not-found');
  const excluded = currentExclusions(study, datasetId);
  const items = encoded.columns
    .filter((c) => c.role === 'item')
    .map((c) => ({ column: c.name, itemCode: c.itemCode ?? c.name, values: decodeColumn(c.encoded) }));
  return {
    ...listEntry(study, summary, standings(study).get(datasetId) as CurrentStanding),
    reading: summary.reading,
    mapping: summary.mapping as ColumnMapping,
    columns: encoded.columns.map((c) => ({
      name: c.name,
      role: c.role,
      itemCode: c.itemCode ?? null,
      missing: c.missing,
    })),
    groups: encoded.groups.map((g) => {
      const levels = new Map<string, number>();
      for (const v of g.values) levels.set(v, (levels.get(v) ?? 0) + 1);
      return { name: g.name, levels: [...levels].map(([level, count]) => ({ level, count })) };
    }),
    retestLinks: encoded.retestLinks
      ? { name: encoded.retestLinks.name, linked: encoded.retestLinks.values.filter((v) => v !== '').length }
      : null,
    attention: encoded.attention.map((a) => ({
      name: a.name,
      correctAnswer: a.correctAnswer,
      pass: a.outcomes.filter((o) => o === 'pass').length,
      fail: a.outcomes.filter((o) => o === 'fail').length,
      missing: a.outcomes.filter((o) => o === 'missing').length,
    })),
    problemCount: encoded.problemCount,
    warnings: encoded.warnings,
    missingAll: missingData(items, () => true, encoded.n),
    missingAnalysed: missingData(items, (r) => !excluded.has(r), encoded.n),
  };
}

// ── Screening and exclusions ────────────────────────────────────────────────────────────────────

export interface ScreenedRespondent {
  /** Position in the dataset (0-based); exclusion decisions name respondents by it. */
  index: number;
  row: number;
  id: string;
  answered: number;
  missing: number;
  longstring: number | null;
  irv: number | null;
  mahalanobis: number | null;
  mahalanobisP: number | null;
  duration: number | null;
  flags: { check: ScreeningCheck; label: string; reason: string }[];
  exclusion: { reason: string; rule: string | null; decidedAt: string } | null;
  /** Decisions taken on this respondent so far (exclusions and reversals). */
  decisions: number;
}

/**
 * The screening table of a dataset: the latest stored screening run (if any) with every respondent's
 * indices, flags with their reasons in words, and the exclusion in force, plus counts that always say
 * "N respondents, M excluded". Cost O(respondents × items). Throws RuleError for an unknown dataset.
 */
export function screeningView(study: Study, datasetId: number) {
  const summary = requireDataset(study, datasetId);
  const encoded = loadEncodedDataset(study, datasetId);
  if (!encoded) throw new RuleError(`dataset ${datasetId} does not exist in this study`, 'not-found');
  const run = latestScreening(study, datasetId);
  const result = run?.results as ScreeningResult | undefined;
  const excluded = currentExclusions(study, datasetId);
  const decisions = new Map<number, number>();
  for (const d of listExclusionDecisions(study, datasetId))
    decisions.set(d.respondent, (decisions.get(d.respondent) ?? 0) + 1);
  const items = encoded.columns.filter((c) => c.role === 'item').map((c) => decodeColumn(c.encoded));
  const respondents: ScreenedRespondent[] = encoded.ids.map((id, index) => {
    const screened: RespondentScreening | undefined = result?.respondents[index];
    let missing = 0;
    for (const values of items) if (Number.isNaN(values[index])) missing++;
    const exclusion = excluded.get(index);
    return {
      index,
      row: encoded.rowNumbers[index],
      id,
      answered: items.length - missing,
      missing,
      longstring: screened?.longstring ?? null,
      irv: screened?.irv ?? null,
      mahalanobis: screened?.mahalanobis ?? null,
      mahalanobisP: screened?.mahalanobisP ?? null,
      duration: screened?.duration ?? null,
      flags: (screened?.flags ?? []).map((f) => ({ ...f, label: CHECK_LABEL[f.check] })),
      exclusion: exclusion ?? null,
      decisions: decisions.get(index) ?? 0,
    };
  });
  const flagged = respondents.filter((r) => r.flags.length > 0);
  return {
    dataset: {
      id: summary.id,
      name: summary.name,
      role: summary.role,
      roleLabel: ROLE_LABEL[summary.role],
      fileName: summary.fileName,
      respondents: encoded.n,
      excluded: excluded.size,
      counts: respondentCount(encoded.n, excluded.size),
    },
    run: run
      ? {
          id: run.id,
          createdAt: run.createdAt,
          actor: run.actor,
          engineVersion: run.engineVersion,
          thresholds: (result as ScreeningResult).thresholds,
          warnings: (result as ScreeningResult).warnings,
          flagged: (result as ScreeningResult).flagged,
        }
      : null,
    respondents,
    counts: {
      respondents: encoded.n,
      excluded: excluded.size,
      analysed: encoded.n - excluded.size,
      flagged: flagged.length,
      flaggedNotExcluded: flagged.filter((r) => r.exclusion === null).length,
      byCheck: SCREENING_CHECKS.map((check) => {
        const mine = flagged.filter((r) => r.flags.some((f) => f.check === check));
        return {
          check,
          label: CHECK_LABEL[check],
          flagged: mine.length,
          excluded: mine.filter((r) => r.exclusion !== null).length,
        };
      }),
    },
    checks: SCREENING_CHECKS.map((check) => ({ check, label: CHECK_LABEL[check] })),
  };
}
