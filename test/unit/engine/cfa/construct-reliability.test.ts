import { describe, expect, it } from 'vitest';
import { constructReliability, htmt } from '../../../../app/engine/cfa/construct-reliability.ts';

describe('constructReliability (Fornell & Larcker 1981; CR ≥ .70 common practice)', () => {
  it('computes CR and AVE from standardized loadings by their definitions', () => {
    // Loadings .7, .8, .6: Σλ = 2.1, Σλ² = 1.49, Σ(1 − λ²) = 1.51 → CR = 4.41/5.92, AVE = 1.49/3.
    const items = ['a', 'b', 'c', 'd', 'e', 'f'];
    const pattern = items.map((_, i) => [i < 3, i >= 3]);
    const lambda = [
      [0.7, 0],
      [0.8, 0],
      [0.6, 0],
      [0, 0.9],
      [0, 0.85],
      [0, 0.8],
    ];
    const residual = lambda.map((r) => 1 - (r[0] + r[1]) ** 2);
    const phi = [
      [1, 0.75],
      [0.75, 1],
    ];
    const [f1, f2] = constructReliability(['A', 'B'], items, pattern, lambda, residual, phi);
    expect(Math.abs(f1.compositeReliability - 4.41 / 5.92)).toBeLessThan(1e-12);
    expect(Math.abs(f1.ave - 1.49 / 3)).toBeLessThan(1e-12);
    // A: AVE .497 < .50 fails; B: AVE .7342, √AVE .857 > .75 passes.
    expect(f1.fornellLarcker).toBe(false);
    expect(f2.fornellLarcker).toBe(true);
    expect(f2.maxCorrelation).toBe(0.75);
  });
});

describe('htmt (Henseler, Ringle & Sarstedt 2015; thresholds .85 and .90)', () => {
  it('is the mean heterotrait correlation over the geometric mean of the monotrait means', () => {
    const items = ['a1', 'a2', 'b1', 'b2', 'b3'];
    const pattern = items.map((n) => [n.startsWith('a'), n.startsWith('b')]);
    const r = [
      [1, 0.6, 0.3, 0.2, 0.25],
      [0.6, 1, 0.35, 0.3, 0.2],
      [0.3, 0.35, 1, 0.5, 0.4],
      [0.2, 0.3, 0.5, 1, 0.45],
      [0.25, 0.2, 0.4, 0.45, 1],
    ];
    const [pair] = htmt(['A', 'B'], items, pattern, r);
    const hetero = (0.3 + 0.2 + 0.25 + 0.35 + 0.3 + 0.2) / 6;
    const expected = hetero / Math.sqrt(0.6 * ((0.5 + 0.4 + 0.45) / 3));
    expect(Math.abs((pair.value ?? 0) - expected)).toBeLessThan(1e-12);
    expect(pair.verdict).toBe('below .85');
    const single = htmt(
      ['A', 'B'],
      ['a', 'b'],
      [
        [true, false],
        [false, true],
      ],
      [
        [1, 0.3],
        [0.3, 1],
      ],
    );
    expect(single[0].value).toBeNull();
  });
});
