import { spawn, spawnSync } from 'node:child_process';
import fs from 'node:fs';
import path from 'node:path';
import { parseArgs } from 'node:util';
import { Session } from '../api/session.ts';
import { DEMO_TITLE, type DemoStage, fillDemoStudy } from '../demo/index.ts';
import { Study } from '../../db/study.ts';
import { startBrowserServer } from '../web/server.ts';
import { ensureRendererBuilt, PROJECT_ROOT, RENDERER_DIST } from './renderer-build.ts';
import { currentActor, demoStudyPath, readSettings, rememberRecent, writeSettings } from './user-data.ts';

/** Browser mode's usual port; another free one is taken when it is busy. */
const DEFAULT_PORT = 5317;

const log = (line: string) => process.stdout.write(`scalewright: ${line}\n`);

/**
 * `npm start`: the desktop shell when Electron's binary is there, otherwise (or with --browser)
 * the same app served on 127.0.0.1. Either way it opens the demo study unless --study is given;
 * the demo is created on first start in the user's data folder.
 */
async function main(): Promise<void> {
  const { values } = parseArgs({
    options: { browser: { type: 'boolean' }, study: { type: 'string' }, port: { type: 'string' } },
    strict: true,
  });
  const cwd = process.env.INIT_CWD ?? process.cwd();
  const studyPath = values.study ? path.resolve(cwd, values.study) : ensureDemoStudy();

  if (!values.browser) {
    const electron = findElectron();
    if (electron.binary) {
      launchDesktop(electron.binary, studyPath);
      return;
    }
    log(`starting in browser mode: ${electron.reason}`);
  } else {
    log('starting in browser mode (--browser)');
  }
  await serveBrowser(studyPath, values.port === undefined ? DEFAULT_PORT : Number(values.port));
}

/**
 * How far a new demo study is worked: every phase, unless SCALEWRIGHT_DEMO_THROUGH=purification asks
 * for the demo with purification left open (for trying rounds; the browser tests use it).
 */
function demoStage(): DemoStage {
  return process.env.SCALEWRIGHT_DEMO_THROUGH === 'purification' ? 'purification' : 'validity';
}

function ensureDemoStudy(): string {
  const file = demoStudyPath();
  if (!fs.existsSync(file)) {
    log(`creating the demo study at ${file}`);
    Study.create(
      file,
      { actor: currentActor(), app: 'Scalewright' },
      { title: DEMO_TITLE, init: (study) => fillDemoStudy(study, demoStage()) },
    ).close();
  }
  return file;
}

/**
 * `require('electron')` gives the binary's path, fetching the binary on first use, and throws
 * when that fails (offline, or a locked-down network). It runs in a child process so that the
 * download's own messages become one line of reason here.
 */
function findElectron(): { binary?: string; reason: string } {
  const probe = spawnSync(process.execPath, ['-e', "process.stdout.write(String(require('electron')))"], {
    cwd: PROJECT_ROOT,
    encoding: 'utf8',
    timeout: 120_000,
  });
  const binary = probe.stdout.trim();
  if (probe.status === 0 && binary !== '' && fs.existsSync(binary))
    return { binary, reason: 'Electron found' };
  const lines = `${probe.stderr ?? ''}`
    .split('\n')
    .map((l) => l.trim())
    .filter((l) => l !== '' && !l.startsWith('at '));
  const why = lines.find((l) => /fail|error/i.test(l)) ?? lines[0] ?? 'it is not installed';
  return { reason: `Electron's binary is not available (${why})` };
}

function launchDesktop(binary: string, studyPath: string): void {
  const nativeBinding = ensureElectronNativeModule(binary);
  const build = spawnSync(
    process.execPath,
    [path.join(PROJECT_ROOT, 'node_modules', 'tsx', 'dist', 'cli.mjs'), 'app/shell/build.ts'],
    {
      cwd: PROJECT_ROOT,
      stdio: 'inherit',
    },
  );
  if (build.status !== 0) throw new Error('building the desktop shell failed');
  ensureRendererBuilt(log);
  log('starting the desktop app');
  const child = spawn(
    binary,
    [path.join(PROJECT_ROOT, 'app', 'shell', 'dist', 'main.cjs'), '--study', studyPath],
    {
      stdio: 'inherit',
      env: { ...process.env, SCALEWRIGHT_NATIVE_BINDING: nativeBinding },
    },
  );
  child.on('exit', (code) => process.exit(code ?? 0));
}

/**
 * The desktop shell needs better-sqlite3 built for Electron's ABI, while tests, the CLI and
 * browser mode use the Node build in node_modules. So the Electron build is made once, in a
 * copy under .cache/, and handed to the shell by path; node_modules is never touched.
 */
function ensureElectronNativeModule(binary: string): string {
  const version = (
    JSON.parse(
      fs.readFileSync(path.join(PROJECT_ROOT, 'node_modules', 'electron', 'package.json'), 'utf8'),
    ) as {
      version: string;
    }
  ).version;
  const dir = path.join(PROJECT_ROOT, '.cache', `electron-${version}`, 'better-sqlite3');
  const addon = path.join(dir, 'build', 'Release', 'better_sqlite3.node');
  if (fs.existsSync(addon)) return addon;
  log(`rebuilding the SQLite module for Electron ${version} (once; about a minute)`);
  fs.rmSync(dir, { recursive: true, force: true });
  fs.cpSync(path.join(PROJECT_ROOT, 'node_modules', 'better-sqlite3'), dir, { recursive: true });
  fs.rmSync(path.join(dir, 'build'), { recursive: true, force: true });
  const gyp = path.join(
    path.dirname(process.execPath),
    '..',
    'lib',
    'node_modules',
    'npm',
    'node_modules',
    'node-gyp',
    'bin',
    'node-gyp.js',
  );
  const result = spawnSync(
    process.execPath,
    [
      fs.existsSync(gyp) ? gyp : 'node-gyp',
      'rebuild',
      `--target=${version}`,
      '--dist-url=https://electronjs.org/headers',
      '--release',
    ],
    { cwd: dir, stdio: 'inherit', env: { ...process.env, npm_config_nodedir: '' } },
  );
  if (result.status !== 0 || !fs.existsSync(addon)) {
    throw new Error(
      `rebuilding better-sqlite3 for Electron failed; run "npm start -- --browser" to use browser mode (${binary})`,
    );
  }
  return addon;
}

async function serveBrowser(studyPath: string, port: number): Promise<void> {
  ensureRendererBuilt(log);
  const session = new Session(currentActor(), 'Scalewright (browser mode)', {
    saveDisplayName: (displayName) => writeSettings({ displayName }),
    recentStudies: { list: () => readSettings().recentStudies ?? [], remember: rememberRecent },
  });
  session.adopt(Study.open(studyPath, { actor: session.actor, app: 'Scalewright (browser mode)' }));
  const server = await startBrowserServer({ session, staticDir: RENDERER_DIST, port }).catch(
    (error: NodeJS.ErrnoException) => {
      if (error.code !== 'EADDRINUSE' || port === 0) throw error;
      log(`port ${port} is busy; using another`);
      return startBrowserServer({ session, staticDir: RENDERER_DIST, port: 0 });
    },
  );
  log(`study: ${studyPath}`);
  log(`open ${server.url}`);
  log('(serving on 127.0.0.1 only; the address carries this launch’s access token; Ctrl+C to stop)');
  const stop = async () => {
    await server.close();
    await session.shutdown();
    process.exit(0);
  };
  process.on('SIGINT', stop);
  process.on('SIGTERM', stop);
}

main().catch((error: Error) => {
  process.stderr.write(`error: ${error.message}\n`);
  process.exit(1);
});
