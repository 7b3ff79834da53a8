import { spawnSync } from 'node:child_process';
import path from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { Study } from '../../../db/study.ts';
import { ROOT } from '../../helpers/cli.ts';
import { TEST_ACTOR, tempDir } from '../../helpers/tmp.ts';

/**
 * The desktop shell where Electron's binary cannot be fetched: the real bundle, loaded under Node
 * with a stand-in for the electron module, must ask for a hardened window and serve the command
 * table over IPC only to its own pages.
 */
let tmp: ReturnType<typeof tempDir>;
let report: {
  webPreferences: Record<string, unknown>;
  loaded: string;
  permissions: boolean[];
  windowOpen: string;
  navigation: string;
  ipc: Record<string, { ok: boolean; value?: { title: string }; error?: { code: string; message: string } }>;
};

beforeAll(() => {
  tmp = tempDir();
  const study = path.join(tmp.dir, 'desk.scalewright');
  Study.create(study, { actor: TEST_ACTOR, app: 'test' }, { title: 'Desk study' }).close();
  const build = spawnSync(
    process.execPath,
    [path.join(ROOT, 'node_modules', 'tsx', 'dist', 'cli.mjs'), 'app/shell/build.ts'],
    {
      cwd: ROOT,
      encoding: 'utf8',
    },
  );
  expect(build.status, build.stderr).toBe(0);
  const run = spawnSync(
    process.execPath,
    [path.join(ROOT, 'test', 'unit', 'shell', 'run-with-fake-electron.cjs')],
    {
      cwd: ROOT,
      encoding: 'utf8',
      env: {
        ...process.env,
        STUDY: study,
        MAIN_BUNDLE: path.join(ROOT, 'app', 'shell', 'dist', 'main.cjs'),
        SCALEWRIGHT_DATA_DIR: tmp.dir,
      },
    },
  );
  expect(run.status, run.stderr).toBe(0);
  report = JSON.parse(run.stdout);
});
afterAll(() => tmp.cleanup());

describe('the desktop shell bundle', () => {
  it('asks for a sandboxed, isolated window without Node integration, loading the built interface', () => {
    expect(report.webPreferences).toMatchObject({
      sandbox: true,
      contextIsolation: true,
      nodeIntegration: false,
    });
    expect(String(report.webPreferences.preload)).toMatch(/preload\.cjs$/);
    expect(report.loaded).toBe(path.join(ROOT, 'renderer', 'dist', 'index.html'));
  });

  it('denies permissions, new windows and navigation away', () => {
    expect(report.permissions).toEqual([false, false]);
    expect(report.windowOpen).toBe('deny');
    expect(report.navigation).toBe('blocked');
  });

  it('serves the command table to its own pages only, with the same checks as browser mode', () => {
    expect(report.ipc.own).toMatchObject({ ok: true, value: { title: 'Desk study' } });
    expect(report.ipc.foreign).toMatchObject({ ok: false, error: { code: 'forbidden' } });
    expect(report.ipc.badInput).toMatchObject({ ok: false, error: { code: 'invalid-input' } });
  });
});
