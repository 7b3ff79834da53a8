import { EngineError } from '../errors.ts';
import { spearmanBrown } from './spearman-brown.ts';

/** Odd–even split-half reliability. */
export interface SplitHalf {
  method: 'odd-even';
  /** Items in positions 1, 3, 5, … of the item list. */
  firstHalf: string[];
  /** Items in positions 2, 4, 6, … */
  secondHalf: string[];
  /** Correlation between the two half sums. */
  correlation: number;
  /** Spearman–Brown stepped-up reliability 2r/(1 + r); null when r ≤ 0 (the prophecy needs r > 0). */
  spearmanBrown: number | null;
}

/**
 * Split-half reliability with the odd–even split: the items in odd positions of the list form one
 * half and those in even positions the other; the half sums are correlated and the correlation is
 * stepped up to full length with Spearman–Brown, 2r/(1 + r). With an odd number of items the first
 * half holds one item more, which the formula (built for equal halves) does not account for.
 * Computed from the item covariance matrix: cov(A, B) = Σᵢ∈A Σⱼ∈B cᵢⱼ.
 *
 * Source: split-half.spearman-brown (the method registry). Cost: O(k²).
 * Throws EngineError with fewer than two items or when a half sum does not vary.
 */
export function oddEvenSplitHalf(names: string[], cov: readonly (readonly number[])[]): SplitHalf {
  const k = cov.length;
  if (k < 2) throw new EngineError('split-half reliability requires at least two items', 'too-few-items');
  let varA = 0;
  let varB = 0;
  let covAB = 0;
  for (let i = 0; i < k; i++) {
    for (let j = 0; j < k; j++) {
      const inA = i % 2 === 0;
      const jInA = j % 2 === 0;
      if (inA && jInA) varA += cov[i][j];
      else if (!inA && !jInA) varB += cov[i][j];
      else if (inA) covAB += cov[i][j];
    }
  }
  if (!(varA > 0) || !(varB > 0)) {
    throw new EngineError('split-half reliability requires both half scores to vary', 'no-variance');
  }
  const correlation = Math.max(-1, Math.min(1, covAB / Math.sqrt(varA * varB)));
  return {
    method: 'odd-even',
    firstHalf: names.filter((_, i) => i % 2 === 0),
    secondHalf: names.filter((_, i) => i % 2 === 1),
    correlation,
    spearmanBrown:
      correlation > 0 && correlation < 1 ? spearmanBrown(correlation, 2) : correlation >= 1 ? 1 : null,
  };
}
