import { describe, expect, it } from 'vitest';
import { fitOneFactor, omegaTotal } from '../../../../app/engine/reliability/omega.ts';

const RECOVERY_TOL = 1e-7;

function oneFactorMatrix(loadings: number[]): number[][] {
  return loadings.map((a, i) => loadings.map((b, j) => (i === j ? 1 : a * b)));
}

describe('fitOneFactor and omegaTotal (McDonald 1999)', () => {
  it('recovers the loadings of an exact one-factor correlation matrix', () => {
    const loadings = [0.8, 0.7, 0.6, 0.5, 0.4];
    const fit = fitOneFactor(oneFactorMatrix(loadings));
    expect(fit.converged).toBe(true);
    fit.loadings.forEach((l, i) => {
      expect(Math.abs(l - loadings[i])).toBeLessThan(RECOVERY_TOL);
    });
    const sum = loadings.reduce((s, l) => s + l, 0);
    const unique = loadings.reduce((s, l) => s + 1 - l * l, 0);
    const omega = omegaTotal(['a', 'b', 'c', 'd', 'e'], oneFactorMatrix(loadings));
    expect(Math.abs(omega.value - (sum * sum) / (sum * sum + unique))).toBeLessThan(RECOVERY_TOL);
    expect(omega.warnings).toEqual([]);
  });

  it('signs the factor so the loadings sum positive and flags a negative loading', () => {
    const loadings = [0.8, 0.7, -0.6, 0.5];
    const omega = omegaTotal(['a', 'b', 'c', 'd'], oneFactorMatrix(loadings));
    expect(omega.fit.loadings[0]).toBeGreaterThan(0);
    expect(Math.abs(omega.fit.loadings[2] + 0.6)).toBeLessThan(RECOVERY_TOL);
    expect(omega.warnings.some((w) => w.includes('negative loading on the common factor for c'))).toBe(true);
  });

  it('holds a Heywood communality at 1 and says so', () => {
    // r12·r13/r23 = .9·.9/.5 = 1.62 > 1: no proper one-factor solution exists.
    const r = [
      [1, 0.9, 0.9],
      [0.9, 1, 0.5],
      [0.9, 0.5, 1],
    ];
    const omega = omegaTotal(['a', 'b', 'c'], r);
    expect(omega.fit.heywood).toBe(true);
    expect(omega.fit.uniquenesses[0]).toBe(0);
    expect(omega.warnings.some((w) => w.startsWith('Heywood case'))).toBe(true);
    expect(Number.isFinite(omega.value)).toBe(true);
  });

  it('needs at least three items', () => {
    expect(() =>
      fitOneFactor([
        [1, 0.5],
        [0.5, 1],
      ]),
    ).toThrow('a one-factor model requires at least three items');
  });
});
