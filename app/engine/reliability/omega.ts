import { EngineError } from '../errors.ts';
import { inverse, symmetricEigen } from '../linalg.ts';
import { CONVERGENCE_TOL } from '../numeric.ts';

/** Most iterated principal-axis steps before the one-factor fit is reported as not converged. */
export const ONE_FACTOR_MAX_ITERATIONS = 5000;

/** Largest change in any communality between two steps at which the fit counts as converged. */
export const ONE_FACTOR_TOLERANCE = CONVERGENCE_TOL;

/** A one-factor model of a correlation matrix. */
export interface OneFactorFit {
  method: 'iterated principal axis (unweighted least squares)';
  /** Loadings λ, signed so that their sum is positive. */
  loadings: number[];
  /** Uniquenesses ψ = 1 − λ², floored at 0 (a Heywood case). */
  uniquenesses: number[];
  iterations: number;
  converged: boolean;
  /** True when a communality reached 1 and was held there. */
  heywood: boolean;
  /** How the communalities started: squared multiple correlations, or the largest |r| of each row. */
  start: 'squared multiple correlations' | 'largest absolute correlation';
}

/** McDonald's omega total with the one-factor model it comes from. */
export interface OmegaTotal {
  value: number;
  fit: OneFactorFit;
  warnings: string[];
}

function startingCommunalities(r: number[][]): { h2: number[]; start: OneFactorFit['start'] } {
  try {
    const inv = inverse(r);
    const h2 = inv.map((row, i) => 1 - 1 / row[i]);
    if (h2.every((h) => Number.isFinite(h) && h >= 0 && h <= 1))
      return { h2, start: 'squared multiple correlations' };
  } catch (error) {
    if (!(error instanceof EngineError)) throw error;
  }
  const h2 = r.map((row, i) => Math.max(...row.map((x, j) => (i === j ? 0 : Math.abs(x)))));
  return { h2, start: 'largest absolute correlation' };
}

/**
 * One-factor model fitted by iterated principal axis factoring to convergence: start from the squared
 * multiple correlations as communalities, put them on the diagonal of R, take λ = √θ₁·v₁ from the
 * largest eigenpair, set the communalities to λ², and repeat until no communality changes by more than
 * ONE_FACTOR_TOLERANCE. The fixed point minimises the unweighted least-squares (minres) discrepancy
 * Σᵢ<ⱼ (rᵢⱼ − λᵢλⱼ)². A communality above 1 (Heywood case) is held at 1 and reported.
 *
 * Source: omega.one-factor-fit (the method registry), the principal-axis method; its equivalence to
 * unweighted least squares is from memory (Jöreskog 1977).
 * Cost: O(k³) per iteration (one symmetric eigendecomposition), typically tens of iterations.
 * Throws EngineError with fewer than three items (a one-factor model of two items is not identified).
 */
export function fitOneFactor(r: number[][]): OneFactorFit {
  const k = r.length;
  if (k < 3) throw new EngineError('a one-factor model requires at least three items', 'too-few-items');
  const init = startingCommunalities(r);
  let h2 = init.h2;
  let loadings = new Array<number>(k).fill(0);
  let converged = false;
  let heywood = false;
  let iterations = 0;
  const reduced = r.map((row) => row.slice());
  while (iterations < ONE_FACTOR_MAX_ITERATIONS) {
    iterations++;
    for (let i = 0; i < k; i++) reduced[i][i] = h2[i];
    const { values, vectors } = symmetricEigen(reduced);
    const scale = Math.sqrt(Math.max(0, values[0]));
    loadings = vectors.map((row) => row[0] * scale);
    let step = 0;
    heywood = false;
    const next = loadings.map((l, i) => {
      let h = l * l;
      if (h > 1) {
        h = 1;
        heywood = true;
      }
      step = Math.max(step, Math.abs(h - h2[i]));
      return h;
    });
    h2 = next;
    if (step <= ONE_FACTOR_TOLERANCE) {
      converged = true;
      break;
    }
  }
  if (loadings.reduce((s, l) => s + l, 0) < 0) loadings = loadings.map((l) => -l);
  if (heywood) loadings = loadings.map((l) => Math.max(-1, Math.min(1, l)));
  return {
    method: 'iterated principal axis (unweighted least squares)',
    loadings,
    uniquenesses: loadings.map((l) => Math.max(0, 1 - l * l)),
    iterations,
    converged,
    heywood,
    start: init.start,
  };
}

/**
 * McDonald's omega total from a one-factor model of the correlation matrix:
 * ω = (Σλ)² / ((Σλ)² + Σψ), in the correlation metric (the reliability of the sum of standardized
 * items). The model is fitted by `fitOneFactor` (iterated principal axis, ULS).
 *
 * Source: omega.total (the method registry), ch. 6. Cost: as fitOneFactor.
 * Throws EngineError with fewer than three items. Non-convergence, a Heywood case and negative
 * loadings are returned as warnings.
 */
export function omegaTotal(names: string[], r: number[][]): OmegaTotal {
  const fit = fitOneFactor(r);
  const sum = fit.loadings.reduce((s, l) => s + l, 0);
  const unique = fit.uniquenesses.reduce((s, u) => s + u, 0);
  const warnings: string[] = [];
  if (!fit.converged) {
    warnings.push(
      `the one-factor model for omega did not converge in ${fit.iterations} iterations; omega is approximate`,
    );
  }
  if (fit.heywood) {
    const at = names.filter((_, i) => fit.uniquenesses[i] === 0);
    warnings.push(
      `Heywood case in the one-factor model for omega: communality held at 1 for ${at.join(', ')}`,
    );
  }
  const negative = names.filter((_, i) => fit.loadings[i] < 0);
  if (negative.length > 0) {
    warnings.push(`negative loading on the common factor for ${negative.join(', ')}: check their keying`);
  }
  return { value: (sum * sum) / (sum * sum + unique), fit, warnings };
}
