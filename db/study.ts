import crypto from 'node:crypto';
import fs from 'node:fs';
import path from 'node:path';
import Database from 'better-sqlite3';
import { DigestTracker, hasDigests, syncAllDigests } from './content-digest.ts';
import { DecisionLog, type Actor } from './decision-log.ts';
import { StudyFileError } from './errors.ts';
import { StudyLock } from './lock.ts';
import { LATEST_VERSION, MIGRATIONS } from './migrations/index.ts';
import type { MigrationContext } from './migrations/types.ts';
import { APPLICATION_ID, inspectStudyFile } from './study-file.ts';

export const STUDY_EXTENSION = '.scalewright';

/**
 * Page size of new study files. A study keeps each imported file byte for byte beside its columns,
 * megabytes per dataset; with 16 KiB pages a 13 MB import is written and checkpointed in a quarter of
 * the pages, which took its commit from about 77 to 65 ms against 4 KiB pages (SQLite's default).
 * Studies made before keep the page size they have.
 */
const STUDY_PAGE_SIZE = 16384;

export interface OpenOptions {
  /** Who writes (for the lock and the log). */
  actor: Actor;
  /** Named in the lock so that a second writer is told who holds the study. */
  app: string;
  /** 'read' opens without a lock and never writes (status, verify). Default 'write'. */
  mode?: 'read' | 'write';
  /** Path of a better-sqlite3 addon built for another ABI (the Electron shell passes its own). */
  nativeBinding?: string;
}

/**
 * An open study file. Everything that changes the study goes through `change`, which runs the
 * change and appends its decision-log row in one transaction.
 */
export class Study {
  readonly log: DecisionLog;

  private constructor(
    readonly path: string,
    readonly db: Database.Database,
    /** Who is named in the log rows this study writes; the display name can change while open. */
    public actor: Actor,
    readonly mode: 'read' | 'write',
    private readonly lock: StudyLock | undefined,
  ) {
    this.log = new DecisionLog(db, mode === 'write' ? new DigestTracker(db) : undefined);
  }

  /**
   * Creates a new study at `file` and opens it; refuses to overwrite an existing file. The file is
   * built and filled (`init`, e.g. the demo) under a temporary name and moved into place only when
   * complete, so a failure never leaves a half-made study behind.
   */
  static create(
    file: string,
    options: OpenOptions,
    setup: { title?: string; init?: (study: Study) => void } = {},
  ): Study {
    const target = path.resolve(file);
    if (fs.existsSync(target))
      throw new StudyFileError('exists', `${target} already exists; choose another name`);
    const folder = path.dirname(target);
    try {
      fs.mkdirSync(folder, { recursive: true });
      fs.accessSync(folder, fs.constants.W_OK);
    } catch (error) {
      throw notWritable(`${target} cannot be created`, folder, error);
    }
    const temp = `${target}.${process.pid}.creating`;
    try {
      let db: Database.Database;
      try {
        db = new Database(temp, { nativeBinding: options.nativeBinding });
      } catch (error) {
        throw notWritable(`${target} cannot be created`, folder, error);
      }
      try {
        // Before anything is written: the page size is fixed when the file is first written.
        db.pragma(`page_size = ${STUDY_PAGE_SIZE}`);
        db.pragma(`application_id = ${APPLICATION_ID}`);
        db.pragma('foreign_keys = ON');
        migrate(db, 0, LATEST_VERSION, { actor: options.actor });
        db.transaction(() => {
          const meta = db.prepare('INSERT INTO study_meta (key, value) VALUES (?, ?)');
          meta.run('study_id', crypto.randomUUID());
          meta.run('created_at', new Date().toISOString());
          meta.run('title', setup.title ?? '');
          // The study's first state: what later log rows' digests grow from.
          syncAllDigests(db);
        })();
      } finally {
        db.close();
      }
      if (setup.init) {
        const draft = Study.open(temp, options);
        try {
          setup.init(draft);
        } finally {
          draft.close();
        }
      }
      if (fs.existsSync(target))
        throw new StudyFileError('exists', `${target} already exists; choose another name`);
      fs.renameSync(temp, target);
    } finally {
      for (const leftover of [temp, `${temp}-wal`, `${temp}-shm`, `${temp}.lock`])
        fs.rmSync(leftover, { force: true });
    }
    return Study.open(target, options);
  }

  /**
   * Opens an existing study. The header is read first and the file checked read-only
   * (`PRAGMA quick_check`); a file that is not a study, is damaged, or is from a newer version
   * is refused without being modified. Pending migrations then run in one transaction.
   */
  static open(file: string, options: OpenOptions): Study {
    const target = path.resolve(file);
    const mode = options.mode ?? 'write';
    const facts = inspectStudyFile(target);
    if (mode === 'write') checkWritable(target);
    if (mode === 'read' && facts.userVersion < LATEST_VERSION) {
      throw new StudyFileError(
        'older-version',
        `${target} is study file version ${facts.userVersion}; open it once for writing (in the app, or any project command that writes) to upgrade it to version ${LATEST_VERSION}`,
      );
    }
    // A change left unfinished in a rollback journal (a writer stopped while upgrading the study)
    // cannot be read without rolling it back, which only a writer may do, under the lock.
    let unfinished = false;
    try {
      checkReadOnly(target, options.nativeBinding);
    } catch (error) {
      if (mode === 'read' || !(error instanceof StudyFileError) || error.problem !== 'interrupted')
        throw error;
      unfinished = true;
    }
    if (mode === 'read') {
      const db = new Database(target, {
        readonly: true,
        fileMustExist: true,
        nativeBinding: options.nativeBinding,
      });
      return new Study(target, db, options.actor, 'read', undefined);
    }
    const lock = StudyLock.acquire(target, options.app);
    try {
      const db = new Database(target, { fileMustExist: true, nativeBinding: options.nativeBinding });
      try {
        db.pragma('foreign_keys = ON');
        db.pragma('busy_timeout = 2000');
        if (unfinished) quickCheck(db, target);
        // Migrations run before the switch to write-ahead mode: a migration that fails is rolled
        // back, and the file is left exactly as it was.
        migrateStudy(db, target, facts.userVersion, { actor: options.actor });
        db.pragma('journal_mode = WAL');
      } catch (error) {
        db.close();
        throw error;
      }
      return new Study(target, db, options.actor, 'write', lock);
    } catch (error) {
      lock.release();
      throw error;
    }
  }

  /**
   * Opens a study only to read and check it, never writing to the file: the same checks as `open`;
   * a study of an older version is copied into memory and upgraded there, so that a check that
   * needs the current tables (an import's, before the study is opened for writing) can run on it.
   */
  static inspect(file: string, options: Omit<OpenOptions, 'mode'>): Study {
    const target = path.resolve(file);
    const facts = inspectStudyFile(target);
    if (facts.userVersion === LATEST_VERSION) return Study.open(target, { ...options, mode: 'read' });
    checkReadOnly(target, options.nativeBinding);
    const disk = new Database(target, {
      readonly: true,
      fileMustExist: true,
      nativeBinding: options.nativeBinding,
    });
    let image: Buffer;
    try {
      image = disk.serialize();
    } finally {
      disk.close();
    }
    const db = new Database(image, { nativeBinding: options.nativeBinding });
    try {
      db.pragma('foreign_keys = ON');
      migrateStudy(db, target, facts.userVersion, { actor: options.actor });
    } catch (error) {
      db.close();
      throw error;
    }
    return new Study(target, db, options.actor, 'read', undefined);
  }

  /**
   * Runs `apply` and appends one decision-log row describing it, in one transaction: either both
   * are stored or neither is. `entry` may be computed from what `apply` returned (a new row's id).
   */
  change<T>(entry: ChangeEntry | ((result: T) => ChangeEntry), apply: () => T): T {
    this.assertWritable();
    return this.db.transaction(() => {
      const result = apply();
      this.log.append(this.actor, typeof entry === 'function' ? entry(result) : entry);
      return result;
    })();
  }

  meta(key: string): string | undefined {
    const row = this.db.prepare('SELECT value FROM study_meta WHERE key = ?').get(key) as
      | { value: string }
      | undefined;
    return row?.value;
  }

  get version(): number {
    return this.db.pragma('user_version', { simple: true }) as number;
  }

  assertWritable(): void {
    if (this.mode !== 'write') throw new StudyFileError('read-only', `${this.path} is open read-only`);
  }

  close(): void {
    if (this.db.open) {
      // Back to a rollback journal, so the closed study is one self-contained file again
      // (and a later read-only open does not need to create -wal and -shm files beside it).
      if (this.mode === 'write') this.db.pragma('journal_mode = DELETE');
      this.db.close();
    }
    this.lock?.release();
  }
}

export interface ChangeEntry {
  phase: string;
  kind: string;
  target: string;
  rationale?: string;
  detail?: Record<string, unknown>;
  runId?: number | null;
}

function checkReadOnly(target: string, nativeBinding: string | undefined): void {
  let db: Database.Database | undefined;
  try {
    db = new Database(target, { readonly: true, fileMustExist: true, nativeBinding });
    quickCheck(db, target);
  } catch (error) {
    if (error instanceof StudyFileError) throw error;
    if ((error as { code?: string }).code === 'SQLITE_READONLY_ROLLBACK') {
      throw new StudyFileError(
        'interrupted',
        `${target} holds an unfinished change left by a program that stopped (${target}-journal); open it once for writing (in the app, or any project command that writes) to roll that change back`,
      );
    }
    throw new StudyFileError(
      'corrupt',
      `${target} is damaged and cannot be read: ${(error as Error).message}`,
    );
  } finally {
    db?.close();
  }
}

/** Refuses a study that PRAGMA quick_check finds damaged, naming its first problems. */
function quickCheck(db: Database.Database, target: string): void {
  const rows = db.pragma('quick_check') as { quick_check: string }[];
  const problems = rows.map((r) => r.quick_check).filter((r) => r !== 'ok');
  if (problems.length > 0) {
    throw new StudyFileError('corrupt', `${target} is damaged: ${problems.slice(0, 3).join('; ')}`);
  }
}

/**
 * Upgrades an opened study from version `from`; a migration that fails (tables that do not match the
 * version the file states) is rolled back and reported as a damaged study, naming the file.
 */
function migrateStudy(db: Database.Database, target: string, from: number, context: MigrationContext): void {
  try {
    migrate(db, from, LATEST_VERSION, context);
  } catch (error) {
    throw new StudyFileError(
      'corrupt',
      `${target} says it is study file version ${from}, but its tables do not match that version (upgrading it to version ${LATEST_VERSION} failed: ${(error as Error).message}); it was left unchanged`,
    );
  }
}

/**
 * Refuses, before anything is written, a study this user may not write to: a read-only file, or a
 * folder where its lock and journal files cannot be made.
 */
export function checkWritable(target: string): void {
  try {
    fs.accessSync(target, fs.constants.W_OK);
  } catch (error) {
    const code = (error as NodeJS.ErrnoException).code;
    throw new StudyFileError(
      'not-writable',
      `${target} is read-only (${code === 'EROFS' ? 'on a read-only disk' : 'permission denied'}); make it writable, or copy it to a folder you can write to, to change it`,
    );
  }
  const folder = path.dirname(target);
  try {
    fs.accessSync(folder, fs.constants.W_OK);
  } catch (error) {
    throw notWritable(
      `${target} cannot be opened for writing (its lock and journal are kept beside it)`,
      folder,
      error,
    );
  }
}

function notWritable(what: string, folder: string, error: unknown): StudyFileError {
  const code = (error as NodeJS.ErrnoException).code;
  const reason =
    code === 'EACCES' || code === 'EPERM'
      ? 'permission denied'
      : code === 'EROFS'
        ? 'a read-only disk'
        : code === 'ENOTDIR'
          ? 'a file is in the way'
          : (code ?? (error as Error).message);
  return new StudyFileError('not-writable', `${what}: the folder ${folder} is not writable (${reason})`);
}

/** Named in the log row a file upgrade writes when no one is named (tests, tools). */
const FILE_UPGRADE_ACTOR: Actor = { user: 'scalewright', name: 'Scalewright file upgrade' };

/**
 * Runs the migrations after `from` up to `to`, all in one transaction, and records the version.
 * Once a file keeps content digests, rows that a migration added or changed are digested here, and
 * recorded in one logged row when the file has a log, so that no migration needs to know of them.
 */
export function migrate(
  db: Database.Database,
  from: number,
  to: number = LATEST_VERSION,
  context: MigrationContext = { actor: FILE_UPGRADE_ACTOR },
): void {
  const pending = MIGRATIONS.filter((m) => m.version > from && m.version <= to);
  if (pending.length === 0) return;
  db.transaction(() => {
    for (const migration of pending) migration.up(db, context);
    if (hasDigests(db)) {
      const rows = syncAllDigests(db);
      const log = new DecisionLog(db);
      if (rows > 0 && log.count() > 0) {
        log.append(context.actor, {
          phase: 'study',
          kind: 'digests-recorded',
          target: `content changed by the upgrade to file version ${to}`,
          rationale: 'digests recorded for content a file upgrade added or changed',
          detail: { rows, fileVersion: to },
        });
      }
    }
    db.pragma(`user_version = ${to}`);
  })();
}
