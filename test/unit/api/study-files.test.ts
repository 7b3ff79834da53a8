import fs from 'node:fs';
import path from 'node:path';
import Database from 'better-sqlite3';
import { afterEach, beforeEach, describe, expect, it } from 'vitest';
import { dispatch } from '../../../app/api/dispatch.ts';
import { Session } from '../../../app/api/session.ts';
import { Study } from '../../../db/study.ts';
import { TEST_ACTOR, sha256File, tempDir } from '../../helpers/tmp.ts';

let tmp: ReturnType<typeof tempDir>;
let session: Session;
beforeEach(() => {
  tmp = tempDir();
  session = new Session(TEST_ACTOR, 'test');
});
afterEach(async () => {
  await session.shutdown();
  tmp.cleanup();
});

async function ok(name: string, input: unknown) {
  const result = await dispatch(session, name, input);
  if (!result.ok) throw new Error(`${name} failed: ${result.error.message}`);
  return result.value as Record<string, unknown>;
}

async function refused(name: string, input: unknown) {
  const result = await dispatch(session, name, input);
  if (result.ok) throw new Error(`${name} was expected to be refused`);
  return result.error;
}

describe('creating and opening a study through the command table', () => {
  it('creates a study, lists it in its folder and among the recent studies, and opens it again', async () => {
    const file = path.join(tmp.dir, 'trips.scalewright');
    expect(await ok('study.create', { path: file, title: 'Trips' })).toEqual({ path: file });
    expect((await ok('study.info', {})).title).toBe('Trips');
    fs.mkdirSync(path.join(tmp.dir, 'drafts'));
    fs.writeFileSync(path.join(tmp.dir, 'notes.txt'), 'not a study');
    const listing = await ok('study.listFolder', {});
    expect(listing.path).toBe(tmp.dir);
    expect(listing.parent).toBe(path.dirname(tmp.dir));
    expect(listing.entries).toEqual([
      { name: 'drafts', path: path.join(tmp.dir, 'drafts'), kind: 'folder' },
      { name: 'trips.scalewright', path: file, kind: 'study' },
    ]);
    session.close();
    expect(await ok('study.open', { path: file })).toEqual({ path: file });
    expect(await ok('study.recent', {})).toEqual({
      current: file,
      studies: [{ path: file, exists: true }],
    });
  });

  it('refuses a file that is not a study, with the study-file check message, and leaves it as it was', async () => {
    const file = path.join(tmp.dir, 'other.scalewright');
    const db = new Database(file);
    db.exec('CREATE TABLE t (x INTEGER)');
    db.close();
    const before = sha256File(file);
    const error = await refused('study.open', { path: file });
    expect(error).toEqual({
      code: 'not-a-study',
      message: `${file} is an SQLite database, but not a Scalewright study file`,
    });
    expect(sha256File(file)).toBe(before);
    expect(session.hasStudy).toBe(false);
  });

  it('refuses a study another writer holds, naming the lock', async () => {
    const file = path.join(tmp.dir, 'held.scalewright');
    const other = Study.create(file, { actor: TEST_ACTOR, app: 'another window' });
    try {
      fs.writeFileSync(
        `${file}.lock`,
        JSON.stringify({
          pid: process.ppid,
          host: 'elsewhere',
          user: 'kim',
          app: 'another window',
          since: '',
        }),
      );
      const error = await refused('study.open', { path: file });
      expect(error.code).toBe('locked');
    } finally {
      other.close();
    }
  });

  it('refuses a missing folder, a relative path and an existing target', async () => {
    expect(await refused('study.listFolder', { path: path.join(tmp.dir, 'nowhere') })).toEqual({
      code: 'not-found',
      message: `folder ${path.join(tmp.dir, 'nowhere')} does not exist`,
    });
    expect((await refused('study.listFolder', { path: 'relative/folder' })).message).toMatch(
      /not an absolute path/,
    );
    expect(
      (await refused('study.create', { path: path.join(tmp.dir, 'no', 'x.scalewright'), title: 'X' }))
        .message,
    ).toBe(`new study: folder ${path.join(tmp.dir, 'no')} does not exist`);
    expect((await refused('study.create', { path: path.join(tmp.dir, 'x.db'), title: 'X' })).message).toMatch(
      /ends in \.scalewright/,
    );
    const file = path.join(tmp.dir, 'taken.scalewright');
    fs.writeFileSync(file, 'keep me');
    expect(await refused('study.create', { path: file, title: 'X' })).toEqual({
      code: 'exists',
      message: `${file} already exists; choose another name`,
    });
    expect(fs.readFileSync(file, 'utf8')).toBe('keep me');
    expect(await refused('study.open', { path: path.join(tmp.dir, 'gone.scalewright') })).toEqual({
      code: 'not-found',
      message: `${path.join(tmp.dir, 'gone.scalewright')} does not exist`,
    });
  });

  it('lists folders and study files only, never other files', async () => {
    fs.writeFileSync(path.join(tmp.dir, 'responses.csv'), 'a,b\n1,2\n');
    fs.writeFileSync(path.join(tmp.dir, '.hidden.scalewright'), '');
    const listing = await ok('study.listFolder', { path: tmp.dir });
    expect(listing.entries).toEqual([]);
    const file = path.join(tmp.dir, 'responses.csv');
    expect((await refused('study.listFolder', { path: file })).message).toBe(
      `${file} is a file, not a folder`,
    );
  });
});

describe('save a copy', () => {
  it('writes a copy that opens as a study with the same log, and keeps the original open', async () => {
    const file = path.join(tmp.dir, 'a.scalewright');
    await ok('study.create', { path: file, title: 'A' });
    await ok('construct.setText', { field: 'name', value: 'Trail reading' });
    const copy = path.join(tmp.dir, 'a-copy.scalewright');
    const result = await ok('study.saveCopy', { path: copy });
    expect(result).toMatchObject({ path: copy, logRows: 1 });
    expect(session.study.path).toBe(file);
    const opened = Study.open(copy, { actor: TEST_ACTOR, app: 'test', mode: 'read' });
    try {
      expect(opened.log.count()).toBe(1);
      expect(opened.log.verify()).toEqual([]);
      expect(opened.meta('title')).toBe('A');
    } finally {
      opened.close();
    }
    expect(fs.readdirSync(tmp.dir).filter((f) => f.startsWith('a-copy'))).toEqual(['a-copy.scalewright']);
  });

  it('refuses a target that exists, and leaves it unchanged', async () => {
    await ok('study.create', { path: path.join(tmp.dir, 'a.scalewright'), title: 'A' });
    const copy = path.join(tmp.dir, 'b.scalewright');
    fs.writeFileSync(copy, 'someone else’s file');
    expect((await refused('study.saveCopy', { path: copy })).code).toBe('exists');
    expect(fs.readFileSync(copy, 'utf8')).toBe('someone else’s file');
  });
});
