import type { RoundItem } from '../../../../db/repos/purification.ts';
import type { MinimumAveragePartial, ParallelAnalysis } from '../../../engine/factor/factor-count.ts';
import { kmoLabel } from '../../../engine/factor/factorability.ts';
import type { ItemFactorRequest } from '../../../engine/factor/item-factors.ts';
import type { MlFit } from '../../../engine/factor/extraction.ts';
import type { OmegaCoefficients } from '../../../engine/factor/omega-hierarchical.ts';
import type { RoundResults } from '../results.ts';
import { LOADING_RULES } from '../rules/factor.ts';
import type { ItemFlag } from '../rules/flags.ts';

/** One item's row of the loading table. */
export interface LoadingRow {
  code: string;
  facetId: number | null;
  facetName: string | null;
  /** Pattern loadings, one per factor. */
  loadings: number[];
  communality: number;
  /** The factor (1-based) of the largest |loading|. */
  primary: number;
  /** The factor (1-based) matched to the item's facet, if any. */
  intended: number | null;
  /** The loading flags (low primary, cross-loading, other factor than the facet's). */
  flags: ItemFlag[];
}

/** A round's factor analysis as the workbench shows it; null fields are parts that could not be computed. */
export interface RoundFactorView {
  request: ItemFactorRequest;
  n: number;
  /** Facets among the round's items: the default factor count. */
  facetCount: number;
  smoothed: boolean;
  factorability: {
    kmo: number;
    kmoLabel: string;
    msa: { code: string; value: number }[];
    bartlett: { chiSquare: number; df: number; p: number } | null;
    determinant: number | null;
  };
  evidence: {
    eigenvalues: number[];
    reducedEigenvalues: number[];
    parallel: ParallelAnalysis | null;
    map: MinimumAveragePartial | null;
    suggested: {
      kaiser: number;
      parallel: number | null;
      parallelFactors: number | null;
      map: number | null;
      mapFourth: number | null;
    };
  };
  solution: {
    factors: number;
    extraction: string;
    rotation: string;
    oblique: boolean;
    rows: LoadingRow[];
    factorCorrelations: number[][];
    variance: { ss: number; proportion: number }[];
    fit: MlFit | null;
    omega: OmegaCoefficients | null;
    heywood: string[];
    converged: boolean;
    rotationConverged: boolean;
  } | null;
  /** Why there is no solution (e.g. too many factors for the items). */
  refused: string | null;
  correspondence: {
    facetId: number;
    facetName: string;
    items: number;
    primaryCounts: number[];
    meanAbsLoading: number[];
    factor: number | null;
  }[];
  thresholds: { primaryLoadingMin: number; crossLoadingMin: number };
  warnings: string[];
}

/**
 * The factor analysis stored with a round, read back for the screen; null with a note when the round
 * has none (rounds stored before rounds ran one, or too few items).
 */
export function roundFactorView(
  results: RoundResults,
  items: RoundItem[],
  facetNames: Map<number, string>,
  thresholds: Record<string, number | undefined>,
): { factor: RoundFactorView | null; factorNote: string | null } {
  const fa = results.factor;
  if (!fa) {
    const note =
      results.factorRefused != null
        ? `the factor analysis could not run: ${results.factorRefused}`
        : (results.factorNote ?? 'this round was stored before rounds ran a factor analysis');
    return { factor: null, factorNote: note };
  }
  const d = fa.dimensionality;
  const correspondence = (results.correspondence ?? []).map((row) => ({
    ...row,
    facetName: facetNames.get(row.facetId) ?? `facet ${row.facetId}`,
  }));
  const intended = new Map(correspondence.map((row) => [row.facetId, row.factor]));
  const facetOf = (code: string) => items.find((it) => it.code === code)?.facetId ?? null;
  const loadingRules = new Set(['low-primary', 'cross-loading', 'off-facet']);
  const efa = fa.efa;
  const facetCount = new Set(items.map((it) => it.facetId).filter((f) => f !== null)).size;
  return {
    factorNote: null,
    factor: {
      request: fa.request,
      n: fa.n,
      facetCount,
      smoothed: fa.smoothed,
      factorability: {
        kmo: d.factorability.kmo,
        kmoLabel: kmoLabel(d.factorability.kmo),
        msa: fa.items.map((code, i) => ({ code, value: d.factorability.msa[i] })),
        bartlett: d.factorability.bartlett,
        determinant: d.factorability.determinant,
      },
      evidence: {
        eigenvalues: d.eigenvalues,
        reducedEigenvalues: d.reducedEigenvalues,
        parallel: d.parallel,
        map: d.map,
        suggested: d.suggested,
      },
      solution: efa && {
        factors: efa.factors,
        extraction: efa.extraction,
        rotation: efa.rotation,
        oblique: efa.oblique,
        rows: fa.items.map((code, i) => {
          const facetId = facetOf(code);
          return {
            code,
            facetId,
            facetName: facetId === null ? null : (facetNames.get(facetId) ?? null),
            loadings: efa.loadings[i],
            communality: efa.communalities[i],
            primary: efa.flags[i].primary,
            intended: facetId === null ? null : (intended.get(facetId) ?? null),
            flags: (results.flags[code] ?? []).filter((f) => loadingRules.has(f.rule)),
          };
        }),
        factorCorrelations: efa.factorCorrelations,
        variance: efa.variance,
        fit: efa.fit,
        omega: efa.omega,
        heywood: efa.heywood,
        converged: efa.converged,
        rotationConverged: efa.rotationConverged,
      },
      refused: fa.efaRefused,
      correspondence,
      thresholds: {
        primaryLoadingMin: thresholds.primaryLoadingMin ?? LOADING_RULES.primaryLoadingMin,
        crossLoadingMin: thresholds.crossLoadingMin ?? LOADING_RULES.crossLoadingMin,
      },
      warnings: fa.warnings,
    },
  };
}
