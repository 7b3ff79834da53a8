import { EngineError } from './errors.ts';
import { clampCorrelation, pairwiseMoments } from './covariance.ts';
import { covarianceMatrix } from './linalg.ts';
import { Arena, asResident, type ResidentColumns } from './kernels/index.ts';
import { EPSILON, mean } from './numeric.ts';
import { itemColumns, type Responses, respondentCount, responseRows, tallyAnswers } from './responses.ts';
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

/** One column's answered values: how many, their mean and variance, and their central moments. */
export interface ColumnSummary {
  n: number;
  mean: number;
  /** Variance with divisor n − 1. */
  variance: number;
  /** Second, third and fourth central moments, divisor n. */
  m2: number;
  m3: number;
  m4: number;
}

/**
 * Summaries of columns (NaN for a missing answer) by the describePair kernel, two columns at a time:
 * over each column's answered values in row order, the mean and variance as meanAndVariance computes
 * them and the central moments, every sum compensated. With `bounds`, also how many answers lie at
 * each bound (within BOUND_TOLERANCE). Cost O(n·k).
 * Throws EngineError, through `tooFew`, for a column with fewer than two answered values, and for a
 * value that is not finite; the first column in order with either is named.
 */
export function summarizeColumns(
  given: readonly Float64Array[] | ResidentColumns,
  tooFew: (column: number, answered: number) => EngineError,
  bounds?: ScaleBounds,
): { summaries: ColumnSummary[]; atFloor: number[]; atCeiling: number[] } {
  const resident = asResident(given);
  const { arena, n, source: columns } = resident;
  const at = {
    scratchA: arena.f64(n, true),
    scratchB: arena.f64(n, true),
    out: arena.f64(16, true),
  };
  const memory = arena.ready();
  const { describePair, countNear } = arena.k;
  const column = (c: number) => resident.base + c * n * 8;
  const result = new Float64Array(memory, at.out, 16);
  const summaries: ColumnSummary[] = [];
  const atFloor: number[] = [];
  const atCeiling: number[] = [];
  const take = (c: number, offset: number, col: number) => {
    const [status, count, mean, variance, m2, m3, m4, bad] = result.subarray(offset, offset + 8);
    if (status === -2) throw tooFew(c, count);
    if (status >= 0) {
      throw new EngineError(`mean requires finite numbers; the value at index ${status} is ${bad}`);
    }
    summaries.push({ n: count, mean, variance, m2, m3, m4 });
    if (bounds) {
      atFloor.push(countNear(col, n, bounds.min, BOUND_TOLERANCE));
      atCeiling.push(countNear(col, n, bounds.max, BOUND_TOLERANCE));
    }
  };
  for (let c = 0; c < columns.length; c += 2) {
    const second = c + 1 < columns.length;
    describePair(column(c), second ? column(c + 1) : 0, n, at.scratchA, at.scratchB, at.out);
    take(c, 0, column(c));
    if (second) take(c + 1, 8, column(c + 1));
  }
  return { summaries, atFloor, atCeiling };
}

/**
 * How many answers of each column lie at the declared minimum and maximum (within BOUND_TOLERANCE).
 * Throws EngineError ('shape') for a column of another length than the first.
 */
function countsAtBounds(
  names: readonly string[],
  columns: readonly Float64Array[],
  bounds: ScaleBounds,
): { atFloor: number[]; atCeiling: number[] } {
  const n = columns[0]?.length ?? 0;
  const arena = new Arena();
  const col = arena.f64(n, true);
  const column = new Float64Array(arena.ready(), col, n);
  const { countNear } = arena.k;
  const atFloor: number[] = [];
  const atCeiling: number[] = [];
  columns.forEach((values, c) => {
    // A shorter column would be counted with the rest of the one before it.
    if (values.length !== n) {
      throw new EngineError(
        `item "${names[c]}" has ${values.length} values but item "${names[0]}" has ${n}; items must be of equal length`,
        'shape',
      );
    }
    column.set(values);
    atFloor.push(countNear(col, n, bounds.min, BOUND_TOLERANCE));
    atCeiling.push(countNear(col, n, bounds.max, BOUND_TOLERANCE));
  });
  return { atFloor, atCeiling };
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
  const tooFew = (c: number, n: number) =>
    new EngineError(`item "${names[c]}" has ${n} answered value(s); item statistics require at least two`);
  const described = summarizeColumns(summaries ? [] : columns, tooFew, bounds);
  const counted = summaries && bounds ? countsAtBounds(names, columns, bounds) : described;
  return names.map((name, c) => {
    const { n, mean: m, variance: v, m2, m3, m4 } = summaries?.[c] ?? described.summaries[c];
    const missing = columns[c].length - n;
    if (n < 2) throw tooFew(c, n);
    const sd = Math.sqrt(v);
    const varies = sd > ZERO_VARIANCE;
    const skewness = varies && n >= 3 ? ((Math.sqrt(n * (n - 1)) / (n - 2)) * m3) / m2 ** 1.5 : null;
    const kurtosis =
      varies && n >= 4 ? ((n - 1) / ((n - 2) * (n - 3))) * ((n + 1) * (m4 / (m2 * m2) - 3) + 6) : null;
    const floorShare = bounds ? counted.atFloor[c] / n : null;
    const ceilingShare = bounds ? counted.atCeiling[c] / n : null;
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
  /** Pairwise: each column's answered values summarized (the mean and variance its SD came from). */
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
  // answers[r]: the answers respondent r gave; listwise keeps those with all k, pairwise those with any.
  const { columns: all, answered: answers, missing: missingAll, resident } = tallyAnswers(names, data);
  const kept = (r: number) => (method === 'listwise' ? answers[r] === k : answers[r] > 0);
  let n = 0;
  for (let r = 0; r < total; r++) if (kept(r)) n++;
  // The rows kept, listed only when some are left out.
  const keep = new Int32Array(n === total ? 0 : n);
  if (n < total) for (let r = 0, at = 0; r < total; r++) if (kept(r)) keep[at++] = r;
  let rowsKept: ResponseMatrix | undefined;
  const rows = (): ResponseMatrix => {
    if (rowsKept === undefined) {
      const matrix = responseRows(data);
      rowsKept = n === total ? matrix : Array.from(keep, (r) => matrix[r]);
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
  const tooFew = (c: number, answered: number) =>
    new EngineError(`item "${names[c]}" has ${answered} answered value(s); at least two are required`);
  // The columns counted in the kernels' memory are summarized and paired there, unless rows were left out.
  const inKernels = resident && n === total ? resident : columns;
  const { summaries } = summarizeColumns(inKernels, tooFew);
  const means = summaries.map((s) => s.mean);
  const sds = summaries.map((s) => Math.sqrt(s.variance));
  const varies = sds.map((s) => s > ZERO_VARIANCE);
  const varying = names.map((_, c) => c).filter((c) => varies[c]);
  const moments = pairwiseMoments(inKernels);
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
