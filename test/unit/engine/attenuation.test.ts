import { describe, expect, it } from 'vitest';
import { correctForAttenuation } from '../../../app/engine/attenuation.ts';
import { correlationMatrix } from '../../../app/engine/linalg.ts';
import { createRng } from '../../../app/engine/rng.ts';

const PUBLISHED_TOL = 1e-12;

/**
 * Observed correlation of two measures whose true scores correlate `rho`, with reliabilities
 * `relX` and `relY` (observed = √rel · true + √(1 − rel) · error), at sample size n.
 */
function simulateObservedR(n: number, rho: number, relX: number, relY: number, seed: number): number {
  const rng = createRng(seed);
  const rows: number[][] = new Array(n);
  for (let i = 0; i < n; i++) {
    const tx = rng.normal();
    const ty = rho * tx + Math.sqrt(1 - rho * rho) * rng.normal();
    const x = Math.sqrt(relX) * tx + Math.sqrt(1 - relX) * rng.normal();
    const y = Math.sqrt(relY) * ty + Math.sqrt(1 - relY) * rng.normal();
    rows[i] = [x, y];
  }
  return correlationMatrix(rows)[0][1];
}

describe('correctForAttenuation', () => {
  it('recovers .60 from .432 with reliabilities .81 and .64 (Spearman 1904: .60·√.81·√.64 = .432)', () => {
    const c = correctForAttenuation(0.432, 0.81, 0.64);
    expect(Math.abs(c.value - 0.6)).toBeLessThan(PUBLISHED_TOL);
    expect(c.warnings).toEqual([]);
  });

  it('warns when the corrected value goes beyond ±1', () => {
    const c = correctForAttenuation(0.7, 0.5, 0.6);
    expect(c.value).toBeGreaterThan(1);
    expect(c.warnings[0]).toMatch(/beyond ±1/);
  });

  it('rejects impossible inputs with a clear message', () => {
    expect(() => correctForAttenuation(1.2, 0.8, 0.8)).toThrow(
      'an observed correlation must lie between −1 and 1',
    );
    expect(() => correctForAttenuation(0.3, 0, 0.8)).toThrow(
      'correction for attenuation requires reliabilities above 0 and at most 1 (the first is 0)',
    );
    expect(() => correctForAttenuation(0.3, 0.8, Number.NaN)).toThrow(/the second is NaN/);
  });

  it('the bias does not shrink with n: observed r stays near .432, not .60 (seeded simulation)', () => {
    // Standard errors of r near .43: about .026 at n = 1,000 and .0026 at n = 100,000; allow about 3–4 SE.
    const small = simulateObservedR(1_000, 0.6, 0.81, 0.64, 11);
    const large = simulateObservedR(100_000, 0.6, 0.81, 0.64, 12);
    expect(Math.abs(small - 0.432)).toBeLessThan(0.08);
    expect(Math.abs(large - 0.432)).toBeLessThan(0.011);
    expect(0.6 - large).toBeGreaterThan(0.15);
    expect(Math.abs(correctForAttenuation(large, 0.81, 0.64).value - 0.6)).toBeLessThan(0.015);
  });
});
