import { EngineError } from '../errors.ts';
import { extractFactors } from './extraction.ts';

export interface SchmidLeiman {
  /** Loadings of each item on the general factor. */
  general: number[];
  /** Loadings on the m group factors (residualised first-order factors), p × m. */
  group: number[][];
  /** Loadings of the first-order factors on the general factor. */
  higherOrder: number[];
  uniquenesses: number[];
}

/**
 * Schmid & Leiman's (1957) orthogonalisation of an oblique first-order solution (registry id
 * `omega.schmid-leiman`): the factor correlations Φ are themselves fitted by one factor (loadings γ;
 * with two factors γ₁ = γ₂ = √φ₁₂), the general loadings are P·γ, the group loadings P·diag(√(1 − γ²)).
 *
 * Cost: O(p·m + m³). Throws EngineError with fewer than two first-order factors, or negative factor
 * correlations that leave no general factor (φ₁₂ ≤ 0 with two factors).
 */
export function schmidLeiman(pattern: number[][], phi: number[][], communalities: number[]): SchmidLeiman {
  const m = phi.length;
  if (m < 2)
    throw new EngineError('a Schmid–Leiman solution needs at least two first-order factors', 'factors');
  let gamma: number[];
  if (m === 2) {
    if (!(phi[0][1] > 0)) {
      throw new EngineError(
        `the two factors correlate ${phi[0][1].toFixed(3)}; a general factor needs a positive correlation`,
      );
    }
    gamma = [Math.sqrt(phi[0][1]), Math.sqrt(phi[0][1])];
  } else {
    const fit = extractFactors(phi, { factors: 1, method: 'paf', n: Number.MAX_SAFE_INTEGER });
    gamma = fit.loadings.map((row) => Math.min(1, row[0]));
  }
  const general = pattern.map((row) => row.reduce((s, v, k) => s + v * gamma[k], 0));
  const group = pattern.map((row) => row.map((v, k) => v * Math.sqrt(Math.max(0, 1 - gamma[k] ** 2))));
  return { general, group, higherOrder: gamma, uniquenesses: communalities.map((h) => 1 - h) };
}

export interface OmegaCoefficients {
  omegaHierarchical: number;
  omegaTotal: number;
  /** Per group factor: the items assigned to it and its omega values. */
  facets: {
    factor: number;
    items: number[];
    omegaTotal: number;
    omegaHierarchical: number;
    omegaGroup: number;
  }[];
  /** What the omegas rest on, in words. */
  model: string;
}

/**
 * Omega hierarchical ω_h = (Σg)²/1ᵀR1 and omega total ω_t = 1 − Σu²/1ᵀR1 from a Schmid–Leiman solution
 * (McDonald 1999; Zinbarg, Revelle, Yovel & Li 2005; registry ids `omega.hierarchical`,
 * `omega.total`), with 1ᵀR1 the observed variance of the standardized sum score. Per facet (items
 * assigned to the group factor on which they load most, or as given), ω_t of the facet's items,
 * ω_h = (Σg)²/1ᵀR₍f₎1 (what the general factor carries) and ω_group = (Σs)²/1ᵀR₍f₎1 (what the facet's own
 * factor carries beyond it).
 *
 * Cost: O(p²). Throws EngineError when the matrix and the solution disagree in size, or a facet has no
 * items.
 */
export function omegaFromSchmidLeiman(
  r: number[][],
  sl: SchmidLeiman,
  model: string,
  assignment?: number[],
): OmegaCoefficients {
  const p = r.length;
  if (sl.general.length !== p)
    throw new EngineError('omega: the correlation matrix and the factor solution differ in size');
  const m = sl.group[0].length;
  const total = (idx: number[]) => {
    let s = 0;
    for (const i of idx) for (const j of idx) s += r[i][j];
    return s;
  };
  const sum = (idx: number[], f: (i: number) => number) => idx.reduce((s, i) => s + f(i), 0);
  const all = r.map((_, i) => i);
  const vt = total(all);
  const place =
    assignment ??
    sl.group.map((row) => row.reduce((best, v, k) => (Math.abs(v) > Math.abs(row[best]) ? k : best), 0));
  const facets = Array.from({ length: m }, (_, k) => {
    const items = all.filter((i) => place[i] === k);
    if (items.length === 0) return null;
    const v = total(items);
    const g = sum(items, (i) => sl.general[i]);
    const s = sum(items, (i) => sl.group[i][k]);
    const u = sum(items, (i) => sl.uniquenesses[i]);
    return {
      factor: k,
      items,
      omegaTotal: 1 - u / v,
      omegaHierarchical: (g * g) / v,
      omegaGroup: (s * s) / v,
    };
  }).filter((f): f is NonNullable<typeof f> => f !== null);
  const g = sum(all, (i) => sl.general[i]);
  return {
    omegaHierarchical: (g * g) / vt,
    omegaTotal: 1 - sum(all, (i) => sl.uniquenesses[i]) / vt,
    facets,
    model,
  };
}
