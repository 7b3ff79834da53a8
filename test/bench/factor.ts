/**
 * Speed of dimensionality and factor analysis, on invented cycling-confidence data.
 * Targets: parallel analysis of 1,000 simulated 500 × 40 data sets at most the time of a vectorized
 * numpy implementation (both cores); a polychoric matrix for 40 items × 1,000 respondents under 3 s;
 * ML EFA with 5 factors on 60 items under 300 ms; `npm run -s cli -- stats dimensionality
 * --iterations 10000` on 500 × 40, whole process (both cores through the worker pool), at most a whole
 * numpy process doing the same (test/bench/parallel_numpy.py, vectorized).
 * Where python3 with numpy is missing, the numpy figures are skipped and said so.
 * Run: npx tsx test/bench/factor.ts
 */
import { spawnSync } from 'node:child_process';
import { mkdtempSync, rmSync, writeFileSync } from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { performance } from 'node:perf_hooks';
import { fileURLToPath } from 'node:url';
import { exploratoryFactorAnalysis } from '../../app/engine/factor/efa.ts';
import { polychoricMatrix } from '../../app/engine/factor/polychoric.ts';
import { correlationMatrix } from '../../app/engine/linalg.ts';
import { createRng } from '../../app/engine/rng.ts';
import { simulateEigenvaluesInPool } from '../../app/workers/parallel-analysis.ts';
import { TaskRunner } from '../../app/workers/tasks.ts';
import { hasNumpy, median, type Timed, timed } from './process-time.ts';

const here = path.dirname(fileURLToPath(import.meta.url));
const root = path.join(here, '..', '..');
/** Debian's Python, which has numpy (the `python3` on PATH may be a shim without it). */
const PYTHON = process.env.SCALEWRIGHT_PYTHON ?? '/usr/bin/python3';
const CUTS = [-1.5, -0.5, 0.5, 1.5];

/** n × p responses from `facets` correlated facets (loadings .5–.8), cut into 1–5 when ordinal. */
function responses(n: number, p: number, facets: number, seed: number, ordinal: boolean): number[][] {
  const rng = createRng(seed);
  return Array.from({ length: n }, () => {
    const general = rng.normal();
    const f = Array.from({ length: facets }, () => 0.5 * general + Math.sqrt(0.75) * rng.normal());
    return Array.from({ length: p }, (_, j) => {
      const l = 0.5 + (0.3 * ((j * 7) % 10)) / 9;
      const z = l * f[j % facets] + Math.sqrt(1 - l * l) * rng.normal();
      return ordinal ? 1 + CUTS.filter((c) => z > c).length : z;
    });
  });
}

/** CPU milliseconds of this process (every thread) since `start`. */
function cpuMs(start: NodeJS.CpuUsage): number {
  const used = process.cpuUsage(start);
  return (used.user + used.system) / 1000;
}

function numpy(args: string[]): number | null {
  const run = spawnSync(PYTHON, [path.join(here, 'parallel_numpy.py'), ...args], { encoding: 'utf8' });
  if (run.status !== 0) return null;
  return Number(run.stdout.trim()) * 1000;
}

function line(label: string, ms: number, target: string, within: boolean | null): void {
  const verdict = within === null ? '' : within ? 'within' : 'OVER';
  console.log(
    `${label.padEnd(60)} ${ms.toFixed(0).padStart(8)} ms  (${target}${verdict ? `: ${verdict}` : ''})`,
  );
}

async function main(): Promise<void> {
  console.log(
    `cores: ${os.availableParallelism()}; load average ${os.loadavg()[0].toFixed(1)} (shared machines skew every figure)`,
  );
  const runner = new TaskRunner();
  try {
    const t0 = performance.now();
    const c0 = process.cpuUsage();
    await simulateEigenvaluesInPool(
      runner,
      { n: 500, p: 40, seed: 1, iterations: 1000 },
      { threads: os.availableParallelism() },
    );
    const ours = performance.now() - t0;
    const raw = numpy(['raw', '500', '40', '1000']);
    const wishart = numpy(['wishart', '500', '40', '1000']);
    line(
      'parallel analysis, 1,000 × (500 × 40), worker threads',
      ours,
      'target ≤ numpy',
      raw === null ? null : ours <= raw,
    );
    console.log(`  CPU time over both threads ${cpuMs(c0).toFixed(0)} ms`);
    if (raw === null) console.log('  numpy not available: comparison skipped');
    else {
      console.log(
        `  numpy, raw data simulated: ${raw.toFixed(0)} ms (ratio ours/numpy ${(ours / raw).toFixed(2)})`,
      );
      if (wishart !== null)
        console.log(
          `  numpy, Wishart draws as ours: ${wishart.toFixed(0)} ms (ratio ${(ours / wishart).toFixed(2)})`,
        );
    }
  } finally {
    await runner.shutdown();
  }

  const ordinal = responses(1000, 40, 4, 2, true);
  const names = ordinal[0].map((_, j) => `item${j + 1}`);
  let t0 = performance.now();
  let c0 = process.cpuUsage();
  polychoricMatrix(names, ordinal);
  const poly = performance.now() - t0;
  line('polychoric matrix, 40 items × 1,000 respondents', poly, 'target < 3000 ms', poly < 3000);
  console.log(`  CPU time ${cpuMs(c0).toFixed(0)} ms (what an idle machine would take)`);

  const continuous = responses(1000, 60, 5, 3, false);
  const r = correlationMatrix(continuous);
  const items = r.map((_, j) => `item${j + 1}`);
  exploratoryFactorAnalysis(items, r, { factors: 5, extraction: 'ml', rotation: 'none', n: 1000 });
  let best = Number.POSITIVE_INFINITY;
  let bestCpu = Number.POSITIVE_INFINITY;
  for (let i = 0; i < 5; i++) {
    t0 = performance.now();
    c0 = process.cpuUsage();
    exploratoryFactorAnalysis(items, r, { factors: 5, extraction: 'ml', rotation: 'none', n: 1000 });
    best = Math.min(best, performance.now() - t0);
    bestCpu = Math.min(bestCpu, cpuMs(c0));
  }
  line('ML extraction, 5 factors, 60 items (best of 5)', best, 'target < 300 ms', best < 300);
  console.log(`  CPU time ${bestCpu.toFixed(0)} ms`);
  t0 = performance.now();
  exploratoryFactorAnalysis(items, r, { factors: 5, extraction: 'ml', rotation: 'geomin', n: 1000, seed: 1 });
  line('  the same with geomin, 10 starts (no target)', performance.now() - t0, 'no target', null);

  const dir = mkdtempSync(path.join(os.tmpdir(), 'scalewright-bench-'));
  try {
    const csv = path.join(dir, 'pilot.csv');
    const data = responses(500, 40, 4, 4, true);
    writeFileSync(
      csv,
      `id,${names.join(',')}\n${data.map((row, i) => `r${i + 1},${row.join(',')}`).join('\n')}\n`,
    );
    const cliArgs = ['--prefix', root, 'run', '-s', 'cli', '--', 'stats', 'dimensionality'];
    cliArgs.push('--data', csv, '--items', names.join(','), '--iterations', '10000', '--json');
    const pyArgs = [path.join(here, 'parallel_numpy.py'), 'raw', '500', '40', '10000', csv];
    const numpyHere = hasNumpy(PYTHON);
    // One untimed run of each, then the median of three alternating runs.
    timed('npm', cliArgs, root);
    if (numpyHere) timed(PYTHON, pyArgs, root);
    const ours: Timed[] = [];
    const theirs: Timed[] = [];
    for (let r = 0; r < 3; r++) {
      ours.push(timed('npm', cliArgs, root));
      if (numpyHere) theirs.push(timed(PYTHON, pyArgs, root));
    }
    const wall = (xs: Timed[]) => median(xs.map((x) => x.wallMs));
    const cpu = (xs: Timed[]) => median(xs.map((x) => x.cpuMs));
    line(
      'npm run -s cli -- stats dimensionality --iterations 10000',
      wall(ours),
      'target ≤ numpy process',
      numpyHere ? wall(ours) <= wall(theirs) : null,
    );
    console.log(
      `  500 × 40, whole process; CPU ${cpu(ours).toFixed(0)} ms over all its threads ` +
        `(${(cpu(ours) / wall(ours)).toFixed(2)} cores busy on average)`,
    );
    if (numpyHere)
      console.log(
        `  numpy process, raw data simulated: ${wall(theirs).toFixed(0)} ms wall, ${cpu(theirs).toFixed(0)} ms CPU ` +
          `(ratio ours/numpy, wall: ${(wall(ours) / wall(theirs)).toFixed(2)})`,
      );
    else console.log(`  numpy not available at ${PYTHON}: comparison skipped`);
  } finally {
    rmSync(dir, { recursive: true, force: true });
  }
}

await main();
