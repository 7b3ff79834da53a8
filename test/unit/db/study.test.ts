import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import Database from 'better-sqlite3';
import { afterEach, beforeEach, describe, expect, it } from 'vitest';
import { StudyFileError } from '../../../db/errors.ts';
import { LATEST_VERSION, MIGRATIONS } from '../../../db/migrations/index.ts';
import { APPLICATION_ID } from '../../../db/study-file.ts';
import { Study, migrate } from '../../../db/study.ts';
import { TEST_ACTOR, sha256File, tempDir } from '../../helpers/tmp.ts';

const opts = { actor: TEST_ACTOR, app: 'test A' };
let tmp: ReturnType<typeof tempDir>;
beforeEach(() => {
  tmp = tempDir();
});
afterEach(() => tmp.cleanup());

function expectProblem(fn: () => unknown, problem: string, text: RegExp) {
  try {
    fn();
  } catch (error) {
    expect(error).toBeInstanceOf(StudyFileError);
    expect((error as StudyFileError).problem).toBe(problem);
    expect((error as Error).message).toMatch(text);
    return;
  }
  throw new Error(`expected a ${problem} error`);
}

describe('creating and migrating a study file', () => {
  it('creates a file at the latest version with the application id, strict tables and foreign keys', () => {
    const file = path.join(tmp.dir, 'a.scalewright');
    const study = Study.create(file, opts, { title: 'T' });
    expect(study.version).toBe(LATEST_VERSION);
    expect(study.db.pragma('application_id', { simple: true })).toBe(APPLICATION_ID);
    expect(study.db.pragma('foreign_keys', { simple: true })).toBe(1);
    expect(study.db.pragma('journal_mode', { simple: true })).toBe('wal');
    const tables = study.db
      .prepare("SELECT name, sql FROM sqlite_master WHERE type = 'table' AND name NOT LIKE 'sqlite_%'")
      .all() as { name: string; sql: string }[];
    for (const t of tables) expect(t.sql, t.name).toMatch(/STRICT\s*$/);
    expect(study.meta('title')).toBe('T');
    study.close();
    expect(fs.existsSync(`${file}.lock`)).toBe(false);
    expect(fs.existsSync(`${file}-wal`)).toBe(false);
  });

  it('lists migrations in strictly increasing order from 1', () => {
    expect(MIGRATIONS.map((m) => m.version)).toEqual(MIGRATIONS.map((_, i) => i + 1));
  });

  it.each(MIGRATIONS.map((m) => m.version - 1))(
    'upgrades a file built at version %i to the latest',
    (from) => {
      const file = path.join(tmp.dir, `v${from}.scalewright`);
      const db = new Database(file);
      db.pragma(`application_id = ${APPLICATION_ID}`);
      migrate(db, 0, from);
      db.close();
      const study = Study.open(file, opts);
      expect(study.version).toBe(LATEST_VERSION);
      study.close();
    },
  );

  it('refuses to overwrite an existing file', () => {
    const file = path.join(tmp.dir, 'a.scalewright');
    fs.writeFileSync(file, 'keep me');
    expectProblem(() => Study.create(file, opts), 'exists', /already exists/);
    expect(fs.readFileSync(file, 'utf8')).toBe('keep me');
  });

  it('leaves no file behind when filling a new study fails', () => {
    const file = path.join(tmp.dir, 'a.scalewright');
    expect(() =>
      Study.create(file, opts, {
        init: () => {
          throw new Error('boom');
        },
      }),
    ).toThrow('boom');
    expect(fs.readdirSync(tmp.dir)).toEqual([]);
  });
});

describe('refusing files it must not change', () => {
  it('refuses a file from a newer version and leaves it byte-identical', () => {
    const file = path.join(tmp.dir, 'new.scalewright');
    Study.create(file, opts).close();
    const db = new Database(file);
    db.pragma(`user_version = ${LATEST_VERSION + 1}`);
    db.close();
    const before = sha256File(file);
    expectProblem(() => Study.open(file, opts), 'newer-version', /newer Scalewright/);
    expectProblem(() => Study.open(file, { ...opts, mode: 'read' }), 'newer-version', /newer Scalewright/);
    expect(sha256File(file)).toBe(before);
    expect(fs.readdirSync(tmp.dir)).toEqual(['new.scalewright']);
  });

  it('refuses a corrupted file and leaves it byte-identical', () => {
    const file = path.join(tmp.dir, 'bad.scalewright');
    const study = Study.create(file, opts);
    for (let i = 0; i < 40; i++)
      study.log.append(TEST_ACTOR, {
        phase: 'construct',
        kind: 'edit',
        target: `t${i}`,
        detail: { pad: 'x'.repeat(500) },
      });
    study.close();
    const bytes = fs.readFileSync(file);
    const pageSize = bytes.readUInt16BE(16);
    // Overwrite the second page (a b-tree page) with junk: the header stays valid.
    bytes.fill(0xa5, pageSize, pageSize * 2);
    fs.writeFileSync(file, bytes);
    const before = sha256File(file);
    expectProblem(() => Study.open(file, opts), 'corrupt', /damaged/);
    expect(sha256File(file)).toBe(before);
    expect(fs.existsSync(`${file}.lock`)).toBe(false);
  });

  it('refuses a truncated file', () => {
    const file = path.join(tmp.dir, 'cut.scalewright');
    Study.create(file, opts).close();
    const bytes = fs.readFileSync(file);
    fs.writeFileSync(file, bytes.subarray(0, bytes.length - 100));
    const before = sha256File(file);
    expectProblem(() => Study.open(file, opts), 'corrupt', /truncated/);
    expect(sha256File(file)).toBe(before);
  });

  it.each([
    ['an empty file', Buffer.alloc(0), 'not-sqlite', /empty/],
    ['a text file', Buffer.from('item,expert\nq1,e1\n'), 'not-sqlite', /not an SQLite database/],
  ])('refuses %s', (_label, content, problem, text) => {
    const file = path.join(tmp.dir, 'x.scalewright');
    fs.writeFileSync(file, content);
    expectProblem(() => Study.open(file, opts), problem, text);
    expect(fs.readFileSync(file).equals(content)).toBe(true);
  });

  it('refuses an SQLite database that is not a study', () => {
    const file = path.join(tmp.dir, 'other.db');
    const db = new Database(file);
    db.exec('CREATE TABLE t (x)');
    db.close();
    const before = sha256File(file);
    expectProblem(() => Study.open(file, opts), 'not-a-study', /not a Scalewright study/);
    expect(sha256File(file)).toBe(before);
  });

  it('says when the file does not exist', () => {
    expectProblem(
      () => Study.open(path.join(tmp.dir, 'missing.scalewright'), opts),
      'not-found',
      /does not exist/,
    );
  });
});

describe('one writer at a time', () => {
  it('refuses a second writer and names the holder', () => {
    const file = path.join(tmp.dir, 'a.scalewright');
    const first = Study.create(file, opts);
    expectProblem(
      () => Study.open(file, { actor: TEST_ACTOR, app: 'test B' }),
      'locked',
      /open for writing in test A by .* \(process \d+ on /,
    );
    const reader = Study.open(file, { ...opts, mode: 'read' });
    expect(reader.version).toBe(LATEST_VERSION);
    reader.close();
    first.close();
    const again = Study.open(file, opts);
    again.close();
  });

  it('takes over a lock left by a process that no longer runs', () => {
    const file = path.join(tmp.dir, 'a.scalewright');
    Study.create(file, opts).close();
    // A pid above Linux's pid_max (2²²) cannot belong to a running process.
    fs.writeFileSync(
      `${file}.lock`,
      JSON.stringify({ pid: 2 ** 22 + 12345, host: os.hostname(), user: 'x', app: 'gone', since: '' }),
    );
    const study = Study.open(file, opts);
    const holder = JSON.parse(fs.readFileSync(`${file}.lock`, 'utf8'));
    expect(holder.pid).toBe(process.pid);
    expect(holder.app).toBe(opts.app);
    const rows = study.log.count();
    study.change({ phase: 'construct', kind: 'edit', target: 'name' }, () => {
      study.db.prepare("UPDATE construct SET name = 'taken over' WHERE id = 1").run();
    });
    expect(study.log.count()).toBe(rows + 1);
    study.close();
    expect(fs.existsSync(`${file}.lock`)).toBe(false);
  });
});

describe('changes and their log rows', () => {
  it('stores a change and its log row together, or neither', () => {
    const file = path.join(tmp.dir, 'a.scalewright');
    const study = Study.create(file, opts);
    expect(() =>
      study.change({ phase: 'construct', kind: 'edit', target: 'name' }, () => {
        study.db.prepare("UPDATE construct SET name = 'half' WHERE id = 1").run();
        throw new Error('fails midway');
      }),
    ).toThrow('fails midway');
    expect((study.db.prepare('SELECT name FROM construct').get() as { name: string }).name).toBe('');
    expect(study.log.count()).toBe(0);
    study.close();
  });

  it('keeps the log append-only inside the database', () => {
    const study = Study.create(path.join(tmp.dir, 'a.scalewright'), opts);
    study.change({ phase: 'construct', kind: 'edit', target: 'name' }, () => undefined);
    expect(() => study.db.prepare("UPDATE decision_log SET rationale = 'x'").run()).toThrow(/append-only/);
    expect(() => study.db.prepare('DELETE FROM decision_log').run()).toThrow(/append-only/);
    study.close();
  });
});
