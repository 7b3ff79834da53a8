/**
 * Speed of confirmatory factor analysis and of a three-step invariance run, on invented five-facet
 * Likert-like data (40 items, 8 per factor). Targets: one CFA on 2,000 respondents (moments, fit,
 * standard errors, modification hints, reliability from loadings, HTMT) under 1 s; configural,
 * metric and scalar models on two groups of 2,000 under 3 s. Run: npx tsx test/bench/cfa.ts
 */
import { performance } from 'node:perf_hooks';
import {
  constructReliability,
  covarianceToCorrelation,
  htmt,
} from '../../app/engine/cfa/construct-reliability.ts';
import { fitCfa } from '../../app/engine/cfa/fit.ts';
import { measurementInvariance } from '../../app/engine/cfa/invariance.ts';
import { type CfaModel, sampleMoments } from '../../app/engine/cfa/model.ts';
import { createRng } from '../../app/engine/rng.ts';
import { cfaJob, invarianceJob } from '../../app/workers/validity.ts';

const CFA_TARGET_MS = 1000;
const INVARIANCE_TARGET_MS = 3000;
const REPEATS = 3;
const P = 40;
const M = 5;
const CUTS = [-1.5, -0.5, 0.5, 1.5];

const items = Array.from({ length: P }, (_, i) => `ecc${i + 1}`);
const model: CfaModel = {
  factors: Array.from({ length: M }, (_, j) => ({
    name: `facet${j + 1}`,
    items: items.slice(j * 8, j * 8 + 8),
  })),
};

function respondents(n: number, seed: number, shift = 0): number[][] {
  const rng = createRng(seed);
  const rows: number[][] = [];
  for (let r = 0; r < n; r++) {
    const general = rng.normal();
    const facets = Array.from({ length: M }, () => 0.6 * general + 0.8 * rng.normal() + shift);
    rows.push(
      items.map((_, i) => {
        const z = (0.55 + 0.04 * (i % 8)) * facets[Math.floor(i / 8)] + 0.75 * rng.normal();
        return 1 + CUTS.filter((c) => z > c).length;
      }),
    );
  }
  return rows;
}

/** Fastest of REPEATS runs, wall-clock and CPU time (CPU time shows what a busy machine adds). */
function best(run: () => void): { wall: number; cpu: number } {
  let wall = Number.POSITIVE_INFINITY;
  let cpu = Number.POSITIVE_INFINITY;
  for (let i = 0; i < REPEATS; i++) {
    const c0 = process.cpuUsage();
    const t0 = performance.now();
    run();
    wall = Math.min(wall, performance.now() - t0);
    const used = process.cpuUsage(c0);
    cpu = Math.min(cpu, (used.user + used.system) / 1000);
  }
  return { wall, cpu };
}

function line(label: string, ms: { wall: number; cpu: number }, target: number): void {
  const verdict = ms.wall < target ? 'within' : 'OVER';
  console.log(
    `${label.padEnd(56)} ${ms.wall.toFixed(1).padStart(8)} ms (cpu ${ms.cpu.toFixed(0)} ms)  (target < ${target} ms: ${verdict})`,
  );
}

const one = respondents(2000, 1);
line(
  'CFA, 2,000 × 40 items, 5 factors',
  best(() => {
    const moments = sampleMoments('all', items, one);
    const fit = fitCfa(model, [moments]);
    const pattern = fit.items.map((item) => fit.factors.map((_, j) => model.factors[j].items.includes(item)));
    const g = fit.groups[0];
    constructReliability(
      fit.factors,
      fit.items,
      pattern,
      g.standardizedLoadings,
      g.standardizedResidualVariances,
      g.factorCorrelations,
    );
    htmt(fit.factors, fit.items, pattern, covarianceToCorrelation(moments.cov));
  }),
  CFA_TARGET_MS,
);

const other = respondents(2000, 2, 0.2);
line(
  'invariance (configural, metric, scalar), 2 × 2,000 × 40',
  best(() => {
    measurementInvariance(model, [sampleMoments('one', items, one), sampleMoments('two', items, other)]);
  }),
  INVARIANCE_TARGET_MS,
);

// What the validity phase runs in its worker: the same fits plus construct reliability, HTMT and,
// for invariance, the constraints to consider freeing.
line(
  'validity phase CFA job, 2,000 × 40',
  best(() => {
    cfaJob({ model, items, rows: one }, { progress: () => {}, shouldStop: () => false });
  }),
  CFA_TARGET_MS,
);
line(
  'validity phase invariance job, 2 × 2,000 × 40',
  best(() => {
    invarianceJob(
      {
        model,
        items,
        groups: [
          { name: 'one', rows: one },
          { name: 'two', rows: other },
        ],
      },
      { progress: () => {}, shouldStop: () => false },
    );
  }),
  INVARIANCE_TARGET_MS,
);
