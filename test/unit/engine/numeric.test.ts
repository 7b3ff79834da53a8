import { describe, expect, it } from 'vitest';
import { kahanSum, mean, variance } from '../../../app/engine/numeric.ts';

// Reference values from Python's standard library (outside the project):
//   math.fsum([1e16, 1.0, -1e16, 3.5]) == 4.5 ; math.fsum([0.1] * 10) == 1.0
//   statistics.fmean([2.5, 3.1, 4.7, 1.2, 9.9]) == 4.28 ; statistics.variance(...) == 11.452000000000002
describe('compensated sums, mean and variance', () => {
  it('keeps the small terms that a plain sum loses', () => {
    const values = [1e16, 1.0, -1e16, 3.5];
    expect(values.reduce((a, b) => a + b, 0)).not.toBe(4.5);
    expect(kahanSum(values)).toBe(4.5);
    expect(kahanSum(new Array(10).fill(0.1))).toBe(1.0);
  });

  it('matches the standard library on a small sample', () => {
    const xs = [2.5, 3.1, 4.7, 1.2, 9.9];
    expect(mean(xs)).toBeCloseTo(4.28, 14);
    expect(variance(xs)).toBeCloseTo(11.452000000000002, 12);
  });

  it('is not fooled by a large offset (the textbook one-pass formula is)', () => {
    const xs = [2.5, 3.1, 4.7, 1.2, 9.9].map((x) => x + 1e9);
    expect(variance(xs)).toBeCloseTo(11.452, 6);
  });

  it('says what it needs', () => {
    expect(() => mean([])).toThrow('mean requires at least one value');
    expect(() => variance([1])).toThrow('variance requires at least two values');
  });
});
