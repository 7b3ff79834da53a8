import { EngineError } from '../errors.ts';

/** Composite reliability of at least .70 (common practice). Registry: `cr.criterion`. */
export const CR_MIN = 0.7;
/** AVE of at least .50 (Fornell & Larcker 1981). Registry: `fornell-larcker`. */
export const AVE_MIN = 0.5;
/** HTMT thresholds (Henseler, Ringle & Sarstedt 2015): .85 strict, .90 lenient. Registry: `htmt`. */
export const HTMT_THRESHOLDS = { strict: 0.85, lenient: 0.9 } as const;

export interface FactorReliability {
  factor: string;
  items: string[];
  /** (Σλ)² / ((Σλ)² + Σθ) in the standardized metric. */
  compositeReliability: number;
  /** Σλ² / k. */
  ave: number;
  sqrtAve: number;
  /** Largest absolute correlation with another factor (null with one factor). */
  maxCorrelation: number | null;
  /** Fornell & Larcker: AVE ≥ .50 and √AVE above every correlation with another factor. */
  fornellLarcker: boolean;
}

/**
 * Composite reliability and average variance extracted of each factor from a standardized solution,
 * and the Fornell–Larcker comparison of √AVE with the factor correlations (Fornell & Larcker 1981).
 * `standardizedResidual[i]` is θ_ii/σ_ii (1 − λ² for an item on one factor). Registry:
 * `cr.composite`, `ave`, `fornell-larcker`, `cr.criterion`.
 *
 * Cost: O(p·m + m²). Throws EngineError when the shapes disagree or a factor has no items.
 */
export function constructReliability(
  factors: string[],
  items: string[],
  pattern: boolean[][],
  standardizedLoadings: number[][],
  standardizedResidual: number[],
  factorCorrelations: number[][],
): FactorReliability[] {
  const m = factors.length;
  if (pattern.length !== items.length || standardizedLoadings.length !== items.length) {
    throw new EngineError('construct reliability: the loading matrix does not match the items');
  }
  return factors.map((factor, j) => {
    const idx = items.map((_, i) => i).filter((i) => pattern[i][j]);
    if (idx.length === 0) throw new EngineError(`construct reliability: factor "${factor}" has no items`);
    const sum = idx.reduce((s, i) => s + standardizedLoadings[i][j], 0);
    const sumSq = idx.reduce((s, i) => s + standardizedLoadings[i][j] ** 2, 0);
    const error = idx.reduce((s, i) => s + standardizedResidual[i], 0);
    const compositeReliability = (sum * sum) / (sum * sum + error);
    const ave = sumSq / idx.length;
    const sqrtAve = Math.sqrt(Math.max(ave, 0));
    const others = factorCorrelations[j].filter((_, k) => k !== j).map(Math.abs);
    const maxCorrelation = m > 1 ? Math.max(...others) : null;
    return {
      factor,
      items: idx.map((i) => items[i]),
      compositeReliability,
      ave,
      sqrtAve,
      maxCorrelation,
      fornellLarcker: ave >= AVE_MIN && (maxCorrelation === null || sqrtAve > maxCorrelation),
    };
  });
}

export interface HtmtPair {
  a: string;
  b: string;
  /** Null when a factor has a single item (no monotrait correlations). */
  value: number | null;
  /** Below .85, below .90, or at/above .90. */
  verdict: 'below .85' | 'below .90' | 'at or above .90' | null;
}

/**
 * Heterotrait–monotrait ratio of correlations (Henseler, Ringle & Sarstedt 2015) for every pair of
 * factors: the mean correlation between items of different factors over the geometric mean of the
 * mean correlations among items of the same factor. Items on both factors of a pair are left out of
 * its heterotrait mean. Registry: `htmt`.
 *
 * Cost: O(p²) per pair. Throws EngineError when the correlation matrix does not match the items.
 */
export function htmt(
  factors: string[],
  items: string[],
  pattern: boolean[][],
  correlations: number[][],
): HtmtPair[] {
  if (correlations.length !== items.length)
    throw new EngineError('HTMT: the correlation matrix does not match the items');
  const members = factors.map((_, j) => items.map((_, i) => i).filter((i) => pattern[i][j]));
  const mono = members.map((idx) => {
    let s = 0;
    let c = 0;
    for (let x = 0; x < idx.length; x++) for (let y = 0; y < x; y++, c++) s += correlations[idx[x]][idx[y]];
    return c > 0 ? s / c : null;
  });
  const out: HtmtPair[] = [];
  for (let j = 0; j < factors.length; j++) {
    for (let k = j + 1; k < factors.length; k++) {
      let s = 0;
      let c = 0;
      for (const a of members[j]) {
        for (const b of members[k]) {
          if (a === b) continue;
          s += correlations[a][b];
          c++;
        }
      }
      const mj = mono[j];
      const mk = mono[k];
      const value = mj !== null && mk !== null && mj * mk > 0 && c > 0 ? s / c / Math.sqrt(mj * mk) : null;
      out.push({
        a: factors[j],
        b: factors[k],
        value,
        verdict:
          value === null
            ? null
            : Math.abs(value) < HTMT_THRESHOLDS.strict
              ? 'below .85'
              : Math.abs(value) < HTMT_THRESHOLDS.lenient
                ? 'below .90'
                : 'at or above .90',
      });
    }
  }
  return out;
}

/** A correlation matrix from a covariance matrix. Cost O(p²). */
export function covarianceToCorrelation(cov: number[][]): number[][] {
  const sd = cov.map((r, i) => Math.sqrt(r[i]));
  return cov.map((r, i) => r.map((v, j) => (i === j ? 1 : v / (sd[i] * sd[j]))));
}
