import { EngineError } from '../errors.ts';
import { itemMoments, type MissingMethod } from '../item-stats.ts';
import type { ResponseMatrix } from '../scoring.ts';
import { polychoricMatrix } from './polychoric.ts';

export type CorrelationKind = 'pearson' | 'polychoric';

/** The correlation matrix a factor analysis rests on, with the n its tests use. */
export interface CorrelationInput {
  kind: CorrelationKind;
  missing: MissingMethod;
  items: string[];
  matrix: number[][];
  /** Respondents: complete cases (listwise), or the fewest behind any correlation (pairwise). */
  n: number;
  /** Respondents who gave at least one answer (pairwise) or complete cases (listwise). */
  respondents: number;
  /** Polychoric thresholds per item (null for Pearson). */
  thresholds: number[][] | null;
  /** True when the matrix had to be smoothed to positive definite. */
  smoothed: boolean;
  warnings: string[];
}

/**
 * The correlations of item responses for factor analysis: Pearson (itemMoments, listwise or pairwise)
 * or polychoric (polychoricMatrix; listwise keeps the complete cases first). Under pairwise deletion the
 * n used by χ² tests and parallel analysis is the smallest pairwise count, and a warning says so.
 *
 * Cost: O(n·p²) (Pearson) or as polychoricMatrix. Throws EngineError naming an item that does not vary,
 * and whatever itemMoments or polychoricMatrix throw.
 */
export function correlationInput(
  items: string[],
  data: ResponseMatrix,
  options: { kind: CorrelationKind; missing: MissingMethod },
  control: { onProgress?: (done: number, total: number) => void; shouldStop?: () => boolean } = {},
): CorrelationInput {
  const { kind, missing } = options;
  const moments = itemMoments(items, data, missing);
  const flat = items.filter((_, i) => !moments.varies[i]);
  if (flat.length > 0) {
    throw new EngineError(
      `${flat.length === 1 ? 'item' : 'items'} ${flat.map((s) => `"${s}"`).join(', ')} ${flat.length === 1 ? 'has' : 'have'} the same answer from every respondent (zero variance); leave ${flat.length === 1 ? 'it' : 'them'} out of the analysis`,
      'zero-variance',
    );
  }
  const warnings: string[] = [];
  const n = missing === 'listwise' ? moments.n : moments.minPairN;
  if (missing === 'pairwise' && moments.minPairN < moments.n) {
    warnings.push(
      `pairwise deletion: χ² tests and parallel analysis use n = ${n}, the fewest respondents behind any correlation`,
    );
  }
  if (kind === 'pearson') {
    return {
      kind,
      missing,
      items,
      matrix: moments.correlation as number[][],
      n,
      respondents: moments.n,
      thresholds: null,
      smoothed: false,
      warnings,
    };
  }
  const poly = polychoricMatrix(items, moments.rows(), control);
  return {
    kind,
    missing,
    items,
    matrix: poly.matrix,
    n,
    respondents: moments.n,
    thresholds: poly.thresholds,
    smoothed: poly.smoothed,
    warnings: [...warnings, ...poly.warnings],
  };
}
