import { EngineError } from '../errors.ts';

/** A reliability coefficient. Criteria to read it against come from `reliabilityCriterion`. */
export interface Coefficient {
  value: number;
}

/**
 * Cronbach's alpha from an item covariance matrix: α = k/(k − 1) · (1 − Σσ²ᵢ/σ²ₜ), where the total
 * variance σ²ₜ is the sum of all entries of the matrix (with complete data this equals the variance of
 * the sum score exactly).
 *
 * Source: alpha.cronbach (the method registry). Cost: O(k²).
 * Throws EngineError with fewer than two items ("alpha requires at least two items") or when the total
 * score does not vary.
 */
export function cronbachAlpha(cov: readonly (readonly number[])[]): number {
  const k = cov.length;
  if (k < 2) throw new EngineError('alpha requires at least two items', 'too-few-items');
  let trace = 0;
  let total = 0;
  for (let i = 0; i < k; i++) {
    trace += cov[i][i];
    for (let j = 0; j < k; j++) total += cov[i][j];
  }
  if (!(total > 0)) {
    throw new EngineError(
      'alpha requires a total score that varies (the total variance is not positive)',
      'no-variance',
    );
  }
  return (k / (k - 1)) * (1 - trace / total);
}

/**
 * Standardized alpha from the mean inter-item correlation r̄: kr̄ / (1 + (k − 1)r̄) — alpha of the
 * items after each is scaled to unit variance.
 *
 * Source: alpha.standardized (the method registry); the form in r̄ follows from the Spearman–Brown
 * formula. Cost: O(1).
 * Throws EngineError with fewer than two items or when 1 + (k − 1)r̄ is not positive (r̄ at or below
 * −1/(k − 1), which no positive semi-definite correlation matrix has).
 */
export function standardizedAlpha(meanR: number, k: number): number {
  if (k < 2) throw new EngineError('standardized alpha requires at least two items', 'too-few-items');
  const denominator = 1 + (k - 1) * meanR;
  if (!(denominator > 0)) {
    throw new EngineError(
      `standardized alpha is undefined when the mean inter-item correlation is ${meanR} with ${k} items`,
      'not-positive-definite',
    );
  }
  return (k * meanR) / denominator;
}

/**
 * Alpha if item deleted: for each item, Cronbach's alpha of the other k − 1 items, computed from the
 * covariance matrix with the item's row and column removed (σ²ₜ₍₋ᵢ₎ = σ²ₜ − 2Σⱼcᵢⱼ + cᵢᵢ).
 * `null` for an item when fewer than two items would remain or the remaining total does not vary.
 *
 * Source: alpha.if-item-deleted (the method registry). Cost: O(k²) (row sums once).
 * Throws nothing.
 */
export function alphaIfDeleted(cov: readonly (readonly number[])[]): (number | null)[] {
  const k = cov.length;
  const rowSums = cov.map((row) => row.reduce((s, x) => s + x, 0));
  let trace = 0;
  let total = 0;
  for (let i = 0; i < k; i++) {
    trace += cov[i][i];
    total += rowSums[i];
  }
  return cov.map((row, i) => {
    const m = k - 1;
    if (m < 2) return null;
    const restTotal = total - 2 * rowSums[i] + row[i];
    if (!(restTotal > 0)) return null;
    return (m / (m - 1)) * (1 - (trace - row[i]) / restTotal);
  });
}
