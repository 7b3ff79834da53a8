import { readFileSync } from 'node:fs';
import { describe, expect, it } from 'vitest';
import { observedEigenvalues } from '../../../../app/engine/factor/dimensionality.ts';
import { extractFactors } from '../../../../app/engine/factor/extraction.ts';
import { factorability } from '../../../../app/engine/factor/factorability.ts';
import { minimumAveragePartial } from '../../../../app/engine/factor/factor-count.ts';
import { exploratoryFactorAnalysis } from '../../../../app/engine/factor/efa.ts';
import { guttmanLambdas } from '../../../../app/engine/factor/guttman.ts';
import { omegaFromSchmidLeiman, schmidLeiman } from '../../../../app/engine/factor/omega-hierarchical.ts';
import { bivariateNormalCdf, polychoricMatrix } from '../../../../app/engine/factor/polychoric.ts';
import { type RotationMethod, rotateLoadings } from '../../../../app/engine/factor/rotation.ts';
import { loadingDistance, maxDiff } from './match.ts';

// Fixture computed by test/reference/factor.py (numpy, scipy, statsmodels; versions inside the file).
const fx = JSON.parse(
  readFileSync(new URL('../../../reference/fixtures/factor.json', import.meta.url), 'utf8'),
);
const R: number[][] = fx.correlation;
const N: number = fx.n;
const M: number = fx.factors;

describe('dimensionality against numpy and scipy (test/reference/factor.py)', () => {
  it('eigenvalues of R and of the SMC-reduced R match numpy.linalg.eigvalsh', () => {
    const observed = observedEigenvalues(R);
    expect(maxDiff(observed.components, fx.dimensionality.eigenvalues)).toBeLessThan(1e-12);
    expect(maxDiff(observed.factors, fx.dimensionality.reducedEigenvalues)).toBeLessThan(1e-12);
  });

  it('KMO, MSA and Bartlett match the numpy formulas and scipy.stats.chi2', () => {
    const f = factorability(R, N);
    expect(f.kmo).toBeCloseTo(fx.dimensionality.kmo, 12);
    expect(maxDiff(f.msa, fx.dimensionality.msa)).toBeLessThan(1e-12);
    expect(f.bartlett?.chiSquare).toBeCloseTo(fx.dimensionality.bartlett.chiSquare, 8);
    expect(f.bartlett?.df).toBe(fx.dimensionality.bartlett.df);
    const p = f.bartlett?.p ?? Number.NaN;
    const ref = fx.dimensionality.bartlett.p;
    expect(Math.abs(p - ref) / Math.max(ref, 1e-300)).toBeLessThan(1e-6);
    expect(f.logDeterminant).toBeCloseTo(fx.dimensionality.bartlett.logDeterminant, 10);
  });

  it("Velicer's MAP (squared and 4th power) matches the numpy implementation", () => {
    const map = minimumAveragePartial(R);
    expect(maxDiff(map.squared, fx.dimensionality.map.squared)).toBeLessThan(1e-12);
    expect(maxDiff(map.fourth, fx.dimensionality.map.fourth)).toBeLessThan(1e-12);
    expect(map.suggestedSquared).toBe(fx.dimensionality.map.suggestedSquared);
    expect(map.suggestedFourth).toBe(fx.dimensionality.map.suggestedFourth);
  });
});

describe('extraction against statsmodels Factor', () => {
  it('iterated principal axis: loadings and communalities of statsmodels method="pa"', () => {
    const paf = extractFactors(R, { factors: M, method: 'paf', n: N });
    expect(paf.converged).toBe(true);
    expect(loadingDistance(paf.loadings, fx.extraction.paf.loadings).distance).toBeLessThan(1e-6);
    expect(maxDiff(paf.communalities, fx.extraction.paf.communalities)).toBeLessThan(1e-6);
  });

  it('minres reaches the same least-squares solution as converged principal axis (Harman 1976)', () => {
    const minres = extractFactors(R, { factors: M, method: 'minres', n: N });
    expect(minres.converged).toBe(true);
    expect(maxDiff(minres.communalities, fx.extraction.paf.communalities)).toBeLessThan(1e-5);
  });

  it('maximum likelihood: uniquenesses and ΛΛᵀ of statsmodels method="ml", and the fit from its estimate', () => {
    const ml = extractFactors(R, { factors: M, method: 'ml', n: N });
    expect(ml.converged).toBe(true);
    expect(maxDiff(ml.uniquenesses, fx.extraction.ml.uniquenesses)).toBeLessThan(1e-4);
    const implied = ml.loadings.map((a) => ml.loadings.map((b) => a.reduce((s, v, k) => s + v * b[k], 0)));
    expect(maxDiff(implied, fx.extraction.ml.implied)).toBeLessThan(1e-4);
    const fit = ml.fit;
    const ref = fx.extraction.ml.fit;
    expect(fit?.df).toBe(ref.df);
    expect(fit?.discrepancy).toBeCloseTo(ref.discrepancy, 6);
    expect(fit?.chiSquare).toBeCloseTo(ref.chiSquare, 3);
    expect(fit?.p).toBeCloseTo(ref.p, 4);
    expect(fit?.rmsea).toBeCloseTo(ref.rmsea, 5);
    expect(fit?.rmseaCI?.lower).toBeCloseTo(ref.rmseaLower, 5);
    expect(fit?.rmseaCI?.upper).toBeCloseTo(ref.rmseaUpper, 5);
    expect(fit?.tli).toBeCloseTo(ref.tli, 5);
  });
});

describe('rotations against statsmodels factor_rotation (same unrotated input)', () => {
  const A: number[][] = fx.rotationInput;
  const cases: [string, RotationMethod, Record<string, number>][] = [
    ['varimax', 'varimax', {}],
    ['quartimax', 'quartimax', {}],
    ['oblimin0.0', 'oblimin', { obliminGamma: 0 }],
    ['oblimin0.5', 'oblimin', { obliminGamma: 0.5 }],
    ['geomin', 'geomin', {}],
    ['promax4', 'promax', { promaxPower: 4 }],
    ['promax3', 'promax', { promaxPower: 3 }],
  ];
  for (const [key, method, extra] of cases) {
    for (const normalize of [true, false]) {
      it(`${key}, ${normalize ? 'Kaiser-normalized' : 'raw'}`, () => {
        const ref = fx.rotations[`${key}/${normalize ? 'normalized' : 'raw'}`];
        const out = rotateLoadings(A, { method, normalize, ...extra, seed: 1 });
        expect(out.converged).toBe(true);
        const match = loadingDistance(out.pattern, ref.loadings);
        expect(match.distance).toBeLessThan(1e-5);
        if (ref.phi) {
          const phi = match.order.map((a, i) =>
            match.order.map((b, j) => out.phi[a][b] * match.signs[i] * match.signs[j]),
          );
          expect(maxDiff(phi, ref.phi)).toBeLessThan(1e-5);
        }
      });
    }
  }
});

describe('omega, Guttman and polychoric against numpy and scipy', () => {
  it('Schmid–Leiman omega hierarchical and total from the oblimin solution', () => {
    const ref = fx.rotations['oblimin0.0/normalized'];
    const h2 = fx.rotationInput.map((row: number[]) => row.reduce((s, v) => s + v * v, 0));
    const sl = schmidLeiman(ref.loadings, ref.phi, h2);
    expect(maxDiff(sl.higherOrder, fx.omega.higherOrder)).toBeLessThan(1e-6);
    expect(maxDiff(sl.general, fx.omega.general)).toBeLessThan(1e-6);
    const omega = omegaFromSchmidLeiman(R, sl, 'test');
    expect(omega.omegaHierarchical).toBeCloseTo(fx.omega.omegaHierarchical, 6);
    expect(omega.omegaTotal).toBeCloseTo(fx.omega.omegaTotal, 10);
  });

  it('the whole EFA reports the same omegas as the fixture for PAF + oblimin', () => {
    const out = exploratoryFactorAnalysis(fx.items, R, {
      factors: M,
      extraction: 'paf',
      rotation: 'oblimin',
      n: N,
      seed: 1,
    });
    expect(out.omega?.omegaHierarchical).toBeCloseTo(fx.omega.omegaHierarchical, 5);
    expect(out.omega?.model).toMatch(/Schmid–Leiman solution of 3 paf factors rotated by oblimin/);
  });

  it("Guttman's λ1, λ2, λ6 match the numpy formulas", () => {
    const g = guttmanLambdas(fx.covariance);
    expect(g.lambda1).toBeCloseTo(fx.guttman.lambda1, 12);
    expect(g.lambda2).toBeCloseTo(fx.guttman.lambda2, 12);
    expect(g.lambda6).toBeCloseTo(fx.guttman.lambda6, 12);
  });

  it('bivariate normal CDF matches scipy.stats.multivariate_normal.cdf', () => {
    for (const c of fx.bivariateNormal) {
      expect(Math.abs(bivariateNormalCdf(c.x, c.y, c.r) - c.cdf)).toBeLessThan(1e-9);
    }
  });

  it('polychoric matrix and thresholds match scipy.optimize on the same likelihood', () => {
    const out = polychoricMatrix(fx.polychoric.items, fx.polychoric.data);
    expect(out.smoothed).toBe(false);
    expect(maxDiff(out.matrix, fx.polychoric.matrix)).toBeLessThan(1e-6);
    expect(maxDiff(out.thresholds, fx.polychoric.thresholds)).toBeLessThan(1e-12);
  });
});
