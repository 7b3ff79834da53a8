import { readFileSync } from 'node:fs';
import { describe, expect, it } from 'vitest';
import type { EngineError } from '../../../../app/engine/errors.ts';
import { itemMoments } from '../../../../app/engine/item-stats.ts';
import { covarianceMatrix } from '../../../../app/engine/linalg.ts';
import { cronbachAlpha } from '../../../../app/engine/reliability/alpha.ts';
import { bootstrapAlpha } from '../../../../app/engine/reliability/bootstrap.ts';
import { createRng } from '../../../../app/engine/rng.ts';

const fixture = JSON.parse(
  readFileSync(new URL('../../../reference/fixtures/reliability.json', import.meta.url), 'utf8'),
);
const { names, data } = fixture.complete;
const RECOMPUTE_TOL = 1e-10;

/** The percentile interval recomputed the slow way: explicit resamples, linalg covariance, linear quantiles. */
function slowPercentile(
  rows: (number | null)[][],
  resamples: number,
  seed: number,
  level: number,
  alphaOf: (sample: (number | null)[][]) => number,
): [number, number] {
  const rng = createRng(seed);
  const n = rows.length;
  const alphas: number[] = [];
  for (let b = 0; b < resamples; b++) {
    const sample = Array.from({ length: n }, () => rows[rng.int(n)]);
    alphas.push(alphaOf(sample));
  }
  alphas.sort((x, y) => x - y);
  const q = (p: number) => {
    const h = (alphas.length - 1) * p;
    const lo = Math.floor(h);
    return alphas[lo] + (h - lo) * (alphas[Math.min(lo + 1, alphas.length - 1)] - alphas[lo]);
  };
  return [q((1 - level) / 2), q(1 - (1 - level) / 2)];
}

describe('bootstrapAlpha', () => {
  it('the fast centred pass equals explicit resampling with the same seed', () => {
    const fast = bootstrapAlpha(names, data, 'listwise', { resamples: 200, seed: 7, level: 0.95 });
    const [lower, upper] = slowPercentile(data, 200, 7, 0.95, (sample) =>
      cronbachAlpha(covarianceMatrix(sample as number[][])),
    );
    expect(Math.abs(fast.lower - lower)).toBeLessThan(RECOMPUTE_TOL);
    expect(Math.abs(fast.upper - upper)).toBeLessThan(RECOMPUTE_TOL);
    expect(fast.used).toBe(200);
  });

  it('is reproducible from its seed and changes with it', () => {
    const a = bootstrapAlpha(names, data, 'listwise', { resamples: 500, seed: 42, level: 0.95 });
    const b = bootstrapAlpha(names, data, 'listwise', { resamples: 500, seed: 42, level: 0.95 });
    const c = bootstrapAlpha(names, data, 'listwise', { resamples: 500, seed: 43, level: 0.95 });
    expect(b).toEqual(a);
    expect(c.lower).not.toBe(a.lower);
    expect(a.seed).toBe(42);
  });

  it('lands near the Feldt interval from scipy for near-normal data (n = 240)', () => {
    // Both estimate the same sampling spread; with n = 240 they agree to a few thousandths.
    const feldt = fixture.complete.expected.feldt95;
    const ci = bootstrapAlpha(names, data, 'listwise', { resamples: 2000, seed: 1, level: 0.95 });
    expect(Math.abs(ci.lower - feldt.lower)).toBeLessThan(0.02);
    expect(Math.abs(ci.upper - feldt.upper)).toBeLessThan(0.02);
  });

  it('reports progress and stops when asked', () => {
    const seen: number[] = [];
    bootstrapAlpha(names, data, 'listwise', {
      resamples: 220,
      seed: 1,
      level: 0.95,
      onProgress: (done, total) => {
        expect(total).toBe(220);
        seen.push(done);
      },
    });
    expect(seen).toEqual([50, 100, 150, 200, 220]);
    let calls = 0;
    const run = () =>
      bootstrapAlpha(names, data, 'listwise', {
        resamples: 1000,
        seed: 1,
        level: 0.95,
        shouldStop: () => ++calls >= 2,
      });
    expect(run).toThrow('the bootstrap was stopped after 100 of 1000 resamples');
    try {
      calls = 0;
      run();
    } catch (error) {
      expect((error as EngineError).code).toBe('cancelled');
    }
  });

  it('with pairwise deletion, the weighted-sums pass equals recomputing itemMoments per resample', () => {
    const m = fixture.missing;
    const ci = bootstrapAlpha(m.names, m.data, 'pairwise', { resamples: 200, seed: 3, level: 0.9 });
    const [lower, upper] = slowPercentile(m.data, 200, 3, 0.9, (sample) =>
      cronbachAlpha(itemMoments(m.names, sample, 'pairwise').covariance),
    );
    expect(Math.abs(ci.lower - lower)).toBeLessThan(RECOMPUTE_TOL);
    expect(Math.abs(ci.upper - upper)).toBeLessThan(RECOMPUTE_TOL);
    expect(ci.used).toBe(200);
    expect(ci.missing).toBe('pairwise');
    expect(ci.lower).toBeLessThan(m.pairwise.alpha);
    expect(ci.upper).toBeGreaterThan(m.pairwise.alpha);
  });

  it('rejects too few resamples or respondents', () => {
    expect(() => bootstrapAlpha(names, data, 'listwise', { resamples: 10, seed: 1, level: 0.95 })).toThrow(
      'the bootstrap requires a whole number of at least 200 resamples (got 10)',
    );
    expect(() =>
      bootstrapAlpha(names, [data[0]], 'listwise', { resamples: 200, seed: 1, level: 0.95 }),
    ).toThrow('the bootstrap requires at least two respondents');
  });
});

describe('bootstrapAlpha with listwise deletion', () => {
  it('counts complete respondents only', () => {
    const rows = [
      [1, 2],
      [null, 3],
      [3, null],
    ];
    expect(() =>
      bootstrapAlpha(['a', 'b'], rows, 'listwise', { resamples: 200, seed: 1, level: 0.95 }),
    ).toThrow('the bootstrap requires at least two respondents; found 1 complete respondents');
  });
});
