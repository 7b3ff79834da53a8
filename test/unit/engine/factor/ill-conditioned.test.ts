import { describe, expect, it } from 'vitest';
import { analyzeDimensionality } from '../../../../app/engine/factor/dimensionality.ts';
import { exploratoryFactorAnalysis } from '../../../../app/engine/factor/efa.ts';
import { correlationInput } from '../../../../app/engine/factor/input.ts';
import { polychoricMatrix } from '../../../../app/engine/factor/polychoric.ts';
import { isPositiveDefinite } from '../../../../app/engine/dense.ts';
import { createRng } from '../../../../app/engine/rng.ts';

const finite = (values: (number | null)[]) => values.every((v) => v === null || Number.isFinite(v));

describe('ill-conditioned inputs', () => {
  it('more items than respondents: warnings, a smoothed matrix, no NaN', () => {
    const rng = createRng(4);
    const names = Array.from({ length: 8 }, (_, i) => `item${i + 1}`);
    const data = Array.from({ length: 6 }, () => names.map(() => 1 + rng.int(5)));
    const input = correlationInput(names, data, { kind: 'pearson', missing: 'listwise' });
    const d = analyzeDimensionality(input.matrix, input.n, { iterations: 20, seed: 1, percentile: 95 });
    expect(d.warnings.join(' ')).toMatch(/not positive definite/);
    expect(d.warnings.join(' ')).toMatch(/parallel analysis needs more respondents than items/);
    expect(d.factorability.bartlett).toBeNull();
    expect(d.suggested.parallel).toBeNull();
    expect(finite([d.factorability.kmo, ...d.factorability.msa, ...d.eigenvalues])).toBe(true);
    const efa = exploratoryFactorAnalysis(names, input.matrix, {
      factors: 2,
      extraction: 'minres',
      rotation: 'oblimin',
      n: input.n,
      seed: 1,
    });
    expect(efa.warnings.join(' ')).toMatch(/only 6 respondents for 8 items/);
    expect(finite([...efa.loadings.flat(), ...efa.communalities, ...efa.factorCorrelations.flat()])).toBe(
      true,
    );
  });

  it('a zero-variance item is named', () => {
    const data = [
      [1, 3, 2],
      [2, 3, 4],
      [3, 3, 1],
      [4, 3, 5],
    ];
    expect(() =>
      correlationInput(['ride', 'brake', 'signal'], data, { kind: 'pearson', missing: 'listwise' }),
    ).toThrow(/item "brake" has the same answer from every respondent/);
    expect(() =>
      correlationInput(['ride', 'brake', 'signal'], data, { kind: 'polychoric', missing: 'listwise' }),
    ).toThrow(/"brake"/);
  });

  it('a non-positive-definite pairwise polychoric matrix is smoothed and the smoothing reported', () => {
    // Three groups each answer two of three items: a agrees with b, b with c, but a opposes c.
    const rows: (number | null)[][] = [];
    const rng = createRng(8);
    for (let i = 0; i < 90; i++) {
      const x = 1 + rng.int(4);
      const y = Math.min(4, Math.max(1, x + (rng.next() < 0.2 ? 1 : 0)));
      if (i % 3 === 0) rows.push([x, y, null]);
      else if (i % 3 === 1) rows.push([null, x, y]);
      else rows.push([x, null, 5 - y]);
    }
    const out = polychoricMatrix(['a', 'b', 'c'], rows);
    expect(out.smoothed).toBe(true);
    expect(isPositiveDefinite(out.matrix)).toBe(true);
    expect(out.warnings.join(' ')).toMatch(/not positive definite and was smoothed \(largest change/);
    expect(out.raw[0][2]).toBeLessThan(0);
  });
});
