import { spawnSync } from 'node:child_process';
import { mkdtempSync, readFileSync, rmSync, statSync, utimesSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import path from 'node:path';
import { afterAll, describe, expect, it } from 'vitest';
import { ROOT, runCli } from '../../helpers/cli.ts';

const LAUNCHER = path.join(ROOT, 'app', 'cli', 'bin.mjs');
const DIST = path.join(ROOT, 'app', 'cli', 'dist');

/**
 * The current build: main.mjs and worker.mjs with every chunk they import or load on demand (a
 * previous build's chunks may still lie beside them for a while).
 */
function compiledText(): string {
  const seen = new Set<string>();
  const visit = (file: string) => {
    if (seen.has(file)) return;
    seen.add(file);
    const text = readFileSync(path.join(DIST, file), 'utf8');
    for (const m of text.matchAll(/(?:from\s*|import\s*\(?\s*)"\.\/([^"]+\.mjs)"/g)) visit(m[1]);
  };
  visit('main.mjs');
  visit('worker.mjs');
  return [...seen].map((f) => readFileSync(path.join(DIST, f), 'utf8')).join('\n');
}

/** The files `import` reaches from a compiled file without running any command (static imports only). */
function staticClosure(file: string, seen = new Set<string>()): Set<string> {
  if (seen.has(file)) return seen;
  seen.add(file);
  const text = readFileSync(path.join(DIST, file), 'utf8');
  for (const m of text.matchAll(/^(?:import|export)\b[^;]*?from\s*"\.\/([^"]+)"/gm))
    staticClosure(m[1], seen);
  for (const m of text.matchAll(/^import\s*"\.\/([^"]+)"/gm)) staticClosure(m[1], seen);
  return seen;
}
const dir = mkdtempSync(path.join(tmpdir(), 'scalewright-compiled-'));
afterAll(() => rmSync(dir, { recursive: true, force: true }));

// Invented demo responses and expert ratings (cycling-confidence items).
writeFileSync(
  path.join(dir, 'pilot.csv'),
  'id,traffic1,traffic2,route1,route2\np1,4,4,3,4\np2,2,3,2,2\np3,5,4,4,5\np4,3,3,3,2\np5,1,2,2,1\np6,4,5,4,4\n',
);
writeFileSync(
  path.join(dir, 'ratings.csv'),
  'item,expert,relevance\nT1,e1,4\nT1,e2,3\nT1,e3,4\nT2,e1,2\nT2,e2,4\nT2,e3,3\n',
);

/** The compiled command line through its launcher, as `npm run cli` and the package's bin run it. */
function runCompiled(args: string[], env: Record<string, string> = {}) {
  const result = spawnSync(process.execPath, [LAUNCHER, ...args], {
    cwd: ROOT,
    encoding: 'utf8',
    env: { ...process.env, INIT_CWD: dir, SCALEWRIGHT_NAME: 'CLI Tester', ...env },
  });
  return { code: result.status ?? -1, stdout: result.stdout, stderr: result.stderr };
}

describe('the compiled command line', () => {
  const cases: [string, string[]][] = [
    ['top-level help', ['--help']],
    ['no command (usage, exit 2)', []],
    [
      'reliability JSON',
      ['stats', 'reliability', '--data', 'pilot.csv', '--items', 'traffic1,traffic2,route1,route2', '--json'],
    ],
    [
      'reliability table',
      ['stats', 'reliability', '--data', 'pilot.csv', '--items', 'traffic1,traffic2,route1,route2'],
    ],
    ['content JSON', ['stats', 'content', '--ratings', 'ratings.csv', '--json']],
    ['a usage error', ['stats', 'reliability', '--data', 'pilot.csv', '--itemz', 'a']],
    ['a data error', ['stats', 'reliability', '--data', 'missing.csv', '--items', 'a,b']],
  ];
  it.each(cases)('answers like the sources: %s', (_name, args) => {
    const compiled = runCompiled(args);
    const source = runCli(args, { cwd: dir });
    expect(compiled).toEqual(source);
  });

  it('rebuilds itself when a source file changed since the build, and can say why', () => {
    runCompiled(['--help']);
    const source = path.join(ROOT, 'app', 'cli', 'table.ts');
    const later = new Date(Date.now() + 5_000);
    utimesSync(source, later, later);
    const run = runCompiled(['--help'], { SCALEWRIGHT_BUILD_LOG: '1' });
    expect(run.code).toBe(0);
    expect(run.stderr).toContain('rebuilding the command line (app/cli/table.ts changed)');
    const inputs = JSON.parse(readFileSync(path.join(ROOT, 'app', 'cli', 'dist', 'inputs.json'), 'utf8'));
    const stamp = inputs.inputs.find((i: { file: string }) => i.file === 'app/cli/table.ts');
    expect(stamp.mtimeMs).toBe(statSync(source).mtimeMs);
    const again = runCompiled(['--help'], { SCALEWRIGHT_BUILD_LOG: '1' });
    expect(again.stderr).toBe('');
    expect(compiledText()).toContain('formatTable');
  });

  it('writes the final instrument with pdfkit kept outside the bundle, loaded only to write, and the fonts found from it', () => {
    const bundle = compiledText();
    // Imported where a PDF or DOCX is written, so commands that write neither start without loading them.
    for (const writer of ['pdfkit', 'docx']) {
      expect(bundle).toContain(`import("${writer}")`);
      expect(bundle).not.toContain(`from "${writer}"`);
      expect(bundle).not.toContain(`require("${writer}")`);
    }
    expect(runCompiled(['project', 'new', 'demo.scalewright', '--demo']).code).toBe(0);
    const run = runCompiled(['project', 'instrument', 'demo.scalewright', '--out', 'instrument', '--json']);
    expect(run.stderr).toBe('');
    expect(run.code).toBe(0);
    const pdf = readFileSync(path.join(dir, 'instrument', 'questionnaire.pdf')).toString('latin1');
    expect(pdf.startsWith('%PDF-')).toBe(true);
    expect(pdf).toMatch(/DejaVuSerif/);
    const value = JSON.parse(run.stdout) as { files: { name: string; bytes: number }[] };
    expect(value.files.map((f) => f.name)).toContain('questionnaire.pdf');
  });

  it('starts a command with its own code only: the dispatcher loads no command, and stats reliability no study file, export, pdfkit, papaparse or ml-matrix', () => {
    const dispatcher = staticClosure('main.mjs');
    const text = (files: Set<string>) =>
      [...files].map((f) => readFileSync(path.join(DIST, f), 'utf8')).join('\n');
    expect(text(dispatcher)).not.toContain('// app/cli/stats/');
    expect(text(dispatcher)).not.toContain('// db/study.ts');
    const main = readFileSync(path.join(DIST, 'main.mjs'), 'utf8');
    const chunk = main.match(/reliability: stats\(async \(\) => \(await import\("\.\/([^"]+)"\)\)/)?.[1];
    expect(chunk, 'the reliability loader in main.mjs').toBeDefined();
    const reliability = text(staticClosure(chunk as string));
    expect(reliability).toContain('// app/engine/reliability.ts');
    for (const absent of [
      '// db/study.ts',
      '// app/export/',
      '// app/phases/',
      '"pdfkit"',
      '"docx"',
      'node_modules/zod/',
      // A plain-text file is split without papaparse, and the item analysis needs no ml-matrix routine.
      'node_modules/papaparse/',
      'node_modules/ml-matrix/',
    ]) {
      expect(reliability, absent).not.toContain(absent);
    }
  });
});
