/**
 * The command line as a user runs it, whole process:
 *   1. `npm run -s cli -- --help`, CPU time (user + system) of the whole process tree, and the same
 *      through the launcher alone (`node app/cli/bin.mjs --help`);
 *   2. `npm run -s cli -- project import --role validation` of a 100,000 × 31 CSV (id, 29 items, duration) into a copy
 *      of the demo study, wall time of the whole process, against a Node process that does nothing but
 *      stream the same file through papaparse (pieces of the import's size, keeping nothing).
 * One untimed warm-up of each, then REPEATS alternating timed runs; medians printed with the ratio.
 * Target (issue 9): the import at most 1.2 × papaparse alone, both whole processes.
 *
 *     npx tsx test/bench/cli.ts [respondents]
 */
import { copyFileSync, mkdirSync, mkdtempSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { fileURLToPath } from 'node:url';
import { DEMO_ITEMS } from '../../app/demo/items.ts';
import { READ_CHUNK_BYTES } from '../../app/import/read-data-file.ts';
import { median, writeBenchCsv } from './import-baseline.ts';
import { machineLine, type Timed, timed } from './process-time.ts';

const ROOT = fileURLToPath(new URL('../../', import.meta.url));
const RESPONDENTS = Number(process.argv[2] ?? 100_000);
/** 29 items plus the id and duration columns: 31 columns. */
const ITEMS = 29;
const REPEATS = 5;
const TIME_TARGET = 1.2;

const PAPA_ONLY = `
import { createReadStream } from 'node:fs';
import Papa from 'papaparse';
let rows = 0;
Papa.parse(createReadStream(process.argv[2], { encoding: 'utf8', highWaterMark: ${READ_CHUNK_BYTES} }), {
  delimiter: ',',
  chunk: (results) => { rows += results.data.length; },
  complete: () => { if (rows <= ${RESPONDENTS}) process.exitCode = 1; },
  error: () => { process.exitCode = 1; },
});
`;

function main(): void {
  console.log(machineLine());
  const dir = mkdtempSync(join(tmpdir(), 'scalewright-cli-bench-'));
  try {
    const csv = join(dir, 'responses.csv');
    writeBenchCsv(csv, RESPONDENTS, ITEMS);
    const map = join(dir, 'map.json');
    const codes = DEMO_ITEMS.map((item) => item.code);
    const columns = Object.fromEntries(
      Array.from({ length: ITEMS }, (_, j) => [`tc${j + 1}`, { item: codes[j % codes.length] }]),
    );
    writeFileSync(map, JSON.stringify({ name: 'Bench import', columns, acceptProblems: true }));
    const template = join(dir, 'template.scalewright');
    timed('npm', ['--prefix', ROOT, 'run', '-s', 'cli', '--', 'project', 'new', template, '--demo'], dir);
    // The demo is worked to sign-off; validation data is imported into an open validity phase.
    const reopen = ['project', 'reopen', template, '--phase', 'validity', '--reason', 'bench import'];
    timed('npm', ['--prefix', ROOT, 'run', '-s', 'cli', '--', ...reopen], dir);
    // Inside the project so that it finds papaparse in node_modules; test/output is not committed.
    mkdirSync(join(ROOT, 'test', 'output'), { recursive: true });
    const papaScript = join(ROOT, 'test', 'output', 'papa-only.mjs');
    writeFileSync(papaScript, PAPA_ONLY);

    const help = () => timed('npm', ['--prefix', ROOT, 'run', '-s', 'cli', '--', '--help'], dir);
    const launcher = () => timed(process.execPath, [join(ROOT, 'app', 'cli', 'bin.mjs'), '--help'], dir);
    const bare = () => timed(process.execPath, ['-e', '0'], dir);
    let run = 0;
    const importOnce = () => {
      const study = join(dir, `study-${run++}.scalewright`);
      copyFileSync(template, study);
      const t = timed(
        'npm',
        [
          '--prefix',
          ROOT,
          'run',
          '-s',
          'cli',
          '--',
          'project',
          'import',
          study,
          '--data',
          csv,
          '--role',
          'validation',
          '--map',
          map,
          '--json',
        ],
        dir,
      );
      rmSync(study, { force: true });
      return t;
    };
    const papa = () => timed(process.execPath, [papaScript, csv], ROOT);

    help();
    importOnce();
    papa();
    const helps: Timed[] = [];
    const launchers: Timed[] = [];
    const bares: Timed[] = [];
    const imports: Timed[] = [];
    const papas: Timed[] = [];
    for (let r = 0; r < REPEATS; r++) {
      helps.push(help());
      launchers.push(launcher());
      bares.push(bare());
      papas.push(papa());
      imports.push(importOnce());
    }
    const cpu = (xs: Timed[]) => median(xs.map((x) => x.cpuMs));
    const wall = (xs: Timed[]) => median(xs.map((x) => x.wallMs));
    console.log(`file: ${RESPONDENTS} respondents × 31 columns (id, ${ITEMS} items, duration)`);
    console.log(
      `--help through npm run -s cli:   ${cpu(helps).toFixed(0)} ms CPU, ${wall(helps).toFixed(0)} ms wall`,
    );
    console.log(
      `--help through the launcher:     ${cpu(launchers).toFixed(0)} ms CPU, ${wall(launchers).toFixed(0)} ms wall`,
    );
    console.log(
      `a bare node -e 0, for scale:     ${cpu(bares).toFixed(0)} ms CPU, ${wall(bares).toFixed(0)} ms wall`,
    );
    console.log(
      `papaparse alone streaming it:    ${wall(papas).toFixed(0)} ms wall, ${cpu(papas).toFixed(0)} ms CPU (median of ${REPEATS})`,
    );
    console.log(
      `npm run -s cli -- project import: ${wall(imports).toFixed(0)} ms wall, ${cpu(imports).toFixed(0)} ms CPU (median of ${REPEATS})`,
    );
    console.log(
      `ratio, wall: ${(wall(imports) / wall(papas)).toFixed(2)}×, CPU: ${(cpu(imports) / cpu(papas)).toFixed(2)}× (target ≤ ${TIME_TARGET}× wall)`,
    );
    // Each side less its fixed start (npm and the bundle; a bare node): what the work itself costs.
    const work = cpu(imports) - cpu(helps);
    const papaWork = cpu(papas) - cpu(bares);
    console.log(
      `beyond the fixed start, CPU: import ${work.toFixed(0)} ms, papaparse ${papaWork.toFixed(0)} ms ` +
        `(${(work / papaWork).toFixed(2)}×)`,
    );
  } finally {
    rmSync(dir, { recursive: true, force: true });
  }
}

main();
