import { columnFromBytes, columnToBytes } from '../../app/engine/columnar.ts';
import type { EncodedDataset, EncodedNumericColumn } from '../../app/engine/dataset.ts';
import type { Study } from '../study.ts';

export type DatasetRole = 'pilot' | 'validation' | 'retest';

/** How the file was read: enough to read it again the same way. */
export interface DatasetReading {
  encoding: string;
  delimiter: string;
  decimalMark: string;
  missingCodes: unknown;
  scaleBounds?: { min: number; max: number };
  header: string[];
  /** 'workbook' for an .xlsx file (then `sheet` names the sheet read); delimited text otherwise. */
  kind?: 'delimited' | 'workbook';
  sheet?: string;
  quoteChar?: string;
}

export interface DatasetSummary {
  id: number;
  role: DatasetRole;
  name: string;
  fileName: string;
  fileSha256: string;
  fileSize: number;
  respondents: number;
  importedAt: string;
  importedBy: string;
  reading: DatasetReading;
  mapping: Record<string, unknown>;
}

export interface NewDataset {
  role: DatasetRole;
  name: string;
  fileName: string;
  fileSha256: string;
  fileBytes: Uint8Array;
  reading: DatasetReading;
  mapping: Record<string, unknown>;
  dataset: EncodedDataset;
}

type Base = Omit<EncodedDataset, 'columns'>;

/** Call inside the transaction that logs the import. Cost O(file size + cells). */
export function insertDataset(study: Study, d: NewDataset): number {
  const { columns, ...base } = d.dataset;
  const id = Number(
    study.db
      .prepare(
        `INSERT INTO dataset (role, name, file_name, file_sha256, file_size, file_bytes, reading, mapping, respondents, base, imported_at, imported_by)
         VALUES (?, ?, ?, ?, ?, ?, ?, ?, ?, ?, ?, ?)`,
      )
      .run(
        d.role,
        d.name,
        d.fileName,
        d.fileSha256,
        d.fileBytes.byteLength,
        d.fileBytes,
        JSON.stringify(d.reading),
        JSON.stringify(d.mapping),
        base.n,
        JSON.stringify(base),
        new Date().toISOString(),
        study.actor.name,
      ).lastInsertRowid,
  );
  const insert = study.db.prepare(
    'INSERT INTO dataset_column (dataset_id, position, name, role, item_code, missing, encoded) VALUES (?, ?, ?, ?, ?, ?, ?)',
  );
  columns.forEach((column, position) => {
    insert.run(
      id,
      position,
      column.name,
      column.role,
      column.itemCode ?? null,
      column.missing,
      columnToBytes(column.encoded),
    );
  });
  return id;
}

interface DatasetRow {
  id: number;
  role: DatasetRole;
  name: string;
  file_name: string;
  file_sha256: string;
  file_size: number;
  respondents: number;
  imported_at: string;
  imported_by: string;
  reading: string;
  mapping: string;
}

const SUMMARY_COLUMNS =
  'id, role, name, file_name, file_sha256, file_size, respondents, imported_at, imported_by, reading, mapping';

function summary(row: DatasetRow): DatasetSummary {
  return {
    id: row.id,
    role: row.role,
    name: row.name,
    fileName: row.file_name,
    fileSha256: row.file_sha256,
    fileSize: row.file_size,
    respondents: row.respondents,
    importedAt: row.imported_at,
    importedBy: row.imported_by,
    reading: JSON.parse(row.reading) as DatasetReading,
    mapping: JSON.parse(row.mapping) as Record<string, unknown>,
  };
}

export function listDatasets(study: Study, role?: DatasetRole): DatasetSummary[] {
  return (
    study.db
      .prepare(`SELECT ${SUMMARY_COLUMNS} FROM dataset WHERE (? IS NULL OR role = ?) ORDER BY id`)
      .all(role ?? null, role ?? null) as DatasetRow[]
  ).map(summary);
}

export function getDatasetSummary(study: Study, id: number): DatasetSummary | undefined {
  const row = study.db.prepare(`SELECT ${SUMMARY_COLUMNS} FROM dataset WHERE id = ?`).get(id) as
    | DatasetRow
    | undefined;
  return row ? summary(row) : undefined;
}

/** The stored dataset in its compact layout (decode with decodeDataset from app/import/dataset.ts). */
export function loadEncodedDataset(study: Study, id: number): EncodedDataset | undefined {
  const row = study.db.prepare('SELECT base FROM dataset WHERE id = ?').get(id) as
    | { base: string }
    | undefined;
  if (!row) return undefined;
  const columns = (
    study.db
      .prepare(
        'SELECT name, role, item_code, missing, encoded FROM dataset_column WHERE dataset_id = ? ORDER BY position',
      )
      .all(id) as {
      name: string;
      role: EncodedNumericColumn['role'];
      item_code: string | null;
      missing: number;
      encoded: Buffer;
    }[]
  ).map(
    (c): EncodedNumericColumn => ({
      name: c.name,
      role: c.role,
      itemCode: c.item_code ?? undefined,
      missing: c.missing,
      encoded: columnFromBytes(new Uint8Array(c.encoded.buffer, c.encoded.byteOffset, c.encoded.byteLength)),
    }),
  );
  return { ...(JSON.parse(row.base) as Base), columns };
}

/** The original file, byte for byte as it was imported. */
export function loadDatasetFile(study: Study, id: number): Uint8Array | undefined {
  const row = study.db.prepare('SELECT file_bytes FROM dataset WHERE id = ?').get(id) as
    | { file_bytes: Buffer }
    | undefined;
  return row ? new Uint8Array(row.file_bytes) : undefined;
}

export interface ExclusionDecision {
  respondent: number;
  excluded: boolean;
  reason: string;
  rule?: string;
}

/** Call inside the transaction that logs the decision. */
export function insertExclusions(study: Study, datasetId: number, decisions: ExclusionDecision[]): void {
  const insert = study.db.prepare(
    'INSERT INTO respondent_exclusion (dataset_id, respondent, excluded, reason, rule, decided_at) VALUES (?, ?, ?, ?, ?, ?)',
  );
  const at = new Date().toISOString();
  for (const d of decisions)
    insert.run(datasetId, d.respondent, d.excluded ? 1 : 0, d.reason, d.rule ?? null, at);
}

/** Respondents (by position in the dataset) excluded now: the latest decision on each wins. */
export function currentExclusions(
  study: Study,
  datasetId: number,
): Map<number, { reason: string; rule: string | null; decidedAt: string }> {
  const rows = study.db
    .prepare(
      `SELECT e.respondent, e.excluded, e.reason, e.rule, e.decided_at AS decidedAt FROM respondent_exclusion e
       WHERE e.id = (SELECT max(id) FROM respondent_exclusion WHERE dataset_id = e.dataset_id AND respondent = e.respondent)
         AND e.dataset_id = ?`,
    )
    .all(datasetId) as {
    respondent: number;
    excluded: number;
    reason: string;
    rule: string | null;
    decidedAt: string;
  }[];
  const out = new Map<number, { reason: string; rule: string | null; decidedAt: string }>();
  for (const r of rows)
    if (r.excluded === 1) out.set(r.respondent, { reason: r.reason, rule: r.rule, decidedAt: r.decidedAt });
  return out;
}

export interface ExclusionRecord extends ExclusionDecision {
  id: number;
  decidedAt: string;
}

/** Every exclusion decision on a dataset, oldest first (the history behind currentExclusions). */
export function listExclusionDecisions(study: Study, datasetId: number): ExclusionRecord[] {
  return (
    study.db
      .prepare(
        'SELECT id, respondent, excluded, reason, rule, decided_at AS decidedAt FROM respondent_exclusion WHERE dataset_id = ? ORDER BY id',
      )
      .all(datasetId) as {
      id: number;
      respondent: number;
      excluded: number;
      reason: string;
      rule: string | null;
      decidedAt: string;
    }[]
  ).map((r) => ({
    id: r.id,
    respondent: r.respondent,
    excluded: r.excluded === 1,
    reason: r.reason,
    ...(r.rule === null ? {} : { rule: r.rule }),
    decidedAt: r.decidedAt,
  }));
}

/** One choice of the dataset a role's analyses use; `datasetId` null means none (the current one withdrawn). */
export interface DatasetChoice {
  id: number;
  role: DatasetRole;
  datasetId: number | null;
  reason: string;
  decidedAt: string;
  decidedBy: string;
}

interface ChoiceRow {
  id: number;
  role: DatasetRole;
  dataset_id: number | null;
  reason: string;
  decided_at: string;
  decided_by: string;
}

function choice(row: ChoiceRow): DatasetChoice {
  return {
    id: row.id,
    role: row.role,
    datasetId: row.dataset_id,
    reason: row.reason,
    decidedAt: row.decided_at,
    decidedBy: row.decided_by,
  };
}

/** Call inside the transaction that logs the choice. */
export function insertDatasetChoice(
  study: Study,
  c: { role: DatasetRole; datasetId: number | null; reason: string },
): number {
  return Number(
    study.db
      .prepare(
        'INSERT INTO dataset_choice (role, dataset_id, reason, decided_at, decided_by) VALUES (?, ?, ?, ?, ?)',
      )
      .run(c.role, c.datasetId, c.reason, new Date().toISOString(), study.actor.name).lastInsertRowid,
  );
}

/** The choice in force for a role (the latest), or undefined when none was ever made. */
export function currentDatasetChoice(study: Study, role: DatasetRole): DatasetChoice | undefined {
  const row = study.db
    .prepare(
      'SELECT id, role, dataset_id, reason, decided_at, decided_by FROM dataset_choice WHERE role = ? ORDER BY id DESC LIMIT 1',
    )
    .get(role) as ChoiceRow | undefined;
  return row ? choice(row) : undefined;
}

/** Every choice, oldest first (of one role when given). */
export function listDatasetChoices(study: Study, role?: DatasetRole): DatasetChoice[] {
  return (
    study.db
      .prepare(
        'SELECT id, role, dataset_id, reason, decided_at, decided_by FROM dataset_choice WHERE (? IS NULL OR role = ?) ORDER BY id',
      )
      .all(role ?? null, role ?? null) as ChoiceRow[]
  ).map(choice);
}
