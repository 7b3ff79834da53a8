import { describe, expect, it } from 'vitest';
import { analyzeDimensionality } from '../../../../app/engine/factor/dimensionality.ts';
import {
  replicationSeed,
  simulateEigenvalues,
  summarizeParallelAnalysis,
} from '../../../../app/engine/factor/factor-count.ts';
import { correlationMatrix, symmetricEigen } from '../../../../app/engine/linalg.ts';
import { createRng } from '../../../../app/engine/rng.ts';

/** Invented pilot responses: two facets of three items each, loadings .7, facets correlated .3. */
function twoFacetData(n: number, seed: number): number[][] {
  const rng = createRng(seed);
  return Array.from({ length: n }, () => {
    const f1 = rng.normal();
    const f2 = 0.3 * f1 + Math.sqrt(1 - 0.09) * rng.normal();
    const e = () => Math.sqrt(1 - 0.49) * rng.normal();
    return [0.7 * f1 + e(), 0.7 * f1 + e(), 0.7 * f1 + e(), 0.7 * f2 + e(), 0.7 * f2 + e(), 0.7 * f2 + e()];
  });
}

describe('parallel analysis', () => {
  it('is reproducible from its seed and differs between seeds', () => {
    const a = simulateEigenvalues({ n: 120, p: 6, seed: 7, from: 0, count: 50 });
    const b = simulateEigenvalues({ n: 120, p: 6, seed: 7, from: 0, count: 50 });
    const c = simulateEigenvalues({ n: 120, p: 6, seed: 8, from: 0, count: 50 });
    expect(Array.from(a.components)).toEqual(Array.from(b.components));
    expect(Array.from(a.factors)).toEqual(Array.from(b.factors));
    expect(Array.from(a.components)).not.toEqual(Array.from(c.components));
  });

  it('gives the same simulation however the replications are split into blocks', () => {
    const whole = simulateEigenvalues({ n: 80, p: 5, seed: 11, from: 0, count: 30 });
    const parts = [
      simulateEigenvalues({ n: 80, p: 5, seed: 11, from: 17, count: 13 }),
      simulateEigenvalues({ n: 80, p: 5, seed: 11, from: 0, count: 17 }),
    ];
    const observed = {
      observedComponents: [2, 1.2, 0.8, 0.6, 0.4],
      observedFactors: [1.5, 0.5, 0.1, 0, -0.1],
    };
    const one = summarizeParallelAnalysis({
      ...observed,
      blocks: [whole],
      iterations: 30,
      seed: 11,
      percentile: 95,
    });
    const two = summarizeParallelAnalysis({
      ...observed,
      blocks: parts,
      iterations: 30,
      seed: 11,
      percentile: 95,
    });
    expect(two).toEqual(one);
    expect(() =>
      summarizeParallelAnalysis({
        ...observed,
        blocks: [parts[0]],
        iterations: 30,
        seed: 11,
        percentile: 95,
      }),
    ).toThrow(/leave replications out/);
  });

  it("Bartlett's Wishart draw has the eigenvalue distribution of correlations of raw normal data", () => {
    // Means of the simulated eigenvalues by both routes agree within Monte Carlo error (4 standard errors).
    const n = 40;
    const p = 5;
    const reps = 2000;
    const sim = simulateEigenvalues({ n, p, seed: 3, from: 0, count: reps });
    const rng = createRng(99);
    const raw: number[][] = [];
    for (let r = 0; r < reps; r++) {
      const data = Array.from({ length: n }, () => Array.from({ length: p }, () => rng.normal()));
      raw.push(symmetricEigen(correlationMatrix(data)).values);
    }
    for (let k = 0; k < p; k++) {
      const a = Array.from({ length: reps }, (_, r) => sim.components[r * p + k]);
      const b = raw.map((v) => v[k]);
      const mean = (x: number[]) => x.reduce((s, v) => s + v, 0) / x.length;
      const sd = (x: number[]) => Math.sqrt(x.reduce((s, v) => s + (v - mean(x)) ** 2, 0) / (x.length - 1));
      const se = Math.sqrt((sd(a) ** 2 + sd(b) ** 2) / reps);
      expect(Math.abs(mean(a) - mean(b))).toBeLessThan(4 * se);
    }
  });

  it('recovers a known two-factor structure (components and common factors) while Kaiser and MAP are shown beside it', () => {
    const r = correlationMatrix(twoFacetData(400, 5));
    const d = analyzeDimensionality(r, 400, { iterations: 200, seed: 1, percentile: 95 });
    expect(d.suggested.parallel).toBe(2);
    expect(d.suggested.parallelFactors).toBe(2);
    expect(d.suggested.kaiser).toBe(2);
    expect(d.suggested.map).toBe(2);
    expect(d.parallel?.components.percentile[0]).toBeGreaterThan(d.parallel?.components.mean[0] ?? 0);
  });

  it('replication seeds differ for neighbouring seeds and replications', () => {
    const seen = new Set<number>();
    for (let s = 0; s < 20; s++) for (let r = 0; r < 20; r++) seen.add(replicationSeed(s, r));
    expect(seen.size).toBe(400);
  });

  it('refuses more items than respondents and says why', () => {
    expect(() => simulateEigenvalues({ n: 5, p: 6, seed: 1, from: 0, count: 1 })).toThrow(
      /more respondents than items/,
    );
  });

  it('can be cancelled', () => {
    expect(() =>
      simulateEigenvalues({ n: 50, p: 4, seed: 1, from: 0, count: 10, shouldStop: () => true }),
    ).toThrow(/cancelled/);
  });
});
