/**
 * Pairwise deletion, whole process and in the purification round, on an invented 1–5 Likert file:
 *   1. `npm run -s cli -- stats reliability --missing pairwise --json` on 50,000 respondents × 60
 *      items with 2% of the answers missing, against a numpy implementation over the missing masks
 *      (test/bench/pairwise_numpy.py) reading the same file, both whole processes; the two results
 *      are compared as well (alpha, each corrected item-total r and alpha if deleted).
 *      Target: at most 1.5 × numpy, wall time. The numpy part runs only where /usr/bin/python3 (or
 *      SCALEWRIGHT_PYTHON) imports numpy.
 *   2. One purification round (the `purification.round` job: the scale and four facets) on
 *      5,000 × 60 with pairwise deletion, in this process (no target).
 * One untimed warm-up of each command, then REPEATS alternating timed runs; medians printed (five: the
 * machine's noise moves single runs by a tenth or more).
 *
 *     npx tsx test/bench/pairwise.ts [respondents]
 */
import { mkdtempSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { performance } from 'node:perf_hooks';
import { fileURLToPath } from 'node:url';
import type { ResponseMatrix } from '../../app/engine/scoring.ts';
import { JOBS } from '../../app/workers/jobs.ts';
import { hasNumpy, machineLine, median, type Timed, timed } from './process-time.ts';

const ROOT = fileURLToPath(new URL('../../', import.meta.url));
const PYTHON = process.env.SCALEWRIGHT_PYTHON ?? '/usr/bin/python3';
const RESPONDENTS = Number(process.argv[2] ?? 50_000);
const ITEMS = 60;
const MISSING_SHARE = 0.02;
const REPEATS = 5;
const TARGET = 1.5;
/** Fixed seed of the linear congruential generator that fills the file (bench data only). */
const DATA_SEED = 20261202;

/** Invented one-factor 1–5 answers, about `missingShare` of them left empty. */
function likert(respondents: number, items: number, missingShare: number): ResponseMatrix {
  let state = DATA_SEED;
  const next = () => {
    state = (Math.imul(state, 1664525) + 1013904223) >>> 0;
    return state / 4294967296;
  };
  const data: ResponseMatrix = [];
  for (let i = 0; i < respondents; i++) {
    const trait = next() + next() + next() - 1.5;
    const row: (number | null)[] = [];
    for (let j = 0; j < items; j++) {
      const loading = 0.4 + (0.6 * j) / items;
      const z = loading * trait + (next() + next() + next() - 1.5);
      row.push(next() < missingShare ? null : Math.max(1, Math.min(5, Math.round(3 + 1.4 * z))));
    }
    data.push(row);
  }
  return data;
}

function line(label: string, t: { wall: number; cpu: number }): void {
  console.log(`${label.padEnd(52)} ${t.wall.toFixed(0).padStart(6)} ms wall, ${t.cpu.toFixed(0)} ms CPU`);
}

function medians(xs: Timed[]): { wall: number; cpu: number } {
  return { wall: median(xs.map((x) => x.wallMs)), cpu: median(xs.map((x) => x.cpuMs)) };
}

function main(): void {
  console.log(machineLine());
  const names = Array.from({ length: ITEMS }, (_, j) => `cc${j + 1}`);
  const dir = mkdtempSync(join(tmpdir(), 'scalewright-pairwise-bench-'));
  try {
    const csv = join(dir, 'responses.csv');
    const data = likert(RESPONDENTS, ITEMS, MISSING_SHARE);
    writeFileSync(
      csv,
      `id,${names.join(',')}\n${data.map((row, i) => `r${i + 1},${row.map((x) => x ?? '').join(',')}`).join('\n')}\n`,
    );
    const args = ['stats', 'reliability', '--data', csv, '--items', names.join(','), '--missing', 'pairwise'];
    args.push('--json');
    const cli = () => timed('npm', ['--prefix', ROOT, 'run', '-s', 'cli', '--', ...args], dir);
    // The same command through the launcher alone: what npm adds is the difference.
    const launcher = () => timed(process.execPath, [join(ROOT, 'app', 'cli', 'bin.mjs'), ...args], dir);
    // npm's own start, running a script that does nothing of ours (npm's built-in `env`).
    const npmAlone = () => timed('npm', ['--prefix', ROOT, 'run', '-s', 'env'], dir);
    const numpy = hasNumpy(PYTHON);
    const py = () => timed(PYTHON, [join(ROOT, 'test', 'bench', 'pairwise_numpy.py'), csv], dir);
    const ours: Timed[] = [];
    const theirs: Timed[] = [];
    const bare: Timed[] = [];
    const npmOnly: Timed[] = [];
    ours.push(cli());
    if (numpy) theirs.push(py());
    const first = { ours: ours[0].stdout, theirs: theirs[0]?.stdout };
    ours.length = 0;
    theirs.length = 0;
    for (let r = 0; r < REPEATS; r++) {
      ours.push(cli());
      bare.push(launcher());
      npmOnly.push(npmAlone());
      if (numpy) theirs.push(py());
    }
    const label = `${RESPONDENTS.toLocaleString('en')} × ${ITEMS}, ${MISSING_SHARE * 100}% missing`;
    line(`stats reliability --missing pairwise, ${label}`, medians(ours));
    line('  the same through the launcher alone (node bin.mjs)', medians(bare));
    line("  npm's own start (npm run -s env: none of our code)", medians(npmOnly));
    if (!numpy) {
      console.log(`  numpy not available at ${PYTHON}: comparison skipped`);
    } else {
      const a = medians(ours);
      const b = medians(theirs);
      line('numpy over the masks, same file, whole process', b);
      const ratio = a.wall / b.wall;
      console.log(
        `  ratio, wall: ${ratio.toFixed(2)}× (target ≤ ${TARGET}×: ${ratio <= TARGET ? 'within' : 'OVER'}), ` +
          `CPU: ${(a.cpu / b.cpu).toFixed(2)}×; launcher alone: ${(medians(bare).wall / b.wall).toFixed(2)}× wall`,
      );
      console.log(
        `  largest difference between the two results: ${agreement(first.ours, first.theirs ?? '')}`,
      );
    }
  } finally {
    rmSync(dir, { recursive: true, force: true });
  }

  const round = likert(5000, ITEMS, MISSING_SHARE);
  const facets = [0, 1, 2, 3].map((f) => ({ facetId: f + 1, items: names.filter((_, j) => j % 4 === f) }));
  const context = { progress: () => {}, shouldStop: () => false };
  const input = { names, data: round, missing: 'pairwise' as const, bounds: { min: 1, max: 5 }, facets };
  JOBS['purification.round'](input, context);
  let best = Number.POSITIVE_INFINITY;
  let bestCpu = Number.POSITIVE_INFINITY;
  for (let r = 0; r < 5; r++) {
    const t0 = performance.now();
    const c0 = process.cpuUsage();
    JOBS['purification.round'](input, context);
    const c = process.cpuUsage(c0);
    best = Math.min(best, performance.now() - t0);
    bestCpu = Math.min(bestCpu, (c.user + c.system) / 1000);
  }
  line('purification round, 5,000 × 60 + 4 facets, pairwise (best of 5)', { wall: best, cpu: bestCpu });
}

/** The largest absolute difference in alpha, corrected item-total r and alpha if deleted. */
function agreement(oursJson: string, numpyJson: string): string {
  const a = JSON.parse(oursJson);
  const b = JSON.parse(numpyJson);
  let worst = Math.abs(a.alpha - b.alpha);
  a.items.forEach((item: Record<string, number>, j: number) => {
    worst = Math.max(
      worst,
      Math.abs(item.correctedItemTotal - b.items[j].correctedItemTotal),
      Math.abs(item.alphaIfDeleted - b.items[j].alphaIfDeleted),
      Math.abs(item.sd - b.items[j].sd),
    );
  });
  return worst.toExponential(1);
}

main();
