import { describe, expect, it } from 'vitest';
import {
  alphaIfDeleted,
  cronbachAlpha,
  standardizedAlpha,
} from '../../../../app/engine/reliability/alpha.ts';

const EXACT_TOL = 1e-12;

describe('cronbachAlpha', () => {
  it('k parallel items with unit variance and covariance c give kc/(1 + (k − 1)c)', () => {
    // Parallel items: alpha equals the Spearman–Brown formula in the common correlation.
    const k = 6;
    const c = 0.3;
    const cov = Array.from({ length: k }, (_, i) => Array.from({ length: k }, (_, j) => (i === j ? 1 : c)));
    expect(Math.abs(cronbachAlpha(cov) - (k * c) / (1 + (k - 1) * c))).toBeLessThan(EXACT_TOL);
    expect(Math.abs(standardizedAlpha(c, k) - cronbachAlpha(cov))).toBeLessThan(EXACT_TOL);
    const dropped = alphaIfDeleted(cov);
    expect(Math.abs((dropped[0] as number) - ((k - 1) * c) / (1 + (k - 2) * c))).toBeLessThan(EXACT_TOL);
  });

  it('alpha if deleted is null with two items; errors are stated plainly', () => {
    expect(
      alphaIfDeleted([
        [1, 0.5],
        [0.5, 1],
      ]),
    ).toEqual([null, null]);
    expect(() => cronbachAlpha([[1]])).toThrow('alpha requires at least two items');
    expect(() =>
      cronbachAlpha([
        [0, 0],
        [0, 0],
      ]),
    ).toThrow('alpha requires a total score that varies');
    expect(() => standardizedAlpha(-0.5, 3)).toThrow(/standardized alpha is undefined/);
  });
});
