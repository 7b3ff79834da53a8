import fs from 'node:fs';
import path from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { Study } from '../../../db/study.ts';
import { runCli, unprivilegedUser } from '../../helpers/cli.ts';
import { TEST_ACTOR, sha256File, tempDir } from '../../helpers/tmp.ts';

/**
 * Files and folders the command line cannot use: each gets one `error: ` line saying what and where
 * (never "unexpected failure"), exit 1, and the study is left as it was. Permissions are tested as
 * an unprivileged user (see unprivilegedUser).
 */
let tmp: ReturnType<typeof tempDir>;
const user = unprivilegedUser();

beforeAll(() => {
  tmp = tempDir();
  fs.chmodSync(tmp.dir, 0o755);
  fs.mkdirSync(path.join(tmp.dir, 'data'), { mode: 0o777 });
  fs.chmodSync(path.join(tmp.dir, 'data'), 0o777);
});
afterAll(() => tmp.cleanup());

function run(args: string[]) {
  return runCli(args, {
    cwd: tmp.dir,
    user,
    env: { SCALEWRIGHT_DATA_DIR: path.join(tmp.dir, 'data'), HOME: path.join(tmp.dir, 'data') },
  });
}

function expectOneError(result: ReturnType<typeof runCli>, text: RegExp): void {
  expect(result.code, result.stderr).toBe(1);
  expect(result.stderr).toMatch(/^error: [^\n]+\n$/);
  expect(result.stderr).not.toMatch(/unexpected failure/);
  expect(result.stderr).toMatch(text);
}

describe('files the command line cannot use', () => {
  it('a folder given as the study', () => {
    const folder = path.join(tmp.dir, 'a-folder.scalewright');
    fs.mkdirSync(folder);
    expectOneError(run(['project', 'status', folder]), /a-folder\.scalewright is a folder, not a study file/);
    expectOneError(
      run(['project', 'import', folder, '--data', folder, '--role', 'pilot']),
      /cannot read data file .*: it is a folder, not a file/,
    );
  });

  it('a read-only study, an unreadable one, and one in a folder that is not writable', () => {
    const data = path.join(tmp.dir, 'pilot.csv');
    fs.writeFileSync(data, 'id,q1\nr1,3\n');
    const readOnly = path.join(tmp.dir, 'read-only.scalewright');
    Study.create(readOnly, { actor: TEST_ACTOR, app: 'test' }).close();
    fs.chmodSync(readOnly, 0o444);
    const before = sha256File(readOnly);
    expectOneError(
      run(['project', 'import', readOnly, '--data', data, '--role', 'pilot']),
      /read-only\.scalewright is read-only \(permission denied\); make it writable, or copy it/,
    );
    expect(sha256File(readOnly)).toBe(before);

    const unreadable = path.join(tmp.dir, 'unreadable.scalewright');
    Study.create(unreadable, { actor: TEST_ACTOR, app: 'test' }).close();
    fs.chmodSync(unreadable, 0o200);
    expectOneError(
      run(['project', 'status', unreadable]),
      /unreadable\.scalewright cannot be read: permission denied/,
    );

    // The study may be written, but its folder not: no lock or journal can be made beside it.
    const locked = path.join(tmp.dir, 'closed-folder');
    fs.mkdirSync(locked);
    const inside = path.join(locked, 'inside.scalewright');
    Study.create(inside, { actor: TEST_ACTOR, app: 'test' }).close();
    fs.chmodSync(inside, 0o666);
    fs.chmodSync(locked, 0o755);
    const insideBefore = sha256File(inside);
    expectOneError(
      run(['project', 'import', inside, '--data', data, '--role', 'pilot']),
      /inside\.scalewright cannot be opened for writing \(its lock and journal are kept beside it\): the folder .*closed-folder is not writable \(permission denied\)/,
    );
    expect(sha256File(inside)).toBe(insideBefore);
    expect(fs.readdirSync(locked)).toEqual(['inside.scalewright']);
  });

  it('project new into a folder that is not writable', () => {
    const folder = path.join(tmp.dir, 'no-write');
    fs.mkdirSync(folder);
    fs.chmodSync(folder, 0o555);
    const target = path.join(folder, 'new.scalewright');
    expectOneError(
      run(['project', 'new', target]),
      /new\.scalewright cannot be created: the folder .*no-write is not writable \(permission denied\)/,
    );
    expect(fs.readdirSync(folder)).toEqual([]);
  });
});
