import { describe, expect, it } from 'vitest';
import {
  itemsForTarget,
  lengthFactorForTarget,
  spearmanBrown,
} from '../../../../app/engine/reliability/spearman-brown.ts';

const EXACT_TOL = 1e-12;

describe('Spearman–Brown prophecy', () => {
  it('doubling a test with ρ = .50 gives 2·.5/1.5 = .667 (Spearman 1910; Brown 1910: the prophecy formula)', () => {
    expect(spearmanBrown(0.5, 2)).toBeCloseTo(0.667, 3);
    expect(Math.abs(spearmanBrown(0.5, 2) - 2 / 3)).toBeLessThan(EXACT_TOL);
  });

  it('inverts: the length factor for the prophesied value is m again', () => {
    for (const [rho, m] of [
      [0.5, 2],
      [0.7, 0.5],
      [0.62, 3.4],
    ]) {
      expect(Math.abs(lengthFactorForTarget(rho, spearmanBrown(rho, m)) - m)).toBeLessThan(EXACT_TOL);
    }
  });

  it('items needed: 10 items at .50 need 20 to reach 2/3 and 36 to reach .78', () => {
    // m = .78·.50/(.50·.22) = 3.545…, so 35.45 → 36 items.
    expect(itemsForTarget(0.5, 10, 2 / 3)).toBe(20);
    expect(itemsForTarget(0.5, 10, 0.78)).toBe(36);
    expect(itemsForTarget(0.9, 20, 0.8)).toBe(9);
  });

  it('rejects reliabilities outside (0, 1) and bad lengths', () => {
    expect(() => spearmanBrown(1, 2)).toThrow('reliability must lie strictly between 0 and 1 (got 1)');
    expect(() => spearmanBrown(0.5, 0)).toThrow('the length factor must be a positive number');
    expect(() => lengthFactorForTarget(0.5, 1.2)).toThrow(
      'target reliability must lie strictly between 0 and 1',
    );
    expect(() => itemsForTarget(0.5, 2.5, 0.8)).toThrow('whole number');
  });
});
