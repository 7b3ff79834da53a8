import crypto from 'node:crypto';
import type Database from 'better-sqlite3';

/**
 * The digest of what the study holds, so that a row changed, added or removed outside the app
 * (directly in SQLite) is found and named.
 *
 * Every table the schema holds is covered, except the few listed in `UNDIGESTED_TABLES`: tables
 * that later migrations add are covered without anyone listing them. Each covered row has a digest
 * in the bookkeeping table `content_digest` (table, rowid, digest, column fingerprints), kept up to
 * date in the same transaction as each change: temporary triggers note which rows a change touched,
 * and the decision-log append digests just those rows. Each log row records the root digest over
 * the bookkeeping, so `verify` can tell an edited row (its recomputed digest differs from its
 * bookkeeping entry: table, row and columns named) from edited bookkeeping (the root differs from
 * the one the last log row recorded).
 *
 * A blob column `X_bytes` beside a text column `X_sha256` (a stored data file) enters a row's digest
 * by its recorded SHA-256 and length only; `storedFileBreaks` checks the bytes against that SHA-256,
 * so the megabytes of a stored file are hashed once at import and once per verify, never per change.
 * Other blobs (a dataset's column blocks) are hashed when their row is digested, which is when the
 * row is written.
 */

/** Tables outside the content digest, and why each is left out. */
export const UNDIGESTED_TABLES: ReadonlyMap<string, string> = new Map([
  ['decision_log', 'the log itself: its rows are checked by their hash chain'],
  ['content_digest', 'the bookkeeping of this digest: checked against the root each log row records'],
]);

/**
 * Rows outside the content digest: the head record, which every log append rewrites (the log's own
 * verify checks it against the chain).
 */
export const UNDIGESTED_ROWS: readonly { table: string; column: string; value: string }[] = [
  { table: 'study_meta', column: 'key', value: 'log_head' },
];

export interface TableShape {
  name: string;
  columns: string[];
  /** Declared types, upper case (STRICT tables: INTEGER, REAL, TEXT, BLOB, ANY). */
  types: string[];
  /** The primary-key columns, in key order; empty when the table is keyed by its rowid alone. */
  key: string[];
  /** SQL condition selecting the rows that are covered (`1` for all). */
  covered: string;
  /** Pairs of stored-file columns: bytes (BLOB) and its recorded SHA-256 (TEXT). */
  files: { bytes: string; sha256: string; size?: string }[];
}

export interface RowDigest {
  digest: string;
  /** `name=fingerprint` per column, comma-separated: names the columns that differ. */
  columns: string;
}

const quote = (name: string) => `"${name.replaceAll('"', '""')}"`;
const sqlString = (value: string) => `'${value.replaceAll("'", "''")}'`;

/** The covered tables, from the schema itself (sqlite_master), in name order. */
export function coveredTables(db: Database.Database): TableShape[] {
  const names = db
    .prepare(
      "SELECT name FROM main.sqlite_master WHERE type = 'table' AND name NOT LIKE 'sqlite\\_%' ESCAPE '\\' ORDER BY name",
    )
    .pluck()
    .all() as string[];
  return names.filter((n) => !UNDIGESTED_TABLES.has(n)).map((name) => tableShape(db, name));
}

function tableShape(db: Database.Database, name: string): TableShape {
  const info = db.prepare(`SELECT name, type, pk FROM pragma_table_info(?)`).all(name) as {
    name: string;
    type: string;
    pk: number;
  }[];
  const columns = info.map((c) => c.name);
  const types = info.map((c) => c.type.toUpperCase());
  const key = info
    .filter((c) => c.pk > 0)
    .sort((a, b) => a.pk - b.pk)
    .map((c) => c.name);
  const excluded = UNDIGESTED_ROWS.filter((r) => r.table === name);
  const covered =
    excluded.length === 0
      ? '1'
      : excluded.map((r) => `${quote(r.column)} IS NOT ${sqlString(r.value)}`).join(' AND ');
  const files: TableShape['files'] = [];
  for (let i = 0; i < columns.length; i++) {
    const match = /^(.*)bytes$/.exec(columns[i]);
    if (!match || types[i] !== 'BLOB') continue;
    const sha256 = `${match[1]}sha256`;
    if (!columns.includes(sha256)) continue;
    const size = `${match[1]}size`;
    files.push({ bytes: columns[i], sha256, size: columns.includes(size) ? size : undefined });
  }
  return { name, columns, types, key, covered, files };
}

/** Reads rows as arrays (rowid first), with integers as bigints so no value is rounded. */
function rowReader(db: Database.Database, shape: TableShape, where: string) {
  // A stored file's bytes are read as their length only: its recorded SHA-256 vouches for them.
  const fileBytes = new Set(shape.files.map((f) => f.bytes));
  const columns = shape.columns.map((c) => (fileBytes.has(c) ? `length(${quote(c)})` : quote(c)));
  return db
    .prepare(
      `SELECT rowid, ${columns.join(', ')} FROM ${quote(shape.name)} WHERE (${shape.covered}) AND ${where}`,
    )
    .raw(true)
    .safeIntegers(true);
}

function encode(value: unknown): string {
  if (value === null) return 'N';
  if (typeof value === 'bigint') return `I${value}`;
  if (typeof value === 'number') return `R${Object.is(value, -0) ? '-0' : String(value)}`;
  if (typeof value === 'string') return `T${value}`;
  if (Buffer.isBuffer(value)) return `B${value.length}:${sha256(value)}`;
  throw new Error(`cannot digest a value of type ${typeof value}`);
}

const sha256 = (data: string | Buffer) => crypto.createHash('sha256').update(data).digest('hex');

/** The digest of one row, given as read by `rowReader` (rowid first). */
export function digestRow(shape: TableShape, row: unknown[]): RowDigest {
  const whole = crypto.createHash('sha256');
  whole.update(`${shape.name}\0${row[0]}\0`);
  const parts: string[] = [];
  const fileBytes = new Set(shape.files.map((f) => f.bytes));
  for (let i = 0; i < shape.columns.length; i++) {
    const value = row[i + 1];
    const name = shape.columns[i];
    // A stored file's bytes are vouched for by its recorded SHA-256 (a column of this same row);
    // the reader gives their length.
    const text = fileBytes.has(name) && typeof value === 'bigint' ? `F${value}` : encode(value);
    const columnHash = sha256(`${name}\0${text}`);
    whole.update(`${columnHash}\0`);
    parts.push(`${name}=${columnHash.slice(0, 12)}`);
  }
  return { digest: whole.digest('hex'), columns: parts.join(',') };
}

/** The root digest over the whole bookkeeping, in (table, rowid) order. */
export function rootDigest(db: Database.Database): string {
  const hash = crypto.createHash('sha256');
  const rows = db
    .prepare('SELECT tbl, row_id, digest FROM content_digest ORDER BY tbl, row_id')
    .raw(true)
    .iterate() as Iterable<[string, number, string]>;
  for (const [tbl, rowId, digest] of rows) hash.update(`${tbl}\0${rowId}\0${digest}\n`);
  return hash.digest('hex');
}

export function hasDigests(db: Database.Database): boolean {
  return (
    db.prepare("SELECT 1 FROM main.sqlite_master WHERE type = 'table' AND name = 'content_digest'").get() !==
    undefined
  );
}

/**
 * Brings the bookkeeping in line with every covered row (a file upgrade, a new study): digests all
 * rows, and returns how many entries it added, changed or removed.
 */
export function syncAllDigests(db: Database.Database): number {
  let changed = 0;
  const upsert = db.prepare(
    `INSERT INTO content_digest (tbl, row_id, digest, columns) VALUES (?, ?, ?, ?)
     ON CONFLICT (tbl, row_id) DO UPDATE SET digest = excluded.digest, columns = excluded.columns`,
  );
  const tables = coveredTables(db);
  for (const shape of tables) {
    const kept = new Map(
      (
        db.prepare('SELECT row_id, digest FROM content_digest WHERE tbl = ?').raw(true).all(shape.name) as [
          number,
          string,
        ][]
      ).map(([id, d]) => [id, d]),
    );
    // All first: better-sqlite3 does not write while a statement is being iterated.
    for (const row of rowReader(db, shape, '1').all() as unknown[][]) {
      const rowId = Number(row[0]);
      const d = digestRow(shape, row);
      if (kept.get(rowId) !== d.digest) {
        upsert.run(shape.name, rowId, d.digest, d.columns);
        changed++;
      }
      kept.delete(rowId);
    }
    const remove = db.prepare('DELETE FROM content_digest WHERE tbl = ? AND row_id = ?');
    for (const rowId of kept.keys()) {
      remove.run(shape.name, rowId);
      changed++;
    }
  }
  const names = new Set(tables.map((t) => t.name));
  for (const tbl of db.prepare('SELECT DISTINCT tbl FROM content_digest').pluck().all() as string[]) {
    if (!names.has(tbl)) changed += db.prepare('DELETE FROM content_digest WHERE tbl = ?').run(tbl).changes;
  }
  return changed;
}

/**
 * Keeps the bookkeeping current on a connection that writes: temporary triggers (they live in this
 * connection only and never enter the file) note each covered row a statement inserts, updates or
 * deletes; `flush` digests those rows. The notes are in a temporary table, so a rolled-back change
 * rolls its notes back with it.
 */
export class DigestTracker {
  private shapes = new Map<string, TableShape>();

  constructor(private readonly db: Database.Database) {
    db.exec(
      // No key: a statement's own conflict policy (OR REPLACE, OR IGNORE) overrides a trigger's, so
      // the notes may repeat, and flush takes each once.
      'CREATE TEMP TABLE IF NOT EXISTS content_touched (tbl TEXT NOT NULL, row_id INTEGER NOT NULL)',
    );
    for (const shape of coveredTables(db)) {
      this.shapes.set(shape.name, shape);
      const t = quote(shape.name);
      const base = `content_touched_${shape.name.replace(/\W/g, '_')}`;
      const excluded = UNDIGESTED_ROWS.filter((r) => r.table === shape.name);
      const cond = (alias: string) =>
        excluded.map((r) => `${alias}.${quote(r.column)} IS NOT ${sqlString(r.value)}`).join(' AND ');
      const when = (...aliases: string[]) =>
        excluded.length === 0 ? '' : `WHEN ${aliases.map((a) => `(${cond(a)})`).join(' OR ')}`;
      const note = (alias: string) =>
        `INSERT INTO content_touched VALUES (${sqlString(shape.name)}, ${alias}.rowid);`;
      db.exec(`
        CREATE TEMP TRIGGER IF NOT EXISTS ${quote(`${base}_i`)} AFTER INSERT ON main.${t} ${when('NEW')}
        BEGIN ${note('NEW')} END;
        CREATE TEMP TRIGGER IF NOT EXISTS ${quote(`${base}_u`)} AFTER UPDATE ON main.${t} ${when('OLD', 'NEW')}
        BEGIN ${note('OLD')} ${note('NEW')} END;
        CREATE TEMP TRIGGER IF NOT EXISTS ${quote(`${base}_d`)} AFTER DELETE ON main.${t} ${when('OLD')}
        BEGIN ${note('OLD')} END;
      `);
    }
  }

  /** Digests the rows touched since the last flush into the bookkeeping. Call inside the change's transaction. */
  flush(): number {
    const touched = this.db
      .prepare('SELECT DISTINCT tbl, row_id FROM temp.content_touched ORDER BY tbl, row_id')
      .raw(true)
      .all() as [string, number][];
    if (touched.length === 0) return 0;
    const upsert = this.db.prepare(
      `INSERT INTO content_digest (tbl, row_id, digest, columns) VALUES (?, ?, ?, ?)
       ON CONFLICT (tbl, row_id) DO UPDATE SET digest = excluded.digest, columns = excluded.columns`,
    );
    const remove = this.db.prepare('DELETE FROM content_digest WHERE tbl = ? AND row_id = ?');
    for (const [tbl, rowId] of touched) {
      const shape = this.shapes.get(tbl) as TableShape;
      const row = rowReader(this.db, shape, 'rowid = ?').get(rowId) as unknown[] | undefined;
      // An update that only touches the head record's row leaves it uncovered (the WHERE filters it).
      if (row) {
        const d = digestRow(shape, row);
        upsert.run(tbl, rowId, d.digest, d.columns);
      } else {
        remove.run(tbl, rowId);
      }
    }
    this.db.prepare('DELETE FROM temp.content_touched').run();
    return touched.length;
  }
}

/** One problem the content check found. */
export interface ContentBreak {
  check: 'content' | 'digests' | 'stored-file';
  table?: string;
  /** The row's primary key as `column value` pairs, or its rowid. */
  row?: string;
  columns?: string[];
  problem: string;
}

function rowLabel(shape: TableShape, row: unknown[]): string {
  if (shape.key.length === 0) return `rowid ${row[0]}`;
  return shape.key.map((k) => `${k} ${String(row[shape.columns.indexOf(k) + 1])}`).join(', ');
}

/**
 * Recomputes every covered row's digest against the bookkeeping, and the bookkeeping's root
 * against `recordedRoot` (what the last log row recorded; undefined when no row recorded one).
 */
export function contentBreaks(
  db: Database.Database,
  recordedRoot: { seq: number; root: string } | undefined,
): ContentBreak[] {
  const breaks: ContentBreak[] = [];
  const tables = coveredTables(db);
  for (const shape of tables) {
    const kept = new Map(
      (
        db
          .prepare('SELECT row_id, digest, columns FROM content_digest WHERE tbl = ?')
          .raw(true)
          .all(shape.name) as [number, string, string][]
      ).map(([id, digest, columns]) => [id, { digest, columns }]),
    );
    for (const row of rowReader(db, shape, '1').iterate() as Iterable<unknown[]>) {
      const rowId = Number(row[0]);
      const entry = kept.get(rowId);
      kept.delete(rowId);
      const at = { check: 'content' as const, table: shape.name, row: rowLabel(shape, row) };
      if (!entry) {
        breaks.push({
          ...at,
          problem: 'this row is not in the recorded state (it was added outside the app)',
        });
        continue;
      }
      const now = digestRow(shape, row);
      if (now.digest === entry.digest) continue;
      const was = new Map(entry.columns.split(',').map((p) => p.split('=') as [string, string]));
      const differ = now.columns
        .split(',')
        .map((p) => p.split('=') as [string, string])
        .filter(([name, fp]) => was.get(name) !== fp)
        .map(([name]) => name);
      breaks.push({
        ...at,
        columns: differ,
        problem:
          differ.length > 0
            ? `${differ.join(', ')} ${differ.length === 1 ? 'differs' : 'differ'} from the recorded state (edited outside the app)`
            : 'the row differs from the recorded state (edited outside the app)',
      });
    }
    for (const rowId of kept.keys()) {
      breaks.push({
        check: 'content',
        table: shape.name,
        row: `rowid ${rowId}`,
        problem: 'a recorded row is missing (it was removed outside the app)',
      });
    }
  }
  const names = new Set(tables.map((t) => t.name));
  for (const tbl of db.prepare('SELECT DISTINCT tbl FROM content_digest').pluck().all() as string[]) {
    if (!names.has(tbl))
      breaks.push({
        check: 'content',
        table: tbl,
        problem: 'a recorded table is missing (it was dropped outside the app)',
      });
  }
  if (recordedRoot && rootDigest(db) !== recordedRoot.root) {
    breaks.push({
      check: 'digests',
      table: 'content_digest',
      problem: `the digest bookkeeping does not match the state log row ${recordedRoot.seq} recorded (the bookkeeping was edited)`,
    });
  }
  return breaks;
}

/** Every stored file's bytes against its recorded SHA-256 (and size, where recorded). */
export function storedFileBreaks(db: Database.Database): ContentBreak[] {
  const breaks: ContentBreak[] = [];
  for (const shape of coveredTables(db)) {
    for (const file of shape.files) {
      const rows = db
        .prepare(
          `SELECT rowid, ${shape.columns.map(quote).join(', ')} FROM ${quote(shape.name)} WHERE ${shape.covered}`,
        )
        .raw(true)
        .iterate() as Iterable<unknown[]>;
      for (const row of rows) {
        const bytes = row[shape.columns.indexOf(file.bytes) + 1];
        const recorded = row[shape.columns.indexOf(file.sha256) + 1];
        if (!Buffer.isBuffer(bytes)) continue;
        const at = { check: 'stored-file' as const, table: shape.name, row: rowLabel(shape, row) };
        const actual = sha256(bytes);
        if (actual !== recorded) {
          breaks.push({
            ...at,
            columns: [file.bytes],
            problem: `the stored file's bytes do not match its recorded SHA-256 (recorded ${String(recorded).slice(0, 12)}…, the bytes give ${actual.slice(0, 12)}…)`,
          });
        } else if (file.size && Number(row[shape.columns.indexOf(file.size) + 1]) !== bytes.length) {
          breaks.push({
            ...at,
            columns: [file.size],
            problem: `the stored file holds ${bytes.length} bytes, but its recorded size is ${String(row[shape.columns.indexOf(file.size) + 1])}`,
          });
        }
      }
    }
  }
  return breaks;
}
