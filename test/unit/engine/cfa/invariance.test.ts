import { describe, expect, it } from 'vitest';
import { measurementInvariance } from '../../../../app/engine/cfa/invariance.ts';
import { type CfaModel, type GroupMoments, sampleMoments } from '../../../../app/engine/cfa/model.ts';
import { createRng } from '../../../../app/engine/rng.ts';

const MODEL: CfaModel = {
  factors: [
    { name: 'traffic', items: ['t1', 't2', 't3', 't4'] },
    { name: 'repairs', items: ['r1', 'r2', 'r3', 'r4'] },
  ],
};
const ITEMS = ['t1', 't2', 't3', 't4', 'r1', 'r2', 'r3', 'r4'];
const LAMBDA = [
  [0.7, 0],
  [0.6, 0],
  [0.8, 0],
  [0.5, 0],
  [0, 0.5],
  [0, 0.7],
  [0, 0.65],
  [0, 0.6],
];
const THETA = [0.5, 0.6, 0.4, 0.7, 0.7, 0.5, 0.55, 0.6];
const NU = [3, 3.2, 2.9, 3.1, 2.5, 2.7, 3, 2.8];

interface Population {
  lambda: number[][];
  phi: number[][];
  nu: number[];
  alpha: number[];
}

/** Exact population moments: Σ = ΛΦΛᵀ + Θ, μ = ν + Λα. */
function moments(name: string, n: number, pop: Population): GroupMoments {
  const p = pop.lambda.length;
  const cov = Array.from({ length: p }, (_, i) =>
    Array.from({ length: p }, (_, j) => {
      let s = i === j ? THETA[i] : 0;
      for (let a = 0; a < 2; a++)
        for (let b = 0; b < 2; b++) s += pop.lambda[i][a] * pop.phi[a][b] * pop.lambda[j][b];
      return s;
    }),
  );
  const means = pop.nu.map((v, i) => v + pop.lambda[i][0] * pop.alpha[0] + pop.lambda[i][1] * pop.alpha[1]);
  return { name, n, cov, means };
}

/** n draws from the population by a seeded generator (x = μ + Λf + e). */
function sample(name: string, n: number, pop: Population, seed: number): GroupMoments {
  const rng = createRng(seed);
  const l = [
    [Math.sqrt(pop.phi[0][0]), 0],
    [pop.phi[1][0] / Math.sqrt(pop.phi[0][0]), 0],
  ];
  l[1][1] = Math.sqrt(pop.phi[1][1] - l[1][0] ** 2);
  const rows: number[][] = [];
  for (let r = 0; r < n; r++) {
    const z = [rng.normal(), rng.normal()];
    const f = [pop.alpha[0] + l[0][0] * z[0], pop.alpha[1] + l[1][0] * z[0] + l[1][1] * z[1]];
    rows.push(
      ITEMS.map(
        (_, i) =>
          pop.nu[i] + pop.lambda[i][0] * f[0] + pop.lambda[i][1] * f[1] + Math.sqrt(THETA[i]) * rng.normal(),
      ),
    );
  }
  return sampleMoments(name, ITEMS, rows);
}

const REFERENCE: Population = {
  lambda: LAMBDA,
  phi: [
    [1, 0.3],
    [0.3, 1],
  ],
  nu: NU,
  alpha: [0, 0],
};
// Same measurement model, different factor variances, covariance and means: scalar invariance holds.
const SAME_MEASUREMENT: Population = {
  lambda: LAMBDA,
  phi: [
    [1.3, 0.4],
    [0.4, 0.8],
  ],
  nu: NU,
  alpha: [0.3, -0.2],
};
// Two loadings differ.
const LOADINGS_DIFFER: Population = {
  ...REFERENCE,
  lambda: LAMBDA.map((row, i) => (i === 0 ? [0.2, 0] : i === 5 ? [0, 1.2] : row)),
};
// Two intercepts differ.
const INTERCEPTS_DIFFER: Population = {
  ...REFERENCE,
  nu: NU.map((v, i) => (i === 1 ? v + 0.6 : i === 6 ? v - 0.5 : v)),
};

describe('measurementInvariance (ΔCFI ≤ .01, Cheung & Rensvold 2002, from memory)', () => {
  it('exact population moments: reaches scalar, configural only, or metric as built', () => {
    const cases: [Population, string][] = [
      [SAME_MEASUREMENT, 'scalar'],
      [LOADINGS_DIFFER, 'configural'],
      [INTERCEPTS_DIFFER, 'metric'],
    ];
    for (const [other, level] of cases) {
      const result = measurementInvariance(MODEL, [
        moments('city', 400, REFERENCE),
        moments('town', 400, other),
      ]);
      expect(result.level, level).toBe(level);
      expect(result.steps[0].fit.chiSquare).toBeLessThan(1e-6);
      expect(result.steps.map((s) => s.fit.df)).toEqual([38, 44, 50]);
      expect(result.statement).toMatch(
        new RegExp(`^${level[0].toUpperCase()}${level.slice(1)} invariance was reached`),
      );
      expect(result.statement).toMatch(/rule: /);
    }
  });

  it('the equal-measurement population has Δχ² = 0 at every step; a loading difference raises it', () => {
    const same = measurementInvariance(MODEL, [
      moments('city', 400, REFERENCE),
      moments('town', 400, SAME_MEASUREMENT),
    ]);
    for (const step of same.steps.slice(1)) expect(step.deltaChiSquare).toBeLessThan(1e-6);
    const differ = measurementInvariance(MODEL, [
      moments('city', 400, REFERENCE),
      moments('town', 400, LOADINGS_DIFFER),
    ]);
    expect(differ.steps[1].deltaDf).toBe(6);
    expect(differ.steps[1].deltaP).toBeLessThan(0.001);
    expect(differ.steps[1].deltaCfi).toBeGreaterThan(0.01);
  });

  it('sampled groups of 600 with and without a loading difference reach the right level', () => {
    const same = measurementInvariance(MODEL, [
      sample('city', 600, REFERENCE, 11),
      sample('town', 600, SAME_MEASUREMENT, 12),
    ]);
    expect(same.level).toBe('scalar');
    const differ = measurementInvariance(MODEL, [
      sample('city', 600, REFERENCE, 13),
      sample('town', 600, LOADINGS_DIFFER, 14),
    ]);
    expect(differ.level).toBe('configural');
  });

  it('needs two groups with means', () => {
    expect(() => measurementInvariance(MODEL, [moments('city', 400, REFERENCE)])).toThrow(
      'at least two groups',
    );
    const { means: _, ...noMeans } = moments('town', 400, REFERENCE);
    expect(() => measurementInvariance(MODEL, [moments('city', 400, REFERENCE), noMeans])).toThrow(
      'item means',
    );
  });
});
