import { type DatasetRole, insertDataset, listDatasets } from '../../../db/repos/datasets.ts';
import { getItemByCode, listItems } from '../../../db/repos/items.ts';
import { getPhaseStatus, type PhaseId } from '../../../db/repos/phase-state.ts';
import type { Study } from '../../../db/study.ts';
import type { ImportProblem } from '../../import/dataset.ts';
import { delimiterName } from '../../import/detect-format.ts';
import { type ColumnMapping, type ColumnRole, proposeMapping } from '../../import/mapping.ts';
import { type DecimalMark, type MissingCodes, parseNumber } from '../../import/numbers.ts';
import { changeInPhase } from '../change.ts';
import { currentDataset, declaredBounds } from '../analysis-data.ts';
import { RuleError } from '../errors.ts';
import type {
  DataFileKind,
  ImportRead,
  ReadJobInput,
  ReadRequest,
  ReadSettings,
} from '../../import/read-data-file.ts';
import { PHASE_TITLES } from '../titles.ts';
import { recordChoice } from './choice-actions.ts';
import {
  DATASET_ROLES,
  MAX_DATASET_NAME,
  MAX_MISSING_CODES,
  MAX_REASON,
  ROLE_LABEL,
  importChoice,
  phaseOfRole,
  plural,
} from './common.ts';

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
