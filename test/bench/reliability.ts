/**
 * Speed of one purification round and of the bootstrap, on invented one-factor Likert data.
 * Targets: a round on 5,000 respondents × 60 items under 150 ms; 2,000 bootstrap resamples on
 * 500 × 30 under 2 s. Run: npx tsx test/bench/reliability.ts
 */
import { performance } from 'node:perf_hooks';
import { analyseItems } from '../../app/engine/reliability.ts';
import { bootstrapAlpha } from '../../app/engine/reliability/bootstrap.ts';
import { createRng } from '../../app/engine/rng.ts';
import type { ResponseMatrix } from '../../app/engine/scoring.ts';

const ROUND_TARGET_MS = 150;
const BOOTSTRAP_TARGET_MS = 2000;
const REPEATS = 5;
const CUTS = [-1.5, -0.5, 0.5, 1.5];

function likert(
  n: number,
  k: number,
  seed: number,
  missingShare = 0,
): { names: string[]; data: ResponseMatrix } {
  const rng = createRng(seed);
  const loadings = Array.from({ length: k }, (_, i) => 0.4 + (0.4 * i) / Math.max(1, k - 1));
  const data: ResponseMatrix = [];
  for (let r = 0; r < n; r++) {
    const f = rng.normal();
    data.push(
      loadings.map((l) => {
        if (missingShare > 0 && rng.next() < missingShare) return null;
        const z = l * f + Math.sqrt(1 - l * l) * rng.normal();
        return 1 + CUTS.filter((c) => z > c).length;
      }),
    );
  }
  return { names: loadings.map((_, i) => `item${i + 1}`), data };
}

function best(run: () => void): number {
  let fastest = Number.POSITIVE_INFINITY;
  for (let i = 0; i < REPEATS; i++) {
    const t0 = performance.now();
    run();
    fastest = Math.min(fastest, performance.now() - t0);
  }
  return fastest;
}

function line(label: string, ms: number, target: number): void {
  const verdict = ms < target ? 'within' : 'OVER';
  console.log(`${label.padEnd(58)} ${ms.toFixed(1).padStart(8)} ms  (target < ${target} ms: ${verdict})`);
}

const big = likert(5000, 60, 1);
line(
  'round, 5,000 × 60, listwise',
  best(() =>
    analyseItems({ names: big.names, data: big.data, missing: 'listwise', bounds: { min: 1, max: 5 } }),
  ),
  ROUND_TARGET_MS,
);
const bigMissing = likert(5000, 60, 2, 0.02);
console.log(
  `${'round, 5,000 × 60, pairwise, 2% missing (no target)'.padEnd(58)} ${best(() =>
    analyseItems({ names: bigMissing.names, data: bigMissing.data, missing: 'pairwise' }),
  )
    .toFixed(1)
    .padStart(8)} ms`,
);

const mid = likert(500, 30, 3);
line(
  'bootstrap, 2,000 resamples, 500 × 30, listwise',
  best(() => bootstrapAlpha(mid.names, mid.data, 'listwise', { resamples: 2000, seed: 1, level: 0.95 })),
  BOOTSTRAP_TARGET_MS,
);
const midMissing = likert(500, 30, 4, 0.05);
console.log(
  `${'bootstrap, 2,000 resamples, 500 × 30, pairwise, 5% missing (no target)'.padEnd(58)} ${best(() =>
    bootstrapAlpha(midMissing.names, midMissing.data, 'pairwise', { resamples: 2000, seed: 1, level: 0.95 }),
  )
    .toFixed(1)
    .padStart(8)} ms`,
);
