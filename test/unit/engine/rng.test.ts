import { describe, expect, it } from 'vitest';
import { chiSquareQuantile, normalCdf, normalQuantile } from '../../../app/engine/distributions.ts';
import { EngineError } from '../../../app/engine/errors.ts';
import { createRng, DEFAULT_SEED } from '../../../app/engine/rng.ts';

/*
 * Statistical checks on 1e5 draws. Bounds are five standard errors of the statistic under a correct
 * generator (common practice for fixed-seed tests: a correct generator passes, a biased one fails),
 * and chi-square goodness of fit is judged at the 0.999 quantile (Pearson 1900).
 */

const DRAWS = 100_000;
const Z_BOUND = 5;

function draw(count: number, f: () => number): Float64Array {
  const out = new Float64Array(count);
  for (let i = 0; i < count; i++) out[i] = f();
  return out;
}

function moments(x: Float64Array): {
  mean: number;
  variance: number;
  skewness: number;
  excessKurtosis: number;
} {
  const n = x.length;
  let m = 0;
  for (const v of x) m += v;
  m /= n;
  let m2 = 0;
  let m3 = 0;
  let m4 = 0;
  for (const v of x) {
    const d = v - m;
    m2 += d * d;
    m3 += d * d * d;
    m4 += d * d * d * d;
  }
  m2 /= n;
  m3 /= n;
  m4 /= n;
  return { mean: m, variance: m2, skewness: m3 / m2 ** 1.5, excessKurtosis: m4 / (m2 * m2) - 3 };
}

/** Pearson's chi-square statistic for counts against equal expected counts. */
function chiSquareStatistic(counts: number[], total: number): number {
  const expected = total / counts.length;
  return counts.reduce((s, c) => s + (c - expected) ** 2 / expected, 0);
}

describe('createRng', () => {
  it('repeats the same sequence for the same seed', () => {
    const a = createRng(DEFAULT_SEED);
    const b = createRng(DEFAULT_SEED);
    for (let i = 0; i < 1000; i++) {
      expect(a.next()).toBe(b.next());
      expect(a.normal()).toBe(b.normal());
      expect(a.int(97)).toBe(b.int(97));
    }
  });

  it('reproduces the published algorithm bit for bit (guards stored results against stream changes)', () => {
    // Values from an independent big-integer Python transcription of SplitMix64 seeding and the
    // authors' xoshiro128** C reference code, run once when this test was written.
    const rng = createRng(DEFAULT_SEED);
    expect(rng.next()).toBe(0.28235773774656137);
    expect(rng.next()).toBe(0.651923925662546);
  });

  it('gives different sequences for different seeds, including neighbouring and negative seeds', () => {
    const first = (seed: number) => Array.from({ length: 8 }, createRng(seed).next);
    const seeds = [0, 1, 2, -1, DEFAULT_SEED, DEFAULT_SEED + 1, 2 ** 52];
    const sequences = seeds.map((s) => first(s).join(','));
    expect(new Set(sequences).size).toBe(seeds.length);
  });

  it('draws uniforms in [0, 1) with mean 1/2 and variance 1/12', () => {
    const x = draw(DRAWS, createRng(DEFAULT_SEED).next);
    for (const v of x) {
      expect(v).toBeGreaterThanOrEqual(0);
      expect(v).toBeLessThan(1);
    }
    const { mean, variance } = moments(x);
    expect(Math.abs(mean - 0.5)).toBeLessThan(Z_BOUND * Math.sqrt(1 / 12 / DRAWS));
    // Var of the sample variance of U(0,1): (1/80 − 1/144)/n.
    expect(Math.abs(variance - 1 / 12)).toBeLessThan(Z_BOUND * Math.sqrt((1 / 80 - 1 / 144) / DRAWS));
  });

  it('passes chi-square goodness of fit on 100 equal bins and on pairs of successive draws', () => {
    const rng = createRng(7);
    const bins = new Array(100).fill(0);
    const pairs = new Array(100).fill(0);
    for (let i = 0; i < DRAWS; i++) {
      const u = rng.next();
      const v = rng.next();
      bins[Math.floor(u * 100)]++;
      pairs[Math.floor(u * 10) * 10 + Math.floor(v * 10)]++;
    }
    const critical = chiSquareQuantile(0.999, 99);
    expect(chiSquareStatistic(bins, DRAWS)).toBeLessThan(critical);
    expect(chiSquareStatistic(pairs, DRAWS)).toBeLessThan(critical);
  });

  it('draws integers uniformly in 0..n−1', () => {
    const rng = createRng(11);
    const counts = new Array(7).fill(0);
    for (let i = 0; i < DRAWS; i++) {
      const k = rng.int(7);
      expect(Number.isInteger(k) && k >= 0 && k < 7).toBe(true);
      counts[k]++;
    }
    expect(chiSquareStatistic(counts, DRAWS)).toBeLessThan(chiSquareQuantile(0.999, 6));
    const big = createRng(3);
    for (let i = 0; i < 1000; i++) {
      const k = big.int(2 ** 40 + 3);
      expect(Number.isInteger(k) && k >= 0 && k < 2 ** 40 + 3).toBe(true);
    }
    expect(createRng(5).int(1)).toBe(0);
  });

  it('draws normals with mean 0, variance 1, no skew or excess kurtosis, and the normal CDF shape', () => {
    const x = draw(DRAWS, createRng(DEFAULT_SEED).normal);
    const m = moments(x);
    expect(Math.abs(m.mean)).toBeLessThan(Z_BOUND / Math.sqrt(DRAWS));
    expect(Math.abs(m.variance - 1)).toBeLessThan(Z_BOUND * Math.sqrt(2 / DRAWS));
    expect(Math.abs(m.skewness)).toBeLessThan(Z_BOUND * Math.sqrt(6 / DRAWS));
    expect(Math.abs(m.excessKurtosis)).toBeLessThan(Z_BOUND * Math.sqrt(24 / DRAWS));
    // 50 equiprobable bins from the normal quantile function.
    const edges = Array.from({ length: 49 }, (_, i) => normalQuantile((i + 1) / 50));
    const counts = new Array(50).fill(0);
    for (const v of x) {
      let lo = 0;
      let hi = edges.length;
      while (lo < hi) {
        const mid = (lo + hi) >> 1;
        if (v < edges[mid]) hi = mid;
        else lo = mid + 1;
      }
      counts[lo]++;
    }
    expect(chiSquareStatistic(counts, DRAWS)).toBeLessThan(chiSquareQuantile(0.999, 49));
    // Tail share beyond |z| > 3 (expected 2·Φ(−3) ≈ 0.0027).
    const tail = x.filter((v) => Math.abs(v) > 3).length / DRAWS;
    const p = 2 * normalCdf(-3);
    expect(Math.abs(tail - p)).toBeLessThan(Z_BOUND * Math.sqrt((p * (1 - p)) / DRAWS));
  });

  it('refuses bad seeds and ranges with a clear message', () => {
    expect(() => createRng(1.5)).toThrow(EngineError);
    expect(() => createRng(Number.NaN)).toThrow('random seed must be a whole number');
    const rng = createRng(1);
    expect(() => rng.int(0)).toThrow('random integer range');
    expect(() => rng.int(2.5)).toThrow('random integer range');
  });
});
