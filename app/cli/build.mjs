// Builds the command line into JavaScript, app/cli/dist/main.mjs and the chunks it loads, so that a
// command starts as a plain Node process instead of transpiling TypeScript on every call. The build is
// split: main.mjs holds only the dispatcher, and each command's code is a chunk loaded when that
// command runs (see the loaders in app/cli/main.ts), so a command's start-up reads only its own code. `npm install`/`npm ci` run it
// (the `prepare` script); the launcher (bin.mjs) calls `ensureCliBuilt` first, which rebuilds only when
// a source file the bundle was made from has changed, so stale code never runs silently.
//
// Plain JavaScript on purpose: it runs before anything else is compiled.
import fs from 'node:fs';
import path from 'node:path';
import { fileURLToPath } from 'node:url';

const here = path.dirname(fileURLToPath(import.meta.url));
const root = path.resolve(here, '..', '..');
export const CLI_DIST = path.join(here, 'dist');
export const CLI_BUNDLE = path.join(CLI_DIST, 'main.mjs');
/** The worker-thread entry the bundle starts its jobs in (found beside it by app/workers/tasks.ts). */
export const CLI_WORKER = path.join(CLI_DIST, 'worker.mjs');
const MANIFEST = path.join(CLI_DIST, 'inputs.json');

/**
 * The files the bundle was built from, each with the modification time and size it had then: the
 * project's own sources, this script, and package.json (a dependency change reinstalls and rebuilds).
 */
function readManifest() {
  try {
    return JSON.parse(fs.readFileSync(MANIFEST, 'utf8'));
  } catch {
    return null;
  }
}

function stamp(file) {
  const st = fs.statSync(path.join(root, file));
  return { file, mtimeMs: st.mtimeMs, size: st.size };
}

/** Why the bundle must be rebuilt, or null when it is current. Costs one stat per source file. */
export function staleReason() {
  if (!fs.existsSync(CLI_BUNDLE) || !fs.existsSync(CLI_WORKER)) return 'not built yet';
  const manifest = readManifest();
  if (!manifest || !Array.isArray(manifest.inputs)) return 'its list of sources is missing';
  for (const input of manifest.inputs) {
    let now;
    try {
      now = stamp(input.file);
    } catch {
      return `${input.file} is gone`;
    }
    if (now.mtimeMs !== input.mtimeMs || now.size !== input.size) return `${input.file} changed`;
  }
  return null;
}

/**
 * Bundles app/cli/main.ts, and the worker thread its long jobs run in (app/workers/worker.ts), with
 * esbuild. External, loaded from node_modules at run time: better-sqlite3 (a native addon), pdfkit
 * (it reads its font metrics and colour profile from files beside its own modules) and docx (large,
 * and loaded only by an export).
 */
export async function buildCli() {
  const { build } = await import('esbuild');
  const result = await build({
    entryPoints: {
      main: path.join(here, 'main.ts'),
      worker: path.join(root, 'app', 'workers', 'worker.ts'),
    },
    outdir: CLI_DIST,
    outExtension: { '.js': '.mjs' },
    bundle: true,
    splitting: true,
    chunkNames: 'chunk-[hash]',
    platform: 'node',
    format: 'esm',
    target: 'node20',
    sourcemap: true,
    metafile: true,
    write: false,
    logLevel: 'warning',
    external: ['better-sqlite3', 'pdfkit', 'docx'],
    // Bundled CommonJS dependencies call require(); give the ES module one.
    banner: {
      js: "import { createRequire as scalewrightRequire } from 'node:module'; const require = scalewrightRequire(import.meta.url);",
    },
  });
  // Each file is written beside its final name and renamed into place, so that a command starting
  // while another process rebuilds reads either the old bundle or the new one, never half of one.
  fs.mkdirSync(CLI_DIST, { recursive: true });
  for (const file of result.outputFiles) {
    const temporary = `${file.path}.${process.pid}.tmp`;
    fs.writeFileSync(temporary, file.contents);
    fs.renameSync(temporary, file.path);
  }
  removeOldChunks(result.outputFiles.map((file) => path.basename(file.path)));
  const own = Object.keys(result.metafile.inputs).filter((f) => !f.includes('node_modules'));
  const files = [
    ...own.map((f) => path.relative(root, path.resolve(process.cwd(), f))),
    'app/cli/build.mjs',
    'package.json',
  ];
  const inputs = [...new Set(files)].sort().map(stamp);
  const temporary = `${MANIFEST}.${process.pid}.tmp`;
  fs.writeFileSync(temporary, `${JSON.stringify({ inputs }, null, 1)}\n`);
  fs.renameSync(temporary, MANIFEST);
}

/** An old build's chunks are kept this long, for a command that started on it and still loads them. */
const OLD_CHUNK_GRACE_MS = 60 * 60 * 1000;

/** Removes chunks the new build no longer has, once they are older than OLD_CHUNK_GRACE_MS. */
function removeOldChunks(current) {
  const keep = new Set(current);
  const now = Date.now();
  for (const name of fs.readdirSync(CLI_DIST)) {
    if (!name.startsWith('chunk-') || keep.has(name)) continue;
    const file = path.join(CLI_DIST, name);
    try {
      if (now - fs.statSync(file).mtimeMs > OLD_CHUNK_GRACE_MS) fs.rmSync(file, { force: true });
    } catch {
      // Removed by another build meanwhile.
    }
  }
}

/**
 * Rebuilds when stale (quietly: the output of a command stays exactly what the command prints; set
 * SCALEWRIGHT_BUILD_LOG=1 to see why a rebuild happened); without esbuild (an install without dev
 * tools) runs what is there.
 */
export async function ensureCliBuilt(
  log = (line) => {
    if (process.env.SCALEWRIGHT_BUILD_LOG === '1') process.stderr.write(`${line}\n`);
  },
) {
  const reason = staleReason();
  if (reason === null) return;
  try {
    await import('esbuild');
  } catch {
    if (fs.existsSync(CLI_BUNDLE)) return;
    throw new Error('the command line is not built and esbuild is not installed; run npm install');
  }
  if (reason !== 'not built yet') log(`scalewright: rebuilding the command line (${reason})`);
  await buildCli();
}

const invoked = process.argv[1] && path.resolve(process.argv[1]) === fileURLToPath(import.meta.url);
if (invoked) {
  buildCli().catch((error) => {
    process.stderr.write(`error: building the command line failed: ${error.message}\n`);
    process.exitCode = 1;
  });
}
