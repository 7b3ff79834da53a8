import { EngineError } from '../errors.ts';
import type { MissingMethod } from '../item-stats.ts';
import { ruleThreshold } from '../methods/index.ts';
import type { ResponseMatrix } from '../scoring.ts';
import { analyzeDimensionality, type Dimensionality } from './dimensionality.ts';
import { type EfaResult, exploratoryFactorAnalysis } from './efa.ts';
import type { ExtractionMethod } from './extraction.ts';
import { type CorrelationKind, correlationInput } from './input.ts';
import type { RotationMethod } from './rotation.ts';

/** Primary loadings below this are flagged (common practice; registry id `rule.primary-loading`). */
export const PRIMARY_LOADING_FLAG = ruleThreshold('rule.primary-loading', 'minimum');
/** A loading this high on another factor is a cross-loading (common practice; `rule.cross-loading`). */
export const CROSS_LOADING_FLAG = ruleThreshold('rule.cross-loading', 'flag');

/** How the factor analysis of one set of items is run; every field is stored with the result. */
export interface ItemFactorRequest {
  correlation: CorrelationKind;
  missing: MissingMethod;
  factors: number;
  extraction: ExtractionMethod;
  rotation: RotationMethod;
  /** Parallel analysis: simulated data sets, percentile, seed (the seed also drives rotation starts). */
  iterations: number;
  percentile: number;
  seed: number;
}

/** The factor-count evidence and the chosen solution for one set of items. */
export interface ItemFactorAnalysis {
  request: ItemFactorRequest;
  items: string[];
  /** Respondents behind the correlations (complete cases, or the fewest pairwise). */
  n: number;
  /** True when the correlation matrix had to be smoothed to positive definite. */
  smoothed: boolean;
  dimensionality: Dimensionality;
  /** The solution with the chosen number of factors; null when it could not be computed. */
  efa: EfaResult | null;
  /** Why there is no solution, in words (null when there is one). */
  efaRefused: string | null;
  warnings: string[];
}

/** What the analysis reports while it runs; `stage` names the part being counted. */
export interface ItemFactorControl {
  onProgress?: (done: number, total: number, stage: string) => void;
  shouldStop?: () => boolean;
}

/**
 * The factor analysis of one set of items, as a purification round runs it: the correlations
 * (Pearson, or polychoric for ordinal answers: correlationInput), the factor-count evidence side by
 * side (analyzeDimensionality: KMO, MSA, Bartlett, eigenvalues, parallel analysis for components and
 * common factors, MAP), and the solution with the chosen number of factors (exploratoryFactorAnalysis).
 * A solution the engine cannot compute (e.g. too many factors for the items) is reported in
 * `efaRefused` and leaves the evidence standing.
 *
 * Cost: that of the three parts; the simulation of the parallel analysis and the polychoric pairs
 * dominate. Throws EngineError for fewer than three items, an item that does not vary, a factor count
 * outside 1 … p − 1, and code `cancelled` when `shouldStop` says so.
 */
export function analyseItemFactors(
  items: string[],
  data: ResponseMatrix,
  request: ItemFactorRequest,
  control: ItemFactorControl = {},
): ItemFactorAnalysis {
  const p = items.length;
  if (p < 3) throw new EngineError('factor analysis needs at least three items', 'too-few-items');
  if (!Number.isInteger(request.factors) || request.factors < 1 || request.factors >= p) {
    throw new EngineError(
      `the number of factors must be a whole number from 1 to ${p - 1} for ${p} items (got ${request.factors})`,
      'factors',
    );
  }
  const input = correlationInput(
    items,
    data,
    { kind: request.correlation, missing: request.missing },
    {
      onProgress: (done, total) => control.onProgress?.(done, total, 'polychoric correlations'),
      shouldStop: control.shouldStop,
    },
  );
  const dimensionality = analyzeDimensionality(input.matrix, input.n, {
    iterations: request.iterations,
    seed: request.seed,
    percentile: request.percentile,
    onProgress: (done, total) => control.onProgress?.(done, total, 'parallel analysis'),
    shouldStop: control.shouldStop,
  });
  let efa: EfaResult | null = null;
  let efaRefused: string | null = null;
  try {
    efa = exploratoryFactorAnalysis(items, input.matrix, {
      factors: request.factors,
      extraction: request.extraction,
      rotation: request.rotation,
      seed: request.seed,
      n: input.n,
    });
  } catch (error) {
    if (!(error instanceof EngineError) || error.code === 'cancelled') throw error;
    efaRefused = error.message;
  }
  return {
    request: { ...request },
    items: items.slice(),
    n: input.n,
    smoothed: input.smoothed,
    dimensionality,
    efa,
    efaRefused,
    warnings: [...input.warnings, ...dimensionality.warnings, ...(efa?.warnings ?? [])],
  };
}

/** How the items of each facet spread over the factors, and which factor each facet matches. */
export interface FacetCorrespondence<K> {
  facets: {
    facet: K;
    items: number;
    /** Items of the facet whose largest |loading| is on each factor. */
    primaryCounts: number[];
    /** Mean |loading| of the facet's items on each factor. */
    meanAbsLoading: number[];
    /** The factor (0-based) matched to the facet, or null when there are more facets than factors. */
    factor: number | null;
  }[];
}

/**
 * Matches facets to factors by their items' loadings: the facet–factor pair with the largest mean
 * |loading| is matched first, then the largest among the remaining facets and factors, and so on
 * (a greedy assignment; each facet gets at most one factor and each factor at most one facet).
 * `itemFacets[i]` is the facet of item i (null: none). Common practice when reading an exploratory
 * solution against the intended structure (registry id `rule.intended-facet`).
 *
 * Cost: O(p·m + f²·m). Throws EngineError when the loadings and the facet list differ in length.
 */
export function facetCorrespondence<K>(
  loadings: number[][],
  itemFacets: (K | null)[],
  facets: K[],
): FacetCorrespondence<K> {
  if (loadings.length !== itemFacets.length)
    throw new EngineError(`${loadings.length} loading rows for ${itemFacets.length} items`);
  const m = loadings[0]?.length ?? 0;
  const rows = facets.map((facet) => {
    const members = loadings.filter((_, i) => itemFacets[i] === facet);
    const primaryCounts = new Array<number>(m).fill(0);
    const sums = new Array<number>(m).fill(0);
    for (const row of members) {
      const mags = row.map(Math.abs);
      primaryCounts[mags.indexOf(Math.max(...mags))]++;
      mags.forEach((v, k) => {
        sums[k] += v;
      });
    }
    return {
      facet,
      items: members.length,
      primaryCounts,
      meanAbsLoading: sums.map((s) => (members.length === 0 ? 0 : s / members.length)),
      factor: null as number | null,
    };
  });
  const freeFactors = new Set(Array.from({ length: m }, (_, k) => k));
  const open = new Set(rows.filter((r) => r.items > 0));
  while (open.size > 0 && freeFactors.size > 0) {
    let best: { row: (typeof rows)[number]; k: number; v: number } | null = null;
    for (const row of open) {
      for (const k of freeFactors) {
        if (best === null || row.meanAbsLoading[k] > best.v) best = { row, k, v: row.meanAbsLoading[k] };
      }
    }
    if (best === null) break;
    best.row.factor = best.k;
    open.delete(best.row);
    freeFactors.delete(best.k);
  }
  return { facets: rows };
}

/** The rules of thumb an item's loadings break. */
export interface LoadingFlags {
  /** The factor (0-based) of the item's largest |loading|. */
  primary: number;
  lowPrimary: boolean;
  /** Other factors (0-based) with |loading| ≥ the cross-loading threshold. */
  crossLoadings: number[];
  /** The item's largest loading is not on the factor matched to its intended facet. */
  offFacet: boolean;
}

/**
 * Flags one item's loadings (common practice; registry ids `rule.primary-loading`,
 * `rule.cross-loading`, `rule.intended-facet`): a primary loading below .40, a loading of .30 or more
 * on another factor, and a primary factor other than the one matched to the item's facet (null when
 * the item has no facet or its facet matched no factor).
 *
 * Cost: O(m).
 */
export function loadingFlags(row: number[], intendedFactor: number | null): LoadingFlags {
  const mags = row.map(Math.abs);
  const primary = mags.indexOf(Math.max(...mags));
  return {
    primary,
    lowPrimary: mags[primary] < PRIMARY_LOADING_FLAG,
    crossLoadings: mags.flatMap((v, k) => (k !== primary && v >= CROSS_LOADING_FLAG ? [k] : [])),
    offFacet: intendedFactor !== null && primary !== intendedFactor,
  };
}
