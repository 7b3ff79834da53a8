import { listRuns, type RunRecord } from '../../db/repos/analysis-runs.ts';
import { getConstruct, listFacets } from '../../db/repos/construct.ts';
import { listRounds } from '../../db/repos/purification.ts';
import {
  currentDatasetChoice,
  currentExclusions,
  type DatasetChoice,
  type DatasetRole,
  type DatasetSummary,
  getDatasetSummary,
  insertDataset,
  insertDatasetChoice,
  insertExclusions,
  listDatasetChoices,
  listDatasets,
  listExclusionDecisions,
  loadEncodedDataset,
} from '../../db/repos/datasets.ts';
import { getItemByCode, listItems } from '../../db/repos/items.ts';
import { getPhaseStatus, type PhaseId } from '../../db/repos/phase-state.ts';
import type { Study } from '../../db/study.ts';
import { decodeColumn } from '../engine/columnar.ts';
import {
  type RespondentScreening,
  type ScreeningCheck,
  type ScreeningOptions,
  type ScreeningResult,
  screenRespondents,
} from '../engine/screening.ts';
import { chooseDecimalMark, type ImportProblem } from '../import/dataset.ts';
import { delimiterName } from '../import/detect-format.ts';
import { DECIMAL_MARK_ROWS } from '../import/limits.ts';
import {
  type ColumnMapping,
  type ColumnRole,
  type ProposedMapping,
  proposeMapping,
} from '../import/mapping.ts';
import { type DecimalMark, type MissingCodes, parseNumber } from '../import/numbers.ts';
import type { ParsedTable } from '../import/parse-table.ts';
import { previewTable } from '../import/preview.ts';
import { TableError } from '../import/table-error.ts';
import { readWorkbook } from '../import/workbook.ts';
import { changeInPhase, recordRun } from './change.ts';
import { currentDataset, currentPilotDataset, declaredBounds } from './analysis-data.ts';
import { RuleError } from './errors.ts';
import {
  type DataFileKind,
  dataFileKind,
  type ImportRead,
  type ReadJobInput,
  type ReadRequest,
  type ReadSettings,
} from '../import/read-data-file.ts';
import { PHASE_TITLES } from './titles.ts';
import type { ChecklistItem, PhaseRules } from './types.ts';

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
const MAX_SUGGESTIONS = 8;

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

function plural(n: number, word: string, many = `${word}s`): string {
  return `${n} ${n === 1 ? word : many}`;
}

/** "480 respondents, 12 excluded": how every count of a dataset is stated. */
export function respondentCount(respondents: number, excluded: number): string {
  return `${plural(respondents, 'respondent')}, ${excluded} excluded`;
}

/** The message for a file that cannot be read, as the researcher sees it (row and column included). */
function fileError(fileName: string, error: TableError): RuleError {
  const message = error.message.includes(fileName) ? error.message : `${fileName}: ${error.message}`;
  return new RuleError(message, 'file');
}

function requireDataset(study: Study, id: number): DatasetSummary {
  const summary = getDatasetSummary(study, id);
  if (!summary) throw new RuleError(`dataset ${id} does not exist in this study`, 'not-found');
  return summary;
}

// ── Preview ─────────────────────────────────────────────────────────────────────────────────────

export interface MissingSuggestion {
  /** The code as written in the file. */
  code: string;
  numeric: boolean;
  cells: number;
}

/** The start of a data file, read with nothing stored, and a proposed mapping to confirm. */
export interface DataFilePreview {
  fileName: string;
  fileSize: number;
  kind: DataFileKind;
  sheet?: string;
  sheets?: string[];
  encoding: string;
  /** The delimiter character ('' for a workbook) and its name ("comma", "tab"…). */
  delimiter: string;
  delimiterName: string;
  quoteChar: string;
  decimalMark: DecimalMark;
  header: string[];
  /** The first PREVIEW_SHOWN_ROWS data rows, with their file row numbers (header = row 1). */
  rows: string[][];
  rowNumbers: number[];
  /** True when the file holds more rows than shown. */
  truncated: boolean;
  warnings: string[];
  /** Proposed roles by header (item columns matched to the pool by code, id and duration by name). */
  proposal: ProposedMapping;
  /** Values in the proposed item columns of the first rows that look like missing-value codes. */
  suggestedMissing: MissingSuggestion[];
  bounds: { min: number; max: number };
  /** Earlier imports from a file of the same name (the check step also compares SHA-256). */
  sameName: { id: number; name: string; role: DatasetRole }[];
}

function suggestMissing(
  table: ParsedTable,
  mapping: ColumnMapping,
  mark: DecimalMark,
  bounds: { min: number; max: number },
): MissingSuggestion[] {
  const columns = table.header.flatMap((h, i) => (mapping[h]?.role === 'item' ? [i] : []));
  const counts = new Map<string, MissingSuggestion>();
  for (const row of table.rows) {
    for (const c of columns) {
      const cell = (row[c] ?? '').trim();
      if (cell === '') continue;
      const value = parseNumber(cell, mark);
      if (value !== undefined && value >= bounds.min && value <= bounds.max) continue;
      const key = value === undefined ? cell : String(value);
      const entry = counts.get(key) ?? { code: key, numeric: value !== undefined, cells: 0 };
      entry.cells++;
      counts.set(key, entry);
    }
  }
  return [...counts.values()].sort((a, b) => b.cells - a.cells).slice(0, MAX_SUGGESTIONS);
}

async function readStart(
  bytes: Uint8Array,
  fileName: string,
  reading: ReadSettings,
): Promise<{
  table: ParsedTable;
  kind: DataFileKind;
  sheet?: string;
  sheets?: string[];
  truncated: boolean;
}> {
  const kind = dataFileKind(fileName, bytes);
  if (kind === 'workbook') {
    const book = await readWorkbook(bytes, { fileName, sheet: reading.sheet });
    return {
      table: { ...book, rows: book.rows.slice(0, SUGGESTION_ROWS) },
      kind,
      sheet: book.sheet,
      sheets: book.sheets,
      truncated: book.rows.length > PREVIEW_SHOWN_ROWS,
    };
  }
  const preview = previewTable(bytes, {
    fileName,
    delimiter: reading.delimiter,
    encoding: reading.encoding,
    rows: SUGGESTION_ROWS,
  });
  return { table: preview, kind, truncated: preview.truncated || preview.rows.length > PREVIEW_SHOWN_ROWS };
}

/**
 * Reads the start of a data file (delimited text up to the preview limit, or one sheet of a workbook)
 * and proposes how to read it: encoding, delimiter and decimal mark detected (or as given), item
 * columns matched to the pool's codes (letter case ignored; retired items too), id and duration
 * columns by their usual names, and likely missing-value codes. Writes nothing. Cost O(preview size).
 * Throws RuleError (code "file") naming row and column for a file that cannot be read as a table.
 */
export async function previewDataFile(
  study: Study,
  bytes: Uint8Array,
  fileName: string,
  reading: ReadSettings = {},
): Promise<DataFilePreview> {
  let start: Awaited<ReturnType<typeof readStart>>;
  try {
    start = await readStart(bytes, fileName, reading);
  } catch (error) {
    if (error instanceof TableError) throw fileError(fileName, error);
    throw error;
  }
  const { table } = start;
  const codes = listItems(study).map((it) => it.code);
  const proposal = proposeMapping(table.header, codes);
  const numeric = table.header.flatMap((h, i) =>
    ['item', 'criterion', 'duration'].includes(proposal.mapping[h]?.role ?? '') ? [i] : [],
  );
  const columns = numeric.length > 0 ? numeric : table.header.map((_, i) => i);
  // The same rule, over the same rows, as the read of the whole file (chooseDecimalMark); the check
  // step and the command line then read with the mark shown here.
  const warnings = [...table.warnings];
  const mark = chooseDecimalMark(table.rows, columns, reading.decimalMark, warnings);
  const bounds = declaredBounds(study);
  const quoteChar = start.kind === 'workbook' ? '' : (table.quoteChar ?? '"');
  return {
    fileName,
    fileSize: bytes.length,
    kind: start.kind,
    ...(start.sheet === undefined ? {} : { sheet: start.sheet, sheets: start.sheets }),
    encoding: table.encoding,
    delimiter: table.delimiter,
    delimiterName: table.delimiter === '' ? '' : delimiterName(table.delimiter),
    quoteChar,
    decimalMark: mark,
    header: table.header,
    rows: table.rows.slice(0, PREVIEW_SHOWN_ROWS),
    rowNumbers: (table.rowNumbers ?? table.rows.map((_, i) => i + 2)).slice(0, PREVIEW_SHOWN_ROWS),
    truncated: start.truncated,
    warnings,
    proposal,
    suggestedMissing: suggestMissing(table, proposal.mapping, mark, bounds),
    bounds,
    sameName: listDatasets(study)
      .filter((d) => d.fileName === fileName)
      .map((d) => ({ id: d.id, name: d.name, role: d.role })),
  };
}

// ── Import: plan, read, check, store ──────────────────────────────────────────────────────────

/** What the researcher asks for: which file, as what, read how. */
export interface ImportRequest {
  fileName: string;
  role: DatasetRole;
  /** Shown in lists and the log; the file name without its extension when blank. */
  name?: string;
  mapping: ColumnMapping | ((header: string[]) => ColumnMapping);
  missingCodes: MissingCodes;
  reading: ReadSettings;
}

/**
 * The mapping the command line and the demo use when no one confirms it on screen: item columns
 * matched to the pool by code, id and duration columns by their usual names (proposeMapping), and
 * `overrides` (by header) on top. Cost O(columns + items) per header.
 */
export function automaticMapping(
  study: Study,
  overrides: ColumnMapping = {},
): (header: string[]) => ColumnMapping {
  const codes = listItems(study).map((it) => it.code);
  return (header) => proposeMapping(header, codes, overrides).mapping;
}

/** A checked request: everything the store needs besides the read itself. */
export interface ImportPlan {
  fileName: string;
  role: DatasetRole;
  name: string;
  phase: PhaseId;
  missingCodes: MissingCodes;
  bounds: { min: number; max: number };
  reading: ReadSettings;
}

function defaultName(fileName: string): string {
  return fileName.replace(/\.[^.]+$/, '').trim() || fileName;
}

function checkMissingCodes(codes: MissingCodes): MissingCodes {
  const text = [...new Set(codes.text.map((t) => t.trim()))];
  if (text.some((t) => t === '')) {
    throw new RuleError('a missing-value code cannot be blank (blank cells are always missing)');
  }
  for (const value of codes.numeric) {
    if (!Number.isFinite(value))
      throw new RuleError(`the missing-value code ${value} is not a finite number`);
  }
  const numeric = [...new Set(codes.numeric)];
  if (text.length + numeric.length > MAX_MISSING_CODES) {
    throw new RuleError(`a dataset takes at most ${MAX_MISSING_CODES} missing-value codes`);
  }
  const numericText = text.filter(
    (t) => parseNumber(t, '.') !== undefined || parseNumber(t, ',') !== undefined,
  );
  if (numericText.length > 0) {
    throw new RuleError(
      `missing-value code "${numericText[0]}" is a number; give it as a numeric code so that "-9" and "-9.0" both match`,
    );
  }
  return { text, numeric };
}

/**
 * The mapping with each item code spelled as in the pool. Throws RuleError naming the column when a
 * column is mapped to a code that is not in the item pool.
 */
function poolMapping(study: Study, mapping: ColumnMapping): ColumnMapping {
  const out: ColumnMapping = {};
  for (const [column, role] of Object.entries(mapping)) {
    if (role.role !== 'item') {
      out[column] = role;
      continue;
    }
    const item = getItemByCode(study, role.itemCode.trim());
    if (!item) {
      throw new RuleError(
        `column '${column}' is mapped to item ${role.itemCode.trim() || '(no code)'}, which is not in the item pool`,
        'mapping',
      );
    }
    out[column] = { role: 'item', itemCode: item.code };
  }
  return out;
}

/**
 * Checks an import request against the study (role, name, missing codes, item codes in the pool) and
 * turns it into what the reader needs, with the declared bounds of the response format. Writes
 * nothing. Cost O(columns). Throws RuleError for a signed-off phase, an overlong name, a bad
 * missing-value code, or a column mapped to an item that is not in the pool.
 */
export function planImport(
  study: Study,
  bytes: Uint8Array,
  request: ImportRequest,
): { plan: ImportPlan; read: ReadRequest } {
  const name = (request.name ?? '').trim() || defaultName(request.fileName);
  if (name.length > MAX_DATASET_NAME) {
    throw new RuleError(`a dataset name may have at most ${MAX_DATASET_NAME} characters`);
  }
  if (!DATASET_ROLES.includes(request.role)) {
    throw new RuleError(`"${request.role}" is not a dataset role; use pilot, validation or retest`);
  }
  const phase = phaseOfRole(request.role);
  if (getPhaseStatus(study, phase) === 'signed-off') {
    throw new RuleError(
      `the ${PHASE_TITLES[phase]} phase is signed off; reopen it (with a reason) before importing ${ROLE_LABEL[request.role]}`,
      'signed-off',
    );
  }
  const missingCodes = checkMissingCodes(request.missingCodes);
  const bounds = declaredBounds(study);
  const given = request.mapping;
  const mapping =
    typeof given === 'function'
      ? (header: string[]) => poolMapping(study, given(header))
      : poolMapping(study, given);
  const plan: ImportPlan = {
    fileName: request.fileName,
    role: request.role,
    name,
    phase,
    missingCodes,
    bounds,
    reading: request.reading,
  };
  return {
    plan,
    read: { fileName: request.fileName, bytes, mapping, missingCodes, bounds, reading: request.reading },
  };
}

/** The worker's input for a plan: the same request with the mapping already a plain object. */
export function readJobInput(read: ReadRequest): ReadJobInput {
  if (typeof read.mapping === 'function') {
    throw new RuleError('a worker read needs the confirmed mapping, not a function of the header');
  }
  return { ...read, mapping: read.mapping };
}

export interface CheckedColumn {
  name: string;
  role: ColumnRole['role'];
  itemCode?: string;
  correctAnswer?: string;
  /** Missing cells of a numeric column (blank, a code, or text that is not a number). */
  missing?: number;
}

/** A read file as the researcher reviews it before confirming; nothing of it is stored yet. */
export interface ImportCheck {
  fileName: string;
  role: DatasetRole;
  name: string;
  kind: DataFileKind;
  sheet?: string;
  encoding: string;
  delimiterName: string;
  decimalMark: DecimalMark;
  sha256: string;
  byteLength: number;
  respondents: number;
  columns: CheckedColumn[];
  problems: ImportProblem[];
  problemCount: number;
  warnings: string[];
  missingCodes: MissingCodes;
  bounds: { min: number; max: number };
  /** Ids that occur more than once (screening flags them too). */
  repeatedIds: number;
  /** Datasets of this study made from the very same file (same SHA-256). */
  alreadyImported: { id: number; name: string; role: DatasetRole; importedAt: string }[];
  /** Items of the pool (not retired) that no column answers. */
  poolItemsWithoutColumn: string[];
  /** What storing it would do to the current dataset of its role (see importChoice). */
  currentChoice: ReturnType<typeof importChoice>;
}

/** What a read looks like to the researcher: counts, columns, problems by row and column. Cost O(columns + respondents). */
export function checkRead(study: Study, plan: ImportPlan, read: ImportRead): ImportCheck {
  const numeric = new Map(read.dataset.columns.map((c) => [c.name, c]));
  const columns: CheckedColumn[] = read.header.map((name) => {
    const role = read.mapping[name] ?? { role: 'ignored' as const };
    const column = numeric.get(name);
    return {
      name,
      role: role.role,
      ...(role.role === 'item' ? { itemCode: role.itemCode } : {}),
      ...(role.role === 'attention' ? { correctAnswer: role.correctAnswer } : {}),
      ...(column ? { missing: column.missing } : {}),
    };
  });
  const seen = new Map<string, number>();
  for (const id of read.dataset.ids) seen.set(id, (seen.get(id) ?? 0) + 1);
  const mapped = new Set(
    read.dataset.columns.filter((c) => c.role === 'item').map((c) => (c.itemCode ?? '').toLowerCase()),
  );
  return {
    fileName: plan.fileName,
    role: plan.role,
    name: plan.name,
    kind: read.kind,
    ...(read.sheet === undefined ? {} : { sheet: read.sheet }),
    encoding: read.encoding,
    delimiterName: read.delimiter === '' ? '' : delimiterName(read.delimiter),
    decimalMark: read.dataset.decimalMark,
    sha256: read.sha256,
    byteLength: read.byteLength,
    respondents: read.dataset.n,
    columns,
    problems: read.dataset.problems,
    problemCount: read.dataset.problemCount,
    warnings: read.dataset.warnings,
    missingCodes: plan.missingCodes,
    bounds: plan.bounds,
    repeatedIds: [...seen.values()].filter((n) => n > 1).reduce((s, n) => s + n, 0),
    alreadyImported: listDatasets(study)
      .filter((d) => d.fileSha256 === read.sha256)
      .map((d) => ({ id: d.id, name: d.name, role: d.role, importedAt: d.importedAt })),
    poolItemsWithoutColumn: listItems(study)
      .filter((it) => it.state !== 'retired' && !mapped.has(it.code.toLowerCase()))
      .map((it) => it.code),
    currentChoice: importChoice(study, plan.role),
  };
}

/**
 * The refusals of storeImport that depend on the read alone: a read that does not match the file's
 * bytes, and (code "problems") problems the researcher has not accepted. Reads nothing from the study
 * and writes nothing, so a caller can ask before opening the study for writing. Cost O(1).
 */
export function checkImportable(
  plan: ImportPlan,
  read: ImportRead,
  bytes: Uint8Array,
  options: { acceptProblems: boolean },
): void {
  if (bytes.length !== read.byteLength) {
    throw new RuleError(`the read of ${plan.fileName} does not match the file; read it again`);
  }
  const { dataset } = read;
  if (dataset.problemCount > 0 && !options.acceptProblems) {
    const first = dataset.problems[0];
    throw new RuleError(
      `${plan.fileName} was not imported: ${plural(dataset.problemCount, 'cell needs', 'cells need')} a look, the first at ${first.message}` +
        '. Declare missing-value codes, or accept the problems to import the values as they are',
      'problems',
    );
  }
}

/**
 * Stores a confirmed import in one transaction with its log row: the original bytes and their
 * SHA-256, how the file was read, the mapping and codes, and the responses in the compact layout (see
 * insertDataset). A file with problems (text in a numeric column, values outside the declared scale,
 * negative durations, blank ids) is stored only when `acceptProblems` says the researcher has read
 * them; the values are then kept as they are. Cost O(file size + cells).
 * Throws RuleError when the phase is signed off, when the read does not match the file's bytes, when
 * a mapped item is not in the pool, or (code "problems") for unaccepted problems.
 */
export function storeImport(
  study: Study,
  plan: ImportPlan,
  read: ImportRead,
  bytes: Uint8Array,
  options: { acceptProblems: boolean; current?: CurrentOnImport },
): number {
  checkImportable(plan, read, bytes, options);
  const makeCurrent = resolveCurrentOnImport(study, plan.role, options.current);
  const mapping = poolMapping(study, read.mapping);
  const { dataset } = read;
  const byRole = (role: ColumnRole['role']) => Object.keys(mapping).filter((c) => mapping[c].role === role);
  const items = dataset.columns.filter((c) => c.role === 'item');
  const storeDataset = (): number =>
    changeInPhase(
      study,
      {
        phase: plan.phase,
        kind: 'dataset-imported',
        target: `${ROLE_LABEL[plan.role]} "${plan.name}"`,
        detail: {
          role: plan.role,
          name: plan.name,
          fileName: plan.fileName,
          sha256: read.sha256,
          bytes: read.byteLength,
          kind: read.kind,
          sheet: read.sheet ?? null,
          encoding: read.encoding,
          delimiter: read.delimiter,
          decimalMark: dataset.decimalMark,
          respondents: dataset.n,
          idColumn: dataset.idColumn ?? null,
          items: items.map((c) => ({ column: c.name, item: c.itemCode })),
          criteria: byRole('criterion'),
          groups: byRole('group'),
          retestLink: byRole('retestLink')[0] ?? null,
          duration: byRole('duration')[0] ?? null,
          attention: dataset.attention.map((a) => ({ column: a.name, correctAnswer: a.correctAnswer })),
          ignored: read.header.filter((h) => (mapping[h]?.role ?? 'ignored') === 'ignored'),
          missingCodes: plan.missingCodes,
          bounds: plan.bounds,
          problems: dataset.problemCount,
          problemsAccepted: dataset.problemCount > 0,
          warnings: dataset.warnings,
        },
      },
      () =>
        insertDataset(study, {
          role: plan.role,
          name: plan.name,
          fileName: plan.fileName,
          fileSha256: read.sha256,
          fileBytes: bytes,
          reading: {
            kind: read.kind,
            encoding: read.encoding,
            delimiter: read.delimiter,
            decimalMark: dataset.decimalMark,
            missingCodes: plan.missingCodes,
            scaleBounds: plan.bounds,
            header: read.header,
            ...(read.sheet === undefined ? {} : { sheet: read.sheet }),
            ...(read.quoteChar === '' ? {} : { quoteChar: read.quoteChar }),
          },
          mapping,
          dataset,
        }),
    );
  // The dataset and, when it becomes current, the logged choice: both stored or neither.
  return study.db.transaction(() => {
    const datasetId = storeDataset();
    if (makeCurrent) recordChoice(study, plan.role, datasetId, makeCurrent.reason);
    return datasetId;
  })();
}

// ── The current dataset of each role ──────────────────────────────────────────────────────────

/**
 * Whether a new import becomes the current dataset of its role. Absent, the safe default applies: it
 * becomes current only when its role has no current dataset, so an analysis never moves to other
 * data without a logged choice.
 */
export interface CurrentOnImport {
  makeCurrent: boolean;
  /** Why; required when the import replaces a current dataset. */
  reason?: string;
}

/** The reason recorded when a first import of a role becomes current by default. */
function firstImportReason(role: DatasetRole): string {
  return `made current on import: the study had no current ${ROLE_LABEL[role]}`;
}

function resolveCurrentOnImport(
  study: Study,
  role: DatasetRole,
  given: CurrentOnImport | undefined,
): { reason: string } | undefined {
  const current = currentDataset(study, role);
  const make = given?.makeCurrent ?? current === undefined;
  if (!make) return undefined;
  const reason = (given?.reason ?? '').trim();
  if (reason.length > MAX_REASON) throw new RuleError(`a reason may have at most ${MAX_REASON} characters`);
  if (current && reason === '') {
    throw new RuleError(
      `say why the new file replaces "${current.name}" as the current ${ROLE_LABEL[role]}; the reason goes into the decision log`,
    );
  }
  return { reason: reason || firstImportReason(role) };
}

/** Purification rounds that ran on a dataset (only pilot data has rounds). */
function roundsOn(study: Study, datasetId: number): number[] {
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

function recordChoice(study: Study, role: DatasetRole, datasetId: number | null, reason: string): void {
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

function latestScreening(study: Study, datasetId: number): RunRecord | undefined {
  return listRuns(study, { kind: 'screening' })
    .filter((r) => (r.inputs as { datasetId?: number }).datasetId === datasetId)
    .at(-1);
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

export interface ExclusionRequest {
  /** Respondents by position (see ScreenedRespondent.index). */
  respondents?: number[];
  /** Or every respondent the latest screening flagged for any of these checks. */
  checks?: readonly ScreeningCheck[];
  reason: string;
}

function checkReason(reason: string, what: string): string {
  const why = reason.trim();
  if (why === '') throw new RuleError(`say why ${what}; the reason goes into the decision log`);
  if (why.length > MAX_REASON) throw new RuleError(`a reason may have at most ${MAX_REASON} characters`);
  return why;
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

function list(codes: readonly string[]): string {
  return codes.length > 6 ? `${codes.slice(0, 6).join(', ')} and ${codes.length - 6} more` : codes.join(', ');
}

export const pilotRules: PhaseRules = {
  id: 'pilot',
  purpose: 'Import pilot responses, map columns, set missing codes, screen respondents.',
  holds(study) {
    const all = listDatasets(study);
    const pilots = all.filter((d) => d.role === 'pilot');
    const current = currentPilotDataset(study);
    const out = [plural(pilots.length, 'pilot dataset')];
    if (current) out.push(respondentCount(current.respondents, currentExclusions(study, current.id).size));
    const retest = all.filter((d) => d.role === 'retest');
    if (retest.length > 0) out.push(plural(retest.length, 'retest dataset'));
    return out;
  },
  checklist(study) {
    const current = currentPilotDataset(study);
    const pool = listItems(study).filter((it) => it.state !== 'retired');
    const encoded = current ? loadEncodedDataset(study, current.id) : undefined;
    const mapped = new Set(
      (encoded?.columns ?? []).filter((c) => c.role === 'item').map((c) => (c.itemCode ?? '').toLowerCase()),
    );
    const unmapped = pool.filter((it) => !mapped.has(it.code.toLowerCase())).map((it) => it.code);
    const run = current ? latestScreening(study, current.id) : undefined;
    const exclusions = current ? [...currentExclusions(study, current.id).values()] : [];
    const withoutReason = exclusions.filter((e) => e.reason.trim() === '').length;
    const items: ChecklistItem[] = [
      {
        id: 'imported',
        label: 'A pilot dataset is imported',
        met: current !== undefined,
        detail: current
          ? `"${current.name}": ${respondentCount(current.respondents, exclusions.length)}`
          : listDatasets(study, 'pilot').length > 0
            ? 'no pilot dataset is current; make one current'
            : 'no pilot data yet',
      },
      {
        id: 'mapped',
        label: 'Every item of the pool has a column in the pilot data',
        met: current !== undefined && pool.length > 0 && unmapped.length === 0,
        detail: !current
          ? 'no pilot data yet'
          : pool.length === 0
            ? 'the pool holds no items'
            : unmapped.length === 0
              ? `all ${pool.length} mapped`
              : `no column for ${list(unmapped)}`,
      },
      {
        id: 'screened',
        label: 'The pilot respondents have been screened (a logged screening run)',
        met: run !== undefined,
        detail: run
          ? `run ${run.id}: ${plural((run.results as ScreeningResult).flagged, 'respondent')} flagged`
          : 'not screened yet',
      },
      {
        id: 'reasons',
        label: 'Every exclusion states its reason',
        met: current !== undefined && withoutReason === 0,
        detail: !current
          ? 'no pilot data yet'
          : exclusions.length === 0
            ? 'nobody excluded'
            : withoutReason === 0
              ? `${exclusions.length} excluded, each with a reason`
              : `${withoutReason} without a reason`,
      },
    ];
    return items;
  },
};
