import { EngineError } from './errors.ts';
import { clampCorrelation, pairwiseMoments } from './covariance.ts';
import { covarianceMatrix } from './linalg.ts';
import { EPSILON, mean, meanAndVariance } from './numeric.ts';
import { itemColumns, type Responses, respondentCount, responseRows } from './responses.ts';
import type { ResponseMatrix, ScaleBounds } from './scoring.ts';

/** Descriptive statistics of one item over its answered values. */
export interface ItemDescriptives {
  name: string;
  /** Answered values the statistics use. */
  n: number;
  /** Missing answers (null) in the item's column of the matrix given. */
  missing: number;
  mean: number;
  /** Standard deviation with divisor n − 1. */
  sd: number;
  /** Adjusted Fisher–Pearson skewness G1; null below three values or without variance. */
  skewness: number | null;
  /** Excess kurtosis G2 (the bias-adjusted estimator); null below four values or without variance. */
  kurtosis: number | null;
  /** Share of answers at the declared minimum; null without declared bounds. */
  floorShare: number | null;
  /** Share of answers at the declared maximum; null without declared bounds. */
  ceilingShare: number | null;
}

/**
 * A value counts as at a declared bound when it is within this distance of it (answers are stored as
 * doubles; a bound of 1 and an answer of 1.0000000000001 after arithmetic are the same category).
 */
export const BOUND_TOLERANCE = 1e-9;

/** Standard deviations below this count as zero: the item does not vary. */
export const ZERO_VARIANCE = EPSILON;

/**
 * Item descriptives: mean, SD (divisor n − 1), skewness, excess kurtosis, floor and ceiling shares
 * against the declared bounds, and the missing count, each over the item's answered values.
 *
 * Skewness is the adjusted Fisher–Pearson coefficient G1 = √(n(n − 1))/(n − 2) · m₃/m₂^{3/2};
 * kurtosis is G2 = (n − 1)/((n − 2)(n − 3)) · ((n + 1)·(m₄/m₂² − 3) + 6), with mₚ the p-th central
 * moment (divisor n) — the estimators of Joanes & Gill (1998), as scipy.stats.skew/kurtosis with
 * bias=False. Floor and ceiling use the declared bounds, never the observed range.
 *
 * Cost: O(n·k).
 * Throws EngineError when an item has fewer than two answered values, when a value is not finite,
 * or when the names do not match the columns.
 */
export function itemDescriptives(names: string[], data: Responses, bounds?: ScaleBounds): ItemDescriptives[] {
  return descriptivesOfColumns(names, itemColumns(names, data), bounds);
}

/** The present (non-NaN) values of a column, in row order. */
function presentValues(column: Float64Array): Float64Array {
  let count = 0;
  for (let i = 0; i < column.length; i++) if (!Number.isNaN(column[i])) count++;
  if (count === column.length) return column;
  const values = new Float64Array(count);
  let at = 0;
  for (let i = 0; i < column.length; i++) {
    const v = column[i];
    if (!Number.isNaN(v)) values[at++] = v;
  }
  return values;
}

/** One column's answered values (in row order) with their mean and variance, as meanAndVariance gives them. */
export interface ColumnSummary {
  values: Float64Array;
  mean: number;
  variance: number;
}

/**
 * The second, third and fourth central moments (divisor n) about m, each a compensated sum as
 * kahanSum gives it, the three summed together in one pass.
 */
function centralMoments(values: Float64Array, m: number): { m2: number; m3: number; m4: number } {
  const n = values.length;
  let s2 = 0;
  let c2 = 0;
  let s3 = 0;
  let c3 = 0;
  let s4 = 0;
  let c4 = 0;
  for (let i = 0; i < n; i++) {
    const d = values[i] - m;
    const d2 = d * d;
    const d3 = d2 * d;
    const d4 = d2 * d2;
    const t2 = s2 + d2;
    c2 += Math.abs(s2) >= Math.abs(d2) ? s2 - t2 + d2 : d2 - t2 + s2;
    s2 = t2;
    const t3 = s3 + d3;
    c3 += Math.abs(s3) >= Math.abs(d3) ? s3 - t3 + d3 : d3 - t3 + s3;
    s3 = t3;
    const t4 = s4 + d4;
    c4 += Math.abs(s4) >= Math.abs(d4) ? s4 - t4 + d4 : d4 - t4 + s4;
    s4 = t4;
  }
  return { m2: (s2 + c2) / n, m3: (s3 + c3) / n, m4: (s4 + c4) / n };
}

/**
 * itemDescriptives of responses already held as columns (NaN for a missing answer, as
 * responseColumns gives them); the same statistics over the same values in the same order.
 *
 * Cost: O(n·k). Throws EngineError when an item has fewer than two answered values.
 */
export function descriptivesOfColumns(
  names: readonly string[],
  columns: readonly Float64Array[],
  bounds?: ScaleBounds,
  summaries?: readonly ColumnSummary[],
): ItemDescriptives[] {
  return names.map((name, c) => {
    const given = summaries?.[c];
    const values = given?.values ?? presentValues(columns[c]);
    const n = values.length;
    const missing = columns[c].length - n;
    if (n < 2) {
      throw new EngineError(
        `item "${name}" has ${n} answered value(s); item statistics require at least two`,
      );
    }
    const { mean: m, variance: v } = given ?? meanAndVariance(values);
    const sd = Math.sqrt(v);
    const { m2, m3, m4 } = centralMoments(values, m);
    const varies = sd > ZERO_VARIANCE;
    const skewness = varies && n >= 3 ? ((Math.sqrt(n * (n - 1)) / (n - 2)) * m3) / m2 ** 1.5 : null;
    const kurtosis =
      varies && n >= 4 ? ((n - 1) / ((n - 2) * (n - 3))) * ((n + 1) * (m4 / (m2 * m2) - 3) + 6) : null;
    let floorShare: number | null = null;
    let ceilingShare: number | null = null;
    if (bounds) {
      let atFloor = 0;
      let atCeiling = 0;
      for (let i = 0; i < n; i++) {
        const x = values[i];
        if (Math.abs(x - bounds.min) <= BOUND_TOLERANCE) atFloor++;
        if (Math.abs(x - bounds.max) <= BOUND_TOLERANCE) atCeiling++;
      }
      floorShare = atFloor / n;
      ceilingShare = atCeiling / n;
    }
    return { name, n, missing, mean: m, sd, skewness, kurtosis, floorShare, ceilingShare };
  });
}

/** How missing answers are handled: drop incomplete respondents, or use every pair's complete cases. */
export type MissingMethod = 'listwise' | 'pairwise';

/** Plain-language statement of each missing-data method, carried in every result. */
export const MISSING_METHOD_TEXT: Record<MissingMethod, string> = {
  listwise: 'listwise deletion: respondents with any missing answer among these items are left out',
  pairwise:
    'pairwise deletion: each correlation uses the respondents who answered both items; each item SD uses ' +
    'everyone who answered it; covariances are r·sᵢ·sⱼ',
};

/** Means, SDs, covariances and correlations of a set of items under one missing-data method. */
export interface ItemMoments {
  method: MissingMethod;
  /** Respondents analysed: complete cases (listwise) or those with at least one answer (pairwise). */
  n: number;
  /** Respondents left out (listwise: incomplete; pairwise: no answer at all). */
  dropped: number;
  /** The analysed rows (listwise: complete cases only), built when first asked for. */
  rows(): ResponseMatrix;
  /** Missing answers of each item among all the respondents given (analysed or not). */
  missingAll: number[];
  /** The analysed rows as one column per item, NaN for a missing answer. */
  columns: Float64Array[];
  /** Pairwise: each column's answered values with the mean and variance its SD came from. */
  summaries?: ColumnSummary[];
  means: number[];
  sds: number[];
  /** Whether each item's SD exceeds ZERO_VARIANCE. */
  varies: boolean[];
  /** k × k covariance matrix (divisor n − 1). */
  covariance: number[][];
  /** k × k Pearson correlations; null in the row and column of an item that does not vary. */
  correlation: (number | null)[][];
  /** Respondents behind each entry (listwise: n everywhere). */
  pairN: number[][];
  /** Smallest pairN off the diagonal (n with listwise deletion or a single item). */
  minPairN: number;
}

/**
 * Inter-item moments under listwise or pairwise deletion: item means and SDs, the covariance matrix
 * and the Pearson correlation matrix. Listwise: covariances of the complete cases (divisor n − 1),
 * correlations cᵢⱼ/√(cᵢᵢcⱼⱼ). Pairwise: each rᵢⱼ from the respondents answering both items, each SD
 * from everyone answering the item, and cᵢⱼ = rᵢⱼ·sᵢ·sⱼ so that the diagonal holds the item variances.
 * Correlations with an item that does not vary are undefined and given as null.
 *
 * Source: Pearson product-moment correlation; the deletion methods are standard (Little & Rubin 2002,
 * from memory). Cost: O(n·k²).
 * Throws EngineError when fewer than two respondents remain, when two items share fewer than two
 * respondents (pairwise), or when the rows do not match the item count.
 */
export function itemMoments(names: string[], data: Responses, method: MissingMethod): ItemMoments {
  const k = names.length;
  const total = respondentCount(data);
  const all = itemColumns(names, data);
  // answers[r]: the answers respondent r gave; listwise keeps those with all k, pairwise those with any.
  const answers = new Int32Array(total);
  const missingAll = all.map((column) => {
    let missing = 0;
    for (let r = 0; r < total; r++) {
      if (!Number.isNaN(column[r])) answers[r]++;
      else missing++;
    }
    return missing;
  });
  const keep: number[] = [];
  for (let r = 0; r < total; r++) {
    if (method === 'listwise' ? answers[r] === k : answers[r] > 0) keep.push(r);
  }
  const n = keep.length;
  let rowsKept: ResponseMatrix | undefined;
  const rows = (): ResponseMatrix => {
    if (rowsKept === undefined) {
      const matrix = responseRows(data);
      rowsKept = n === total ? matrix : keep.map((r) => matrix[r]);
    }
    return rowsKept;
  };
  if (n < 2) {
    const which =
      method === 'listwise' ? 'complete respondents (listwise deletion)' : 'respondents with answers';
    throw new EngineError(
      `item analysis requires at least two respondents; found ${n} ${which}`,
      'too-few-respondents',
    );
  }
  const columns = n === total ? all : all.map((column) => Float64Array.from(keep, (r) => column[r]));
  if (method === 'listwise') {
    const covariance = covarianceMatrix(rows() as number[][]);
    const sds = covariance.map((row, i) => Math.sqrt(Math.max(0, row[i])));
    const varies = sds.map((s) => s > ZERO_VARIANCE);
    const means = columns.map((column) => mean(column));
    const correlation = covariance.map((row, i) =>
      row.map((cij, j) => {
        if (!varies[i] || !varies[j]) return null;
        return i === j ? 1 : clampCorrelation(cij / (sds[i] * sds[j]));
      }),
    );
    const pairN = names.map(() => names.map(() => n));
    return {
      method,
      n,
      dropped: total - n,
      rows,
      missingAll,
      columns,
      means,
      sds,
      varies,
      covariance,
      correlation,
      pairN,
      minPairN: n,
    };
  }
  const answered = columns.map((column) => presentValues(column));
  answered.forEach((values, c) => {
    if (values.length < 2) {
      throw new EngineError(
        `item "${names[c]}" has ${values.length} answered value(s); at least two are required`,
      );
    }
  });
  const summaries = answered.map((values): ColumnSummary => ({ values, ...meanAndVariance(values) }));
  const means = summaries.map((s) => s.mean);
  const sds = summaries.map((s) => Math.sqrt(s.variance));
  const varies = sds.map((s) => s > ZERO_VARIANCE);
  const varying = names.map((_, c) => c).filter((c) => varies[c]);
  const moments = pairwiseMoments(columns);
  const pairN = moments.n;
  let minPairN = k > 1 ? Number.POSITIVE_INFINITY : n;
  for (let i = 0; i < k; i++) {
    for (let j = i + 1; j < k; j++) {
      if (pairN[i][j] < 2) {
        throw new EngineError(
          `items "${names[i]}" and "${names[j]}" were answered together by ${pairN[i][j]} respondent(s); ` +
            'pairwise deletion requires at least two',
          'too-few-respondents',
        );
      }
      minPairN = Math.min(minPairN, pairN[i][j]);
    }
  }
  const correlation: (number | null)[][] = names.map(() => names.map(() => null));
  for (const i of varying) {
    for (const j of varying) {
      const r = i === j ? 1 : moments.correlation[i][j];
      if (Number.isNaN(r)) {
        const flat = moments.constantOn[i][j] ? i : j;
        const other = flat === i ? j : i;
        throw new EngineError(
          `items "${names[flat]}" and "${names[other]}" have no correlation under pairwise deletion: ` +
            `"${names[flat]}" does not vary among the ${pairN[i][j]} respondents who answered both`,
          'no-variance',
        );
      }
      correlation[i][j] = r;
    }
  }
  const covariance = names.map((_, i) =>
    names.map((_, j) => {
      if (i === j) return sds[i] * sds[i];
      const r = correlation[i][j];
      return r === null ? 0 : r * sds[i] * sds[j];
    }),
  );
  return {
    method,
    n,
    dropped: total - n,
    rows,
    missingAll,
    columns,
    summaries,
    means,
    sds,
    varies,
    covariance,
    correlation,
    pairN,
    minPairN,
  };
}

/**
 * Corrected item-total correlation: r between each item and the sum of the other items, from the
 * covariance matrix: (Σⱼ≠ᵢ cᵢⱼ) / √(cᵢᵢ · Σⱼ,ₗ≠ᵢ cⱼₗ). `null` when the item or the rest does not vary.
 *
 * Source: items.corrected-item-total (the method registry). Cost: O(k²).
 * Throws nothing.
 */
export function correctedItemTotal(cov: readonly (readonly number[])[]): (number | null)[] {
  const rowSums = cov.map((row) => row.reduce((s, x) => s + x, 0));
  const total = rowSums.reduce((s, x) => s + x, 0);
  return cov.map((row, i) => {
    const itemVar = row[i];
    const restVar = total - 2 * rowSums[i] + itemVar;
    if (!(itemVar > ZERO_VARIANCE ** 2) || !(restVar > ZERO_VARIANCE ** 2)) return null;
    const r = (rowSums[i] - itemVar) / Math.sqrt(itemVar * restVar);
    return clampCorrelation(r);
  });
}
