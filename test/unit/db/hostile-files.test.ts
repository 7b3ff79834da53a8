import { spawnSync } from 'node:child_process';
import fs from 'node:fs';
import path from 'node:path';
import Database from 'better-sqlite3';
import { afterEach, beforeEach, describe, expect, it } from 'vitest';
import { StudyFileError } from '../../../db/errors.ts';
import { LATEST_VERSION } from '../../../db/migrations/index.ts';
import { Study } from '../../../db/study.ts';
import { TEST_ACTOR, sha256File, tempDir } from '../../helpers/tmp.ts';

/**
 * Study files in states a researcher can really meet: a write-ahead log beside the study that is
 * not its own, a folder where a file was expected, a version number that does not match the tables.
 * Each is refused with its own message, and the file is left as it was.
 */
const opts = { actor: TEST_ACTOR, app: 'test' };
let tmp: ReturnType<typeof tempDir>;
beforeEach(() => {
  tmp = tempDir();
});
afterEach(() => tmp.cleanup());

function problemOf(fn: () => unknown): { problem: string; message: string } {
  try {
    fn();
  } catch (error) {
    expect(error).toBeInstanceOf(StudyFileError);
    return { problem: (error as StudyFileError).problem, message: (error as Error).message };
  }
  throw new Error('expected a StudyFileError');
}

function title(file: string): string {
  const study = Study.open(file, { ...opts, mode: 'read' });
  try {
    return study.meta('title') ?? '';
  } finally {
    study.close();
  }
}

/**
 * A study open for writing with its latest change only in the write-ahead log (checkpoints off), and
 * a copy of the file and its log taken as they are: what a writer stopped at that moment leaves.
 */
function interruptedCopy(source: string, copy: string, newTitle: string): void {
  const study = Study.open(source, opts);
  try {
    study.db.pragma('wal_autocheckpoint = 0');
    study.db.prepare("UPDATE study_meta SET value = ? WHERE key = 'title'").run(newTitle);
    fs.copyFileSync(source, copy);
    fs.copyFileSync(`${source}-wal`, `${copy}-wal`);
  } finally {
    study.close();
  }
}

describe('a write-ahead log beside the study', () => {
  it('refuses, and changes nothing, a log from another study beside a study closed cleanly', () => {
    const mine = path.join(tmp.dir, 'mine.scalewright');
    const other = path.join(tmp.dir, 'other.scalewright');
    Study.create(mine, opts, { title: 'Mine' }).close();
    Study.create(other, opts, { title: 'Other' }).close();
    interruptedCopy(other, path.join(tmp.dir, 'snapshot.scalewright'), 'Other, changed');
    fs.copyFileSync(path.join(tmp.dir, 'snapshot.scalewright-wal'), `${mine}-wal`);
    const before = sha256File(mine);
    const walBefore = sha256File(`${mine}-wal`);
    for (const mode of ['write', 'read'] as const) {
      const refusal = problemOf(() => Study.open(mine, { ...opts, mode }));
      expect(refusal.problem).toBe('foreign-wal');
      expect(refusal.message).toContain(`${mine}-wal`);
      expect(refusal.message).toMatch(/closed cleanly.*move .*mine\.scalewright-wal.*to another folder/);
    }
    expect(sha256File(mine)).toBe(before);
    expect(sha256File(`${mine}-wal`)).toBe(walBefore);
    expect(fs.existsSync(`${mine}.lock`)).toBe(false);
    // Moved away, as the message says, the study opens as it was.
    fs.renameSync(`${mine}-wal`, path.join(tmp.dir, 'moved-wal'));
    expect(title(mine)).toBe('Mine');
  });

  it('opens a study whose writer was stopped, with the changes its own log holds', () => {
    const source = path.join(tmp.dir, 'source.scalewright');
    const stopped = path.join(tmp.dir, 'stopped.scalewright');
    Study.create(source, opts, { title: 'Before' }).close();
    interruptedCopy(source, stopped, 'After');
    const study = Study.open(stopped, opts);
    try {
      expect(study.meta('title')).toBe('After');
      expect(study.db.pragma('integrity_check', { simple: true })).toBe('ok');
    } finally {
      study.close();
    }
    expect(fs.existsSync(`${stopped}-wal`)).toBe(false);
  });

  it('refuses a log of another kind of database beside a study in write-ahead mode', () => {
    const source = path.join(tmp.dir, 'source.scalewright');
    const stopped = path.join(tmp.dir, 'stopped.scalewright');
    Study.create(source, opts, { title: 'Before' }).close();
    interruptedCopy(source, stopped, 'After');
    // A plain SQLite database with the study's page size, its change only in its log.
    const plain = path.join(tmp.dir, 'plain.db');
    const db = new Database(plain);
    db.pragma('page_size = 16384');
    db.pragma('journal_mode = WAL');
    db.pragma('wal_autocheckpoint = 0');
    db.exec('CREATE TABLE t (x INTEGER); INSERT INTO t VALUES (1)');
    fs.copyFileSync(`${plain}-wal`, `${stopped}-wal`);
    db.close();
    const before = sha256File(stopped);
    const refusal = problemOf(() => Study.open(stopped, opts));
    expect(refusal.problem).toBe('foreign-wal');
    expect(refusal.message).toMatch(
      /does not belong to it \(its copy of the first page is not from a Scalewright study\)/,
    );
    expect(sha256File(stopped)).toBe(before);
  });

  it('refuses a log with another page size, and one that is not a log at all', () => {
    const source = path.join(tmp.dir, 'source.scalewright');
    const stopped = path.join(tmp.dir, 'stopped.scalewright');
    Study.create(source, opts).close();
    interruptedCopy(source, stopped, 'After');
    const plain = path.join(tmp.dir, 'plain.db');
    const db = new Database(plain);
    db.pragma('journal_mode = WAL');
    db.pragma('wal_autocheckpoint = 0');
    db.exec('CREATE TABLE t (x INTEGER)');
    fs.copyFileSync(`${plain}-wal`, `${stopped}-wal`);
    db.close();
    expect(problemOf(() => Study.open(stopped, opts)).message).toMatch(
      /pages of 4096 bytes, the study pages of 16384/,
    );
    fs.writeFileSync(`${stopped}-wal`, 'these bytes are not a log at all, but they are here');
    expect(problemOf(() => Study.open(stopped, opts)).message).toMatch(/not an SQLite write-ahead log/);
  });
});

describe('a change left unfinished in a rollback journal', () => {
  it('is rolled back by the next writer; a reader is told what to do', () => {
    const file = path.join(tmp.dir, 'stopped.scalewright');
    Study.create(file, opts, { title: 'Kept' }).close();
    // A writer in rollback mode stopped mid-transaction, after its cache spilled into the file.
    const child = spawnSync(
      process.execPath,
      [
        '-e',
        `const Database = require(${JSON.stringify(require.resolve('better-sqlite3'))});
const db = new Database(process.argv[1]);
db.pragma('cache_size = 10');
db.exec('BEGIN');
const insert = db.prepare('INSERT INTO study_meta (key, value) VALUES (?, ?)');
for (let i = 0; i < 20000; i++) insert.run('unfinished-' + i, 'x'.repeat(200));
process.kill(process.pid, 'SIGKILL');`,
        file,
      ],
      { encoding: 'utf8' },
    );
    expect(child.signal).toBe('SIGKILL');
    expect(fs.statSync(`${file}-journal`).size).toBeGreaterThan(0);
    const refusal = problemOf(() => Study.open(file, { ...opts, mode: 'read' }));
    expect(refusal.problem).toBe('interrupted');
    expect(refusal.message).toMatch(
      /unfinished change .*stopped\.scalewright-journal.*open it once for writing/,
    );
    const study = Study.open(file, opts);
    try {
      expect(study.db.pragma('integrity_check', { simple: true })).toBe('ok');
      expect(study.meta('title')).toBe('Kept');
      expect(study.meta('unfinished-0')).toBeUndefined();
    } finally {
      study.close();
    }
    expect(fs.existsSync(`${file}-journal`)).toBe(false);
  });
});

describe('other files that are not a study to open', () => {
  it('names a folder given as a study', () => {
    const folder = path.join(tmp.dir, 'folder.scalewright');
    fs.mkdirSync(folder);
    for (const mode of ['write', 'read'] as const) {
      expect(problemOf(() => Study.open(folder, { ...opts, mode }))).toEqual({
        problem: 'not-sqlite',
        message: `${folder} is a folder, not a study file`,
      });
    }
  });

  it('refuses a study whose stored version is older than its tables, leaving it unchanged', () => {
    const file = path.join(tmp.dir, 'mislabelled.scalewright');
    Study.create(file, opts).close();
    const db = new Database(file);
    db.pragma('user_version = 1');
    db.close();
    const before = sha256File(file);
    const refusal = problemOf(() => Study.open(file, opts));
    expect(refusal.problem).toBe('corrupt');
    expect(refusal.message).toMatch(
      new RegExp(
        `says it is study file version 1, but its tables do not match that version \\(upgrading it to version ${LATEST_VERSION} failed: .+\\); it was left unchanged`,
      ),
    );
    expect(sha256File(file)).toBe(before);
    expect(fs.readdirSync(tmp.dir)).toEqual(['mislabelled.scalewright']);
  });

  it('inspects an older study in memory, without writing to the file', () => {
    const file = path.join(tmp.dir, 'old.scalewright');
    const db = new Database(file);
    db.pragma('page_size = 16384');
    db.pragma('application_id = 1396919383');
    db.close();
    const before = sha256File(file);
    const study = Study.inspect(file, opts);
    try {
      expect(study.version).toBe(LATEST_VERSION);
      expect(study.mode).toBe('read');
    } finally {
      study.close();
    }
    expect(sha256File(file)).toBe(before);
  });
});
