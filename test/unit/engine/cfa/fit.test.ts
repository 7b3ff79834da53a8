import { readFileSync } from 'node:fs';
import { describe, expect, it } from 'vitest';
import { fitCfa } from '../../../../app/engine/cfa/fit.ts';
import { rmseaWithInterval } from '../../../../app/engine/cfa/fit-indices.ts';
import { type CfaModel, type GroupMoments, sampleMoments } from '../../../../app/engine/cfa/model.ts';

const fixture = JSON.parse(
  readFileSync(new URL('../../../reference/fixtures/cfa.json', import.meta.url), 'utf8'),
);

/** Σ = ΛΦΛᵀ + Θ with unit item variances, built exactly from known parameters. */
function population(
  lambda: number[][],
  phi: number[][],
  residualCov: [number, number, number][] = [],
): number[][] {
  const p = lambda.length;
  const m = phi.length;
  const sigma = Array.from({ length: p }, (_, i) =>
    Array.from({ length: p }, (_, j) => {
      let s = 0;
      for (let a = 0; a < m; a++) for (let b = 0; b < m; b++) s += lambda[i][a] * phi[a][b] * lambda[j][b];
      return s;
    }),
  );
  for (let i = 0; i < p; i++) sigma[i][i] = 1;
  for (const [a, b, v] of residualCov) sigma[a][b] = sigma[b][a] = sigma[a][b] + v;
  return sigma;
}

function modelFrom(spec: { factors: Record<string, string[]>; residualCovariances?: string[][] }): CfaModel {
  return {
    factors: Object.entries(spec.factors).map(([name, items]) => ({ name, items })),
    residualCovariances: (spec.residualCovariances ?? []).map(([a, b]) => ({ a, b })),
  };
}

function fixtureMoments(): GroupMoments {
  return sampleMoments('fixture', fixture.names, fixture.data);
}

const LAMBDA = [
  [0.7, 0],
  [0.6, 0],
  [0.8, 0],
  [0.55, 0],
  [0, 0.5],
  [0, 0.7],
  [0, 0.65],
];
const PHI = [
  [1, 0.4],
  [0.4, 1],
];
const TWO: CfaModel = {
  factors: [
    { name: 'traffic', items: ['t1', 't2', 't3', 't4'] },
    { name: 'repairs', items: ['r1', 'r2', 'r3'] },
  ],
};

describe('fitCfa on a covariance matrix built exactly from known parameters', () => {
  it('fits with χ² ≈ 0 and recovers every parameter', () => {
    const fit = fitCfa(TWO, [{ name: 'exact', n: 500, cov: population(LAMBDA, PHI) }]);
    expect(fit.converged).toBe(true);
    expect(fit.chiSquare).toBeLessThan(1e-8);
    expect(fit.df).toBe((7 * 8) / 2 - (7 + 1 + 7));
    expect(fit.cfi).toBe(1);
    expect(fit.rmsea).toBe(0);
    expect(fit.srmr).toBeLessThan(1e-6);
    fit.loadings.forEach((l) => {
      const i = fit.items.indexOf(l.item);
      const j = fit.factors.indexOf(l.factor);
      expect(Math.abs(l.standardized - LAMBDA[i][j])).toBeLessThan(1e-6);
      expect(l.se).toBeGreaterThan(0);
      expect(l.standardizedSE).toBeGreaterThan(0);
    });
    expect(Math.abs(fit.groups[0].factorCorrelations[0][1] - 0.4)).toBeLessThan(1e-6);
    expect(fit.warnings).toEqual([]);
    expect(fit.improper).toBe(false);
  });

  it('recovers a residual covariance the model allows', () => {
    const cov = population(LAMBDA, PHI, [[2, 3, 0.15]]);
    const model = { ...TWO, residualCovariances: [{ a: 't3', b: 't4', rationale: 'shared wording' }] };
    const fit = fitCfa(model, [{ name: 'exact', n: 500, cov }]);
    expect(fit.chiSquare).toBeLessThan(1e-8);
    const rc = fit.parameters.find((p) => p.label === 'cov(e.t3, e.t4)');
    expect(Math.abs((rc?.estimate ?? 0) - 0.15)).toBeLessThan(1e-6);
    // Left out, the same residual covariance is the top modification hint.
    const without = fitCfa(TWO, [{ name: 'exact', n: 500, cov }]);
    expect(without.chiSquare).toBeGreaterThan(1);
    expect(without.hints[0]).toMatchObject({ kind: 'residual covariance', a: 't3', b: 't4' });
    // A univariate score test approximates the χ² drop from freeing the parameter.
    const drop = without.chiSquare - fit.chiSquare;
    expect(Math.abs(without.hints[0].mi - drop) / drop).toBeLessThan(0.25);
  });
});

describe('fitCfa against the scipy-optimizer fixture (test/reference/cfa.py)', () => {
  for (const key of ['threeFactors', 'withResidualCovariance', 'oneFactor']) {
    it(`matches χ², df, p, CFI, TLI, RMSEA with CI, SRMR, the standardized solution and SEs: ${key}`, () => {
      const spec = fixture.models[key];
      const model = modelFrom(spec);
      const moments = fixtureMoments();
      const items = model.factors.flatMap((f) => f.items);
      const idx = items.map((i) => fixture.names.indexOf(i));
      const cov = idx.map((a) => idx.map((b) => moments.cov[a][b]));
      const fit = fitCfa(model, [{ name: 'fixture', n: moments.n, cov }]);
      const e = spec.expected;
      expect(fit.converged).toBe(true);
      expect(fit.df).toBe(e.df);
      expect(Math.abs(fit.chiSquare - e.chiSquare) / e.chiSquare).toBeLessThan(1e-7);
      expect(Math.abs(fit.baseline.chiSquare - e.baselineChiSquare) / e.baselineChiSquare).toBeLessThan(1e-9);
      expect(fit.baseline.df).toBe(e.baselineDf);
      expect(Math.abs((fit.p ?? 0) - e.p) / e.p).toBeLessThan(1e-5);
      for (const k of ['cfi', 'tli', 'rmsea', 'srmr'] as const) {
        expect(Math.abs((fit[k] ?? Number.NaN) - e[k]), k).toBeLessThan(1e-7);
      }
      expect(Math.abs((fit.rmseaCI?.[0] ?? Number.NaN) - e.rmseaCI[0])).toBeLessThan(1e-6);
      expect(Math.abs((fit.rmseaCI?.[1] ?? Number.NaN) - e.rmseaCI[1])).toBeLessThan(1e-6);
      fit.loadings.forEach((l, k) => {
        expect(Math.abs(l.standardized - e.standardizedLoadings[k]), l.item).toBeLessThan(1e-4);
        // Expected-information SEs (the fixture builds D'(W⊗W)D; finite differences limit agreement).
        expect(Math.abs((l.se ?? 0) - e.loadingSE[k]) / e.loadingSE[k], `${l.item} SE`).toBeLessThan(1e-3);
        expect(
          Math.abs((l.standardizedSE ?? 0) - e.standardizedLoadingSE[k]) / e.standardizedLoadingSE[k],
          `${l.item} standardized SE`,
        ).toBeLessThan(1e-3);
      });
      const phi = fit.groups[0].factorCorrelations;
      phi.forEach((row, j) => {
        row.forEach((v, k) => {
          expect(Math.abs(v - e.factorCorrelations[j][k])).toBeLessThan(1e-4);
        });
      });
    });
  }

  it('a one-factor CFA has the same discrepancy as the one-factor ML EFA (scikit-learn); only the χ² multiplier differs', () => {
    // CFA: T = N·F_ML. EFA: Bartlett's correction, χ² = (N − 1 − (2p + 5)/6 − 2m/3)·F_ML.
    const spec = fixture.models.oneFactor;
    const efa = fixture.efaOneFactor;
    const moments = fixtureMoments();
    const idx = efa.items.map((i: string) => fixture.names.indexOf(i));
    const cov = idx.map((a: number) => idx.map((b: number) => moments.cov[a][b]));
    const fit = fitCfa(modelFrom(spec), [{ name: 'fixture', n: moments.n, cov }]);
    expect(fit.df).toBe(efa.df);
    expect(Math.abs(fit.chiSquare - efa.nTimesF) / efa.nTimesF).toBeLessThan(1e-6);
    const bartlett = moments.n - 1 - (2 * 6 + 5) / 6 - 2 / 3;
    expect(Math.abs(bartlett - efa.bartlettFactor)).toBeLessThan(1e-12);
    expect(Math.abs(fit.fmin * bartlett - efa.chiSquareBartlett) / efa.chiSquareBartlett).toBeLessThan(1e-6);
  });
});

describe('fitCfa reports what it cannot estimate', () => {
  it('refuses a model with more parameters than moments, saying both counts', () => {
    const model: CfaModel = { factors: [{ name: 'F', items: ['a', 'b'] }] };
    const cov = [
      [1, 0.3],
      [0.3, 1],
    ];
    expect(() => fitCfa(model, [{ name: 'g', n: 100, cov }])).toThrow(
      '4 free parameters but the data give only 3',
    );
  });

  it('flags empirical under-identification: two uncorrelated two-item factors', () => {
    const model: CfaModel = {
      orthogonal: true,
      factors: [
        { name: 'A', items: ['a1', 'a2'] },
        { name: 'B', items: ['b1', 'b2'] },
      ],
    };
    const cov = population(
      [
        [0.7, 0],
        [0.6, 0],
        [0, 0.5],
        [0, 0.8],
      ],
      [
        [1, 0],
        [0, 1],
      ],
    );
    const fit = fitCfa(model, [{ name: 'g', n: 200, cov }]);
    expect(fit.unidentified.length).toBeGreaterThan(0);
    expect(fit.warnings.join(' ')).toMatch(/empirically under-identified/);
  });

  it('reports non-convergence as a warning, not a result to trust', () => {
    const moments = fixtureMoments();
    const fit = fitCfa(modelFrom(fixture.models.threeFactors), [moments], 'single', { maxIterations: 1 });
    expect(fit.converged).toBe(false);
    expect(fit.warnings.join(' ')).toMatch(/did not converge in 1 steps/);
  });

  it('reports a Heywood case (negative residual variance) as an improper solution', () => {
    // Correlations that imply a loading above 1 for the first item: r12·r13/r23 = .9·.8/.5 = 1.44.
    const cov = [
      [1, 0.9, 0.8],
      [0.9, 1, 0.5],
      [0.8, 0.5, 1],
    ];
    const fit = fitCfa({ factors: [{ name: 'F', items: ['a', 'b', 'c'] }] }, [{ name: 'g', n: 300, cov }]);
    expect(fit.improper).toBe(true);
    expect(fit.warnings.join(' ')).toMatch(/item "a" has a negative residual variance/);
  });

  it('names bad model files and matrices', () => {
    const cov = population(LAMBDA, PHI);
    expect(() => fitCfa({ factors: [] }, [{ name: 'g', n: 10, cov }])).toThrow('names no factors');
    expect(() => fitCfa({ factors: [{ name: 'F', items: [] }] }, [{ name: 'g', n: 10, cov }])).toThrow(
      'factor "F" lists no items',
    );
    expect(() =>
      fitCfa({ ...TWO, residualCovariances: [{ a: 't1', b: 'zz' }] }, [{ name: 'g', n: 10, cov }]),
    ).toThrow('names "zz", which no factor lists');
    expect(() => fitCfa(TWO, [{ name: 'g', n: 10, cov: cov.slice(1) }])).toThrow('not 7 × 7');
    expect(() =>
      sampleMoments(
        'g',
        ['a', 'b'],
        [
          [1, 2],
          [1, 3],
          [1, 4],
        ],
      ),
    ).toThrow('item "a" does not vary');
  });
});

describe('rmseaWithInterval', () => {
  it('is 0 with a [0, 0] interval when T is far below df, and null at df = 0', () => {
    expect(rmseaWithInterval(1, 20, 300)).toEqual({ rmsea: 0, ci: [0, 0] });
    expect(rmseaWithInterval(0, 0, 300)).toEqual({ rmsea: null, ci: null });
    expect(() => rmseaWithInterval(10, 5, 1)).toThrow('more cases than groups');
  });
});
