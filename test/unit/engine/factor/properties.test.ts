import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { exploratoryFactorAnalysis } from '../../../../app/engine/factor/efa.ts';
import { leadingEigenpairs, symmetricEigenvalues } from '../../../../app/engine/factor/eigenvalues.ts';
import { extractFactors } from '../../../../app/engine/factor/extraction.ts';
import { type RotationMethod, rotateLoadings } from '../../../../app/engine/factor/rotation.ts';
import { symmetricEigen } from '../../../../app/engine/linalg.ts';
import { createRng } from '../../../../app/engine/rng.ts';
import { loadingDistance, maxDiff } from './match.ts';

/** R = ΛΦΛᵀ with a unit diagonal: an exactly factor-structured correlation matrix. */
function structured(loadings: number[][], phi: number[][]): number[][] {
  const p = loadings.length;
  const m = phi.length;
  return Array.from({ length: p }, (_, i) =>
    Array.from({ length: p }, (_, j) => {
      if (i === j) return 1;
      let s = 0;
      for (let a = 0; a < m; a++)
        for (let b = 0; b < m; b++) s += loadings[i][a] * phi[a][b] * loadings[j][b];
      return s;
    }),
  );
}

function randomLoadings(seed: number, p: number, m: number): number[][] {
  const rng = createRng(seed);
  return Array.from({ length: p }, () => Array.from({ length: m }, () => rng.next() * 1.2 - 0.6));
}

const communalities = (l: number[][], phi: number[][]) =>
  l.map((row) => row.reduce((s, a, i) => s + row.reduce((t, b, j) => t + a * phi[i][j] * b, 0), 0));

describe('rotation properties', () => {
  const methods: RotationMethod[] = ['varimax', 'quartimax', 'promax', 'oblimin', 'geomin'];
  it('every rotation keeps the communalities diag(PΦPᵀ) of the unrotated loadings', () => {
    fc.assert(
      fc.property(
        fc.integer({ min: 1, max: 1e6 }),
        fc.integer({ min: 2, max: 4 }),
        fc.constantFrom(...methods),
        (seed, m, method) => {
          const a = randomLoadings(seed, 10, m);
          const out = rotateLoadings(a, { method, seed, starts: 2 });
          const h = a.map((row) => row.reduce((s, v) => s + v * v, 0));
          expect(maxDiff(communalities(out.pattern, out.phi), h)).toBeLessThan(1e-9);
        },
      ),
      { numRuns: 25 },
    );
  });

  it('orthogonal rotations keep T orthogonal (TᵀT = I) and Φ the identity', () => {
    fc.assert(
      fc.property(
        fc.integer({ min: 1, max: 1e6 }),
        fc.constantFrom<RotationMethod>('varimax', 'quartimax'),
        (seed, method) => {
          const out = rotateLoadings(randomLoadings(seed, 12, 3), { method });
          const tt = out.t.map((_, i) =>
            out.t.map((_, j) => out.t.reduce((s, row) => s + row[i] * row[j], 0)),
          );
          expect(
            maxDiff(tt, [
              [1, 0, 0],
              [0, 1, 0],
              [0, 0, 1],
            ]),
          ).toBeLessThan(1e-10);
          expect(out.oblique).toBe(false);
        },
      ),
      { numRuns: 20 },
    );
  });

  it('oblique rotations give Φ with a unit diagonal and structure = pattern·Φ', () => {
    const out = rotateLoadings(randomLoadings(5, 9, 3), { method: 'geomin', seed: 3 });
    for (let k = 0; k < 3; k++) expect(out.phi[k][k]).toBeCloseTo(1, 12);
    const s = out.pattern.map((row) =>
      out.phi.map((_, j) => row.reduce((acc, v, k) => acc + v * out.phi[k][j], 0)),
    );
    expect(maxDiff(s, out.structure)).toBeLessThan(1e-12);
  });
});

describe('recovery of an exactly factor-structured correlation matrix', () => {
  const truth = [
    [0.8, 0, 0],
    [0.7, 0, 0],
    [0.6, 0, 0],
    [0.5, 0, 0],
    [0, 0.75, 0],
    [0, 0.65, 0],
    [0, 0.55, 0],
    [0, 0, 0.7],
    [0, 0, 0.6],
    [0, 0, 0.5],
  ];
  const phi = [
    [1, 0.4, 0.2],
    [0.4, 1, 0.3],
    [0.2, 0.3, 1],
  ];
  const r = structured(truth, phi);
  for (const extraction of ['paf', 'minres', 'ml'] as const) {
    for (const rotation of ['oblimin', 'geomin'] as const) {
      it(`${extraction} + ${rotation} recovers the loadings and factor correlations`, () => {
        const out = exploratoryFactorAnalysis(
          truth.map((_, i) => `item${i + 1}`),
          r,
          { factors: 3, extraction, rotation, n: 500, seed: 1 },
        );
        expect(out.converged).toBe(true);
        const match = loadingDistance(out.loadings, truth);
        // Geomin's δ = 0.01 pulls the exact simple structure very slightly; quartimin recovers it exactly.
        expect(match.distance).toBeLessThan(rotation === 'oblimin' ? 1e-5 : 2e-2);
        const got = match.order.map((a, i) =>
          match.order.map((b, j) => out.factorCorrelations[a][b] * match.signs[i] * match.signs[j]),
        );
        expect(maxDiff(got, phi)).toBeLessThan(rotation === 'oblimin' ? 1e-5 : 3e-2);
        expect(maxDiff(out.communalities, communalities(truth, phi))).toBeLessThan(1e-5);
        if (extraction === 'ml') expect(out.fit?.chiSquare).toBeLessThan(1e-6);
      });
    }
  }
});

describe('fast symmetric eigenvalues', () => {
  it('agree with the full eigendecomposition on random symmetric matrices', () => {
    fc.assert(
      fc.property(fc.integer({ min: 1, max: 1e6 }), fc.integer({ min: 1, max: 30 }), (seed, p) => {
        const rng = createRng(seed);
        const a = Array.from({ length: p }, () => new Array<number>(p).fill(0));
        for (let i = 0; i < p; i++) for (let j = 0; j <= i; j++) a[i][j] = a[j][i] = rng.normal();
        const fast = Array.from(symmetricEigenvalues(Float64Array.from(a.flat()), p));
        expect(maxDiff(fast, symmetricEigen(a).values)).toBeLessThan(1e-10);
      }),
      { numRuns: 40 },
    );
  });
});

describe('leading eigenpairs by inverse iteration', () => {
  it('match the full decomposition, including a matrix with tied eigenvalues', () => {
    fc.assert(
      fc.property(fc.integer({ min: 1, max: 1e6 }), fc.integer({ min: 4, max: 25 }), (seed, p) => {
        const rng = createRng(seed);
        const a = Array.from({ length: p }, () => new Array<number>(p).fill(0));
        for (let i = 0; i < p; i++) for (let j = 0; j <= i; j++) a[i][j] = a[j][i] = rng.normal();
        const full = symmetricEigen(a);
        const lead = leadingEigenpairs(a, 3, symmetricEigen);
        expect(maxDiff(lead.values, full.values)).toBeLessThan(1e-10);
        expect(
          maxDiff(
            lead.vectors,
            full.vectors.map((row) => row.slice(0, 3)),
          ),
        ).toBeLessThan(1e-8);
      }),
      { numRuns: 30 },
    );
    const tied = [
      [2, 0, 0],
      [0, 2, 0],
      [0, 0, 1],
    ];
    expect(leadingEigenpairs(tied, 2, symmetricEigen).values).toEqual([2, 2, 1]);
  });
});

describe('ill-conditioned inputs give warnings, never NaN or a hang', () => {
  it('a Heywood case is reported by name', () => {
    // One factor for three items: λ₁² = r₁₂·r₁₃/r₂₃ = .8·.7/.4 = 1.4, beyond a communality of 1.
    const r = [
      [1, 0.8, 0.7],
      [0.8, 1, 0.4],
      [0.7, 0.4, 1],
    ];
    for (const extraction of ['paf', 'minres', 'ml'] as const) {
      const out = exploratoryFactorAnalysis(['lanes', 'signals', 'merging'], r, {
        factors: 1,
        extraction,
        rotation: 'none',
        n: 200,
      });
      expect([...out.loadings.flat(), ...out.communalities].every(Number.isFinite)).toBe(true);
      expect(out.heywood).toEqual(['lanes']);
      expect(out.warnings.join(' ')).toMatch(/Heywood case: item "lanes" reached/);
    }
  });

  it('perfectly collinear items: the matrix is smoothed and the warning says so', () => {
    const r = [
      [1, 1, 0.5, 0.4],
      [1, 1, 0.5, 0.4],
      [0.5, 0.5, 1, 0.3],
      [0.4, 0.4, 0.3, 1],
    ];
    const out = extractFactors(r, { factors: 1, method: 'ml', n: 100 });
    expect(out.warnings.join(' ')).toMatch(/not positive definite.*smoothed/);
    expect([...out.loadings.flat(), ...out.communalities].every(Number.isFinite)).toBe(true);
  });

  it('too many factors for maximum likelihood is refused with the largest number that fits', () => {
    const r = structured([[0.7], [0.6], [0.5], [0.4]], [[1]]);
    expect(() => extractFactors(r, { factors: 2, method: 'ml', n: 100 })).toThrow(/at most 1/);
  });
});
