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
interface Report {
  webPreferences: Record<string, unknown>;
  loaded: string;
  permissions: boolean[];
  windowOpen: Record<string, string>;
  opened: string[];
  asked: string[];
  navigation: string;
  privileged: { scheme: string; privileges: Record<string, boolean> }[];
  handledScheme: string;
  dialogError?: string;
  ipc: Record<string, { ok: boolean; value?: { title: string }; error?: { code: string; message: string } }>;
}
let report: Report;
let study: string;

/** Runs the bundle under the stand-in electron module, with `env` added. */
function runShell(env: Record<string, string> = {}): Report {
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
        ...env,
      },
    },
  );
  expect(run.status, run.stderr).toBe(0);
  return JSON.parse(run.stdout) as Report;
}

beforeAll(() => {
  tmp = tempDir();
  study = path.join(tmp.dir, 'desk.scalewright');
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
  report = runShell();
}, 60_000);
afterAll(() => tmp.cleanup());

describe('the desktop shell bundle', () => {
  it('asks for a sandboxed, isolated window without Node integration, loading the interface on its own scheme', () => {
    expect(report.webPreferences).toMatchObject({
      sandbox: true,
      contextIsolation: true,
      nodeIntegration: false,
    });
    expect(String(report.webPreferences.preload)).toMatch(/preload\.cjs$/);
    expect(report.loaded).toBe('scalewright://app/index.html');
    expect(report.privileged).toEqual([
      { scheme: 'scalewright', privileges: { standard: true, secure: true, supportFetchAPI: true } },
    ]);
    expect(report.handledScheme).toBe('scalewright');
  });

  it('denies permissions, new windows and navigation away', () => {
    expect(report.permissions).toEqual([false, false]);
    expect(new Set(Object.values(report.windowOpen))).toEqual(new Set(['deny']));
    expect(report.navigation).toBe('blocked');
  });

  it('opens only allow-listed https links in the system browser, after asking', () => {
    expect(report.asked).toEqual(['https://doi.org/10.0000/invented.example']);
    expect(report.opened).toEqual(['https://doi.org/10.0000/invented.example']);
  });

  it('serves the command table to the main frame of its own window only', () => {
    expect(report.ipc.own).toMatchObject({ ok: true, value: { title: 'Desk study' } });
    for (const call of ['foreign', 'nullFrame', 'fileFrame', 'subframe', 'otherContents']) {
      expect(report.ipc[call], call).toMatchObject({ ok: false, error: { code: 'forbidden' } });
    }
    expect(report.ipc.badInput).toMatchObject({ ok: false, error: { code: 'invalid-input' } });
  });

  it('loads a native addon named by the environment only outside a packaged build', () => {
    const missing = path.join(tmp.dir, 'no-such-addon.node');
    const development = runShell({ SCALEWRIGHT_NATIVE_BINDING: missing });
    expect(development.dialogError).toMatch(/could not be opened/);
    const packaged = runShell({ SCALEWRIGHT_NATIVE_BINDING: missing, FAKE_PACKAGED: '1' });
    expect(packaged.dialogError).toBeUndefined();
    expect(packaged.ipc.own).toMatchObject({ ok: true, value: { title: 'Desk study' } });
  });
});
