import { EngineError } from '../errors.ts';
import { inverse } from '../linalg.ts';

export interface GuttmanLambdas {
  lambda1: number;
  lambda2: number;
  lambda6: number;
}

/**
 * Guttman's (1945) lower bounds to reliability from a covariance (or correlation) matrix C of k items,
 * with V = Σᵢⱼ cᵢⱼ the variance of the sum score (registry ids `reliability.guttman-lambda2`,
 * `reliability.guttman-lambda6`):
 * λ₁ = 1 − tr C / V; λ₂ = λ₁ + √(k/(k − 1)·Σᵢ≠ⱼ cᵢⱼ²) / V; λ₆ = 1 − Σᵢ eᵢ² / V with eᵢ² = 1/(C⁻¹)ᵢᵢ the
 * error variance of item i regressed on all the others.
 *
 * Cost: O(k³) (one inverse). Throws EngineError with fewer than two items, a non-square matrix, a
 * non-positive total variance, or a singular C (λ₆ is then undefined).
 *
 * @example guttmanLambdas([[1, .5, .5], [.5, 1, .5], [.5, .5, 1]]).lambda2 // 0.75
 */
export function guttmanLambdas(c: number[][]): GuttmanLambdas {
  const { lambda1, lambda2, total } = lowerBoundsWithoutInverse(c);
  const k = c.length;
  const inv = inverse(c);
  let errors = 0;
  for (let i = 0; i < k; i++) errors += 1 / inv[i][i];
  return { lambda1, lambda2, lambda6: 1 - errors / total };
}

/**
 * Guttman's λ₂ alone (see guttmanLambdas), which needs no inverse and so exists for a singular C too.
 *
 * Cost: O(k²). Throws EngineError with fewer than two items, a non-square matrix or a non-positive
 * total variance.
 */
export function guttmanLambda2(c: number[][]): number {
  return lowerBoundsWithoutInverse(c).lambda2;
}

function lowerBoundsWithoutInverse(c: number[][]): { lambda1: number; lambda2: number; total: number } {
  const k = c.length;
  if (k < 2) throw new EngineError("Guttman's lambdas require at least two items", 'too-few-items');
  if (c.some((row) => row.length !== k))
    throw new EngineError("Guttman's lambdas require a square matrix", 'shape');
  let total = 0;
  let trace = 0;
  let offSquares = 0;
  for (let i = 0; i < k; i++) {
    for (let j = 0; j < k; j++) {
      total += c[i][j];
      if (i === j) trace += c[i][j];
      else offSquares += c[i][j] * c[i][j];
    }
  }
  if (!(total > 0)) throw new EngineError("Guttman's lambdas require a positive sum-score variance");
  const lambda1 = 1 - trace / total;
  return { lambda1, lambda2: lambda1 + Math.sqrt((k / (k - 1)) * offSquares) / total, total };
}
