import { DEFAULT_PA_ITERATIONS, DEFAULT_PA_PERCENTILE } from '../../../engine/factor/dimensionality.ts';
import type { ExtractionMethod } from '../../../engine/factor/extraction.ts';
import type { CorrelationKind } from '../../../engine/factor/input.ts';
import {
  CROSS_LOADING_FLAG,
  facetCorrespondence,
  type ItemFactorAnalysis,
  type ItemFactorRequest,
  loadingFlags,
  PRIMARY_LOADING_FLAG,
} from '../../../engine/factor/item-factors.ts';
import type { MissingMethod } from '../../../engine/item-stats.ts';
import type { RotationMethod } from '../../../engine/factor/rotation.ts';
import type { RoundItem } from '../../../../db/repos/purification.ts';
import { RuleError } from '../../errors.ts';
import { fmt, type ItemFlag } from './flags.ts';

export const EXTRACTIONS = ['paf', 'minres', 'ml'] as const satisfies readonly ExtractionMethod[];
export const ROTATIONS = [
  'none',
  'varimax',
  'quartimax',
  'promax',
  'oblimin',
  'geomin',
] as const satisfies readonly RotationMethod[];
export const CORRELATIONS = ['pearson', 'polychoric'] as const satisfies readonly CorrelationKind[];

/** Fewest and most simulated data sets a round's parallel analysis accepts. */
export const MIN_PA_ITERATIONS = 100;
export const MAX_PA_ITERATIONS = 20_000;

/** The researcher's choices for a round's factor analysis; each left out takes its default. */
export interface FactorRequest {
  /** Default: the number of facets among the round's items (at most items − 1). */
  factors?: number;
  extraction?: ExtractionMethod;
  rotation?: RotationMethod;
  correlation?: CorrelationKind;
  iterations?: number;
  /** Default: the round's number, so a rerun repeats it. */
  seed?: number;
}

/** Defaults a round's factor analysis runs with when the researcher names none. */
export const FACTOR_DEFAULTS = {
  extraction: 'ml',
  rotation: 'oblimin',
  correlation: 'pearson',
  iterations: DEFAULT_PA_ITERATIONS,
  percentile: DEFAULT_PA_PERCENTILE,
} as const;

/**
 * The engine request of a round's factor analysis, or null with the reason when the round has too few
 * items for one. Refuses (RuleError) a factor count, method, iteration count or seed out of range.
 */
export function factorRequestFor(
  request: FactorRequest | null | undefined,
  context: { items: number; facets: number; missing: MissingMethod; round: number },
): { request: ItemFactorRequest | null; note: string | null } {
  if (request === null) return { request: null, note: 'no factor analysis was asked for in this round' };
  const asked = request ?? {};
  const p = context.items;
  if (p < 3) {
    if (asked.factors !== undefined)
      throw new RuleError(`a factor analysis needs at least three items; this round has ${p}`);
    return { request: null, note: `a factor analysis needs at least three items; this round has ${p}` };
  }
  const factors = asked.factors ?? Math.min(Math.max(context.facets, 1), p - 1);
  if (!Number.isInteger(factors) || factors < 1 || factors >= p) {
    throw new RuleError(
      `the number of factors must be a whole number from 1 to ${p - 1} for the round's ${p} items (got ${factors})`,
    );
  }
  const extraction = asked.extraction ?? FACTOR_DEFAULTS.extraction;
  if (!EXTRACTIONS.includes(extraction))
    throw new RuleError(`extraction must be one of ${EXTRACTIONS.join(', ')} (got "${extraction}")`);
  const rotation = asked.rotation ?? FACTOR_DEFAULTS.rotation;
  if (!ROTATIONS.includes(rotation))
    throw new RuleError(`rotation must be one of ${ROTATIONS.join(', ')} (got "${rotation}")`);
  const correlation = asked.correlation ?? FACTOR_DEFAULTS.correlation;
  if (!CORRELATIONS.includes(correlation))
    throw new RuleError(`correlations must be pearson or polychoric (got "${correlation}")`);
  const iterations = asked.iterations ?? FACTOR_DEFAULTS.iterations;
  if (!Number.isInteger(iterations) || iterations < MIN_PA_ITERATIONS || iterations > MAX_PA_ITERATIONS) {
    throw new RuleError(
      `parallel analysis takes ${MIN_PA_ITERATIONS} to ${MAX_PA_ITERATIONS} simulated data sets (got ${iterations})`,
    );
  }
  const seed = asked.seed ?? context.round;
  if (!Number.isInteger(seed) || seed < 0 || seed > 0xffff_ffff)
    throw new RuleError(`the factor-analysis seed must be a whole number from 0 to 4294967295 (got ${seed})`);
  return {
    request: {
      correlation,
      missing: context.missing,
      factors,
      extraction,
      rotation,
      iterations,
      percentile: FACTOR_DEFAULTS.percentile,
      seed,
    },
    note: null,
  };
}

/** One facet's row of the facet-by-factor table, as stored with the round. */
export interface FacetFactorRow {
  facetId: number;
  items: number;
  primaryCounts: number[];
  meanAbsLoading: number[];
  /** The factor (1-based) matched to the facet; null when there are more facets than factors. */
  factor: number | null;
}

/**
 * The facet-by-factor correspondence of a round's solution and the loading flags of each item
 * (primary loading below .40, cross-loading of .30 or more, primary factor other than the one matched
 * to the item's facet; common practice, registry ids `rule.primary-loading`, `rule.cross-loading`,
 * `rule.intended-facet`).
 */
export function factorFlags(
  analysis: ItemFactorAnalysis,
  items: RoundItem[],
  facetNames: Map<number, string>,
): { correspondence: FacetFactorRow[]; flags: Record<string, ItemFlag[]> } {
  const efa = analysis.efa;
  if (!efa) return { correspondence: [], flags: {} };
  const facetOf = analysis.items.map((code) => items.find((it) => it.code === code)?.facetId ?? null);
  const facetIds = [...new Set(facetOf.filter((f): f is number => f !== null))];
  const match = facetCorrespondence(efa.loadings, facetOf, facetIds);
  const correspondence = match.facets.map((row) => ({
    facetId: row.facet,
    items: row.items,
    primaryCounts: row.primaryCounts,
    meanAbsLoading: row.meanAbsLoading,
    factor: row.factor === null ? null : row.factor + 1,
  }));
  const intended = new Map(match.facets.map((row) => [row.facet, row.factor]));
  const flags: Record<string, ItemFlag[]> = {};
  analysis.items.forEach((code, i) => {
    const row = efa.loadings[i];
    const facet = facetOf[i];
    const f = loadingFlags(row, facet === null ? null : (intended.get(facet) ?? null));
    const out: ItemFlag[] = [];
    const at = (k: number) => `${fmt(row[k])} on F${k + 1}`;
    if (f.lowPrimary) out.push({ rule: 'low-primary', text: `largest loading ${at(f.primary)}` });
    if (f.crossLoadings.length > 0) {
      out.push({
        rule: 'cross-loading',
        text: `loads ${at(f.primary)} and ${f.crossLoadings.map(at).join(', ')}`,
      });
    }
    if (f.offFacet && facet !== null) {
      const k = intended.get(facet) as number;
      out.push({
        rule: 'off-facet',
        text: `largest loading on F${f.primary + 1}; facet “${facetNames.get(facet) ?? facet}” matches F${k + 1} (${fmt(row[k])})`,
      });
    }
    if (out.length > 0) flags[code] = out;
  });
  return { correspondence, flags };
}

/** The loading thresholds a round's flags used, from the methods registry. */
export const LOADING_RULES = {
  primaryLoadingMin: PRIMARY_LOADING_FLAG,
  crossLoadingMin: CROSS_LOADING_FLAG,
} as const;

/** The factor-analysis request as a round stores it in its options. */
export type ItemFactorRequestStored = ItemFactorRequest;
