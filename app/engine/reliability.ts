import { EngineError } from './errors.ts';
import {
  correctedItemTotal,
  type ItemDescriptives,
  descriptivesOfColumns,
  itemMoments,
  MISSING_METHOD_TEXT,
  type MissingMethod,
} from './item-stats.ts';
import { alphaIfDeleted, type Coefficient, cronbachAlpha, standardizedAlpha } from './reliability/alpha.ts';
import { type BootstrapInterval, bootstrapAlpha } from './reliability/bootstrap.ts';
import { type FeldtInterval, feldtInterval } from './reliability/feldt.ts';
import { type OneFactorFit, omegaTotal } from './reliability/omega.ts';
import { type MeasurementError, measurementError } from './reliability/sem.ts';
import { oddEvenSplitHalf, type SplitHalf } from './reliability/split-half.ts';
import { type Responses, respondentCount, responseRows } from './responses.ts';
import { checkBounds, type ScaleBounds } from './scoring.ts';
import { guttmanLambda2, guttmanLambdas } from './factor/guttman.ts';
import { ENGINE_VERSION } from './version.ts';
import { ruleThreshold } from './methods/index.ts';

/** Confidence level used when none is given. */
export const DEFAULT_CI_LEVEL = 0.95;

/**
 * Below this many analysed respondents a warning says the estimates are unstable: the registry's
 * rule reliability.few-respondents (common practice, not a published cut-off).
 */
export const FEW_RESPONDENTS = ruleThreshold('reliability.few-respondents', 'minimum');

/** The seeded bootstrap of one round, with the hooks a worker uses to report progress and cancel. */
export interface BootstrapRequest {
  resamples: number;
  seed: number;
  onProgress?: (done: number, total: number) => void;
  shouldStop?: () => boolean;
}

/** One round of item analysis: which items, which responses, and how. */
export interface ItemAnalysisInput {
  names: string[];
  /** Rows = respondents, columns = items, already reverse-scored; null = missing. */
  /** By respondent or by item (see responses.ts). */
  data: Responses;
  missing: MissingMethod;
  /** Confidence level of the Feldt (and bootstrap) interval; default DEFAULT_CI_LEVEL. */
  ciLevel?: number;
  bootstrap?: BootstrapRequest;
  /** Declared scale bounds, for floor and ceiling shares. */
  bounds?: ScaleBounds;
}

/** Per-item results: descriptives plus the item's place in the scale. */
export interface ItemResult extends ItemDescriptives {
  /** r with the sum of the other items; null when the item or the rest does not vary. */
  correctedItemTotal: number | null;
  /** Alpha of the other items; null with two items (one would remain). */
  alphaIfDeleted: number | null;
}

/** Everything one round of item analysis reports. Never contains NaN or Infinity. */
export interface ItemAnalysis {
  engineVersion: string;
  /** The exact options the round ran with (callbacks left out). */
  inputs: {
    items: string[];
    missing: MissingMethod;
    ciLevel: number;
    bootstrap: { resamples: number; seed: number } | null;
    bounds: ScaleBounds | null;
  };
  missingData: {
    method: MissingMethod;
    description: string;
    /** Rows given. */
    respondents: number;
    /** Rows analysed (see `description`). */
    analysed: number;
    dropped: number;
    /** Fewest respondents behind any inter-item correlation. */
    minPairN: number;
  };
  n: number;
  k: number;
  items: ItemResult[];
  /** Inter-item Pearson correlations in item order; null beside an item that does not vary. */
  correlations: (number | null)[][];
  /** Mean of the off-diagonal correlations among items that vary; null when fewer than two vary. */
  meanInterItemR: number | null;
  alpha: Coefficient;
  /** From the mean inter-item correlation of the items that vary; null when fewer than two vary. */
  alphaStandardized: Coefficient | null;
  /** Feldt's interval; with pairwise deletion n is the smallest pairwise n (the cautious choice). */
  alphaCI: FeldtInterval;
  bootstrapCI: BootstrapInterval | null;
  /** From a one-factor model of the varying items' correlations (`items`, in loading order); null when fewer than three vary. */
  omegaTotal: (Coefficient & { items: string[]; fit: OneFactorFit }) | null;
  splitHalf: SplitHalf | null;
  /**
   * Guttman's λ₂ and λ₆ from the covariances of the items that vary (registry ids
   * `reliability.guttman-lambda2`, `reliability.guttman-lambda6`); null when fewer than two vary or
   * (λ₆) the covariance matrix is singular. Absent from analyses stored before they were added.
   */
  lambda2?: Coefficient | null;
  lambda6?: Coefficient | null;
  /** SEM and MDC95 of the sum score from alpha; null when alpha is above 1 (a non-PSD pairwise matrix). */
  measurementError: MeasurementError | null;
  warnings: string[];
}

function checkInput(input: ItemAnalysisInput): number {
  const { names, data } = input;
  if (names.length < 2) throw new EngineError('alpha requires at least two items', 'too-few-items');
  const seen = new Set<string>();
  for (const name of names) {
    if (name === '') throw new EngineError('every item needs a name', 'item');
    if (seen.has(name)) throw new EngineError(`item "${name}" is listed twice`, 'item');
    seen.add(name);
  }
  if (respondentCount(data) < 2) {
    throw new EngineError(
      `alpha requires at least two respondents (got ${respondentCount(data)})`,
      'too-few-respondents',
    );
  }
  if (input.missing !== 'listwise' && input.missing !== 'pairwise') {
    throw new EngineError(`missing-data method must be listwise or pairwise (got ${String(input.missing)})`);
  }
  const level = input.ciLevel ?? DEFAULT_CI_LEVEL;
  if (!(level > 0 && level < 1)) {
    throw new EngineError(`the confidence level must lie strictly between 0 and 1 (got ${level})`, 'level');
  }
  if (input.bounds) checkBounds(input.bounds);
  return level;
}

/** Throws if any number reachable from `value` is NaN or infinite: results must never carry them. */
function assertFiniteResult(value: unknown, path: string): void {
  if (typeof value === 'number') {
    if (!Number.isFinite(value))
      throw new EngineError(`item analysis produced a non-finite value at ${path}`);
  } else if (Array.isArray(value)) {
    value.forEach((v, i) => {
      assertFiniteResult(v, `${path}[${i}]`);
    });
  } else if (value !== null && typeof value === 'object') {
    for (const [key, v] of Object.entries(value)) assertFiniteResult(v, `${path}.${key}`);
  }
}

function fmt(x: number): string {
  return x.toFixed(3);
}

/**
 * One round of item analysis and reliability for a set of items — the single call the purification
 * workbench makes per round. From the (already reverse-scored) responses it computes, under the
 * chosen missing-data method: item descriptives, inter-item correlations, corrected item-total
 * correlations, Cronbach's alpha raw and standardized, alpha if
 * item deleted, the mean inter-item correlation, Feldt's interval, optionally a seeded percentile
 * bootstrap interval, McDonald's omega total from a one-factor model, odd–even split-half with
 * Spearman–Brown, and the SEM with MDC95. Problems that do not stop the analysis (zero-variance items,
 * few respondents, negative alpha, items correlating negatively with the rest) are returned in
 * `warnings`.
 *
 * Sources: Cronbach (1951); Feldt (1965); McDonald (1999); Spearman (1910) and Brown (1910); Efron &
 * Tibshirani (1993); see each part's function. Cost: O(n·k²) for the moments plus O(k³) per
 * one-factor iteration, plus the bootstrap's O(B·n·k) (listwise) or O(B·n·k²) (pairwise).
 * Throws EngineError with fewer than two items or respondents ("alpha requires at least two items"),
 * malformed rows, a non-finite value, an invalid confidence level or bounds, a total score that does
 * not vary, and from the bootstrap (including code "cancelled" when stopped).
 */
export function analyseItems(input: ItemAnalysisInput): ItemAnalysis {
  const level = checkInput(input);
  const { names, data, missing } = input;
  const k = names.length;
  const moments = itemMoments(names, data, missing);
  const n = moments.n;
  const warnings: string[] = [];

  if (missing === 'listwise' && moments.dropped > 0) {
    warnings.push(
      `listwise deletion left out ${moments.dropped} of ${respondentCount(data)} respondents with missing answers`,
    );
  }
  if (n < FEW_RESPONDENTS) {
    warnings.push(
      `only ${n} respondents were analysed; reliability estimates from fewer than ${FEW_RESPONDENTS} are unstable (common practice)`,
    );
  }
  if (n < k)
    warnings.push(`fewer respondents (${n}) than items (${k}): the item correlations are poorly determined`);
  const constant = names.filter((_, i) => !moments.varies[i]);
  if (constant.length > 0) {
    warnings.push(
      `zero-variance item(s) ${constant.map((c) => `"${c}"`).join(', ')}: every respondent gave the same answer; ` +
        'they add nothing to the total and are left out of correlations, standardized alpha and omega',
    );
  }

  const alphaValue = cronbachAlpha(moments.covariance);
  if (alphaValue < 0) {
    warnings.push(
      `alpha is negative (${fmt(alphaValue)}): the items covary negatively on average; check reverse keying`,
    );
  }
  if (alphaValue > 1) {
    warnings.push(
      `alpha exceeds 1 (${fmt(alphaValue)}): the pairwise covariance matrix is not positive semi-definite; ` +
        'use listwise deletion or look at the missing-data pattern',
    );
  }

  const descriptives = descriptivesOfColumns(names, moments.columns, input.bounds, moments.summaries);
  const corrected = correctedItemTotal(moments.covariance);
  const ifDeleted = alphaIfDeleted(moments.covariance);
  const items: ItemResult[] = descriptives.map((d, i) => ({
    ...d,
    // Rows left out of the analysis (an unanswered or, listwise, incomplete row) count as well.
    missing: d.missing + (missing === 'pairwise' ? moments.dropped : moments.missingAll[i]),
    correctedItemTotal: corrected[i],
    alphaIfDeleted: ifDeleted[i],
  }));
  for (const item of items) {
    if (item.correctedItemTotal !== null && item.correctedItemTotal < 0) {
      warnings.push(
        `item "${item.name}" correlates negatively with the rest of the items ` +
          `(corrected item-total r = ${fmt(item.correctedItemTotal)}); check its keying`,
      );
    }
  }

  const varying = names.map((_, i) => i).filter((i) => moments.varies[i]);
  let meanInterItemR: number | null = null;
  let alphaStandardized: Coefficient | null = null;
  if (varying.length >= 2) {
    let sum = 0;
    let pairs = 0;
    for (let a = 0; a < varying.length; a++) {
      for (let b = a + 1; b < varying.length; b++) {
        sum += moments.correlation[varying[a]][varying[b]] as number;
        pairs++;
      }
    }
    meanInterItemR = sum / pairs;
    try {
      alphaStandardized = { value: standardizedAlpha(meanInterItemR, varying.length) };
    } catch (error) {
      if (!(error instanceof EngineError)) throw error;
      warnings.push(error.message);
    }
  }

  let omega: ItemAnalysis['omegaTotal'] = null;
  if (varying.length >= 3) {
    const r = varying.map((i) => varying.map((j) => moments.correlation[i][j] as number));
    const used = varying.map((i) => names[i]);
    const result = omegaTotal(used, r);
    warnings.push(...result.warnings);
    omega = { value: result.value, items: used, fit: result.fit };
  } else {
    warnings.push('omega total needs at least three items that vary; it is not reported');
  }

  let splitHalf: SplitHalf | null = null;
  try {
    splitHalf = oddEvenSplitHalf(names, moments.covariance);
    if (splitHalf.spearmanBrown === null) {
      warnings.push(
        'the two odd–even halves do not correlate positively; the Spearman–Brown step-up is not reported',
      );
    }
  } catch (error) {
    if (!(error instanceof EngineError)) throw error;
    warnings.push(error.message);
  }

  let lambda2: Coefficient | null = null;
  let lambda6: Coefficient | null = null;
  if (varying.length >= 2) {
    const c = varying.map((i) => varying.map((j) => moments.covariance[i][j]));
    try {
      lambda2 = { value: guttmanLambda2(c) };
      const g = guttmanLambdas(c);
      if (Number.isFinite(g.lambda6)) lambda6 = { value: g.lambda6 };
      else warnings.push("Guttman's λ₆ is not reported: the item covariance matrix is singular");
    } catch (error) {
      if (!(error instanceof EngineError)) throw error;
      warnings.push(`Guttman's λ₆ is not reported: ${error.message}`);
    }
  }

  const feldtN = missing === 'pairwise' ? moments.minPairN : n;
  const alphaCI = feldtInterval(alphaValue, feldtN, k, level);

  let bootstrapCI: BootstrapInterval | null = null;
  if (input.bootstrap) {
    bootstrapCI = bootstrapAlpha(names, moments.rows(), missing, {
      resamples: input.bootstrap.resamples,
      seed: input.bootstrap.seed,
      level,
      onProgress: input.bootstrap.onProgress,
      shouldStop: input.bootstrap.shouldStop,
    });
    if (bootstrapCI.used < bootstrapCI.resamples) {
      warnings.push(
        `${bootstrapCI.resamples - bootstrapCI.used} bootstrap resample(s) had a total score without variance and were skipped`,
      );
    }
  }

  const sdTotal = Math.sqrt(moments.covariance.reduce((s, row) => s + row.reduce((t, x) => t + x, 0), 0));
  const sem = alphaValue <= 1 ? measurementError(sdTotal, alphaValue) : null;

  const result: ItemAnalysis = {
    engineVersion: ENGINE_VERSION,
    inputs: {
      items: names.slice(),
      missing,
      ciLevel: level,
      bootstrap: input.bootstrap
        ? { resamples: input.bootstrap.resamples, seed: input.bootstrap.seed }
        : null,
      bounds: input.bounds ? { min: input.bounds.min, max: input.bounds.max } : null,
    },
    missingData: {
      method: missing,
      description: MISSING_METHOD_TEXT[missing],
      respondents: respondentCount(data),
      analysed: n,
      dropped: moments.dropped,
      minPairN: moments.minPairN,
    },
    n,
    k,
    items,
    correlations: moments.correlation,
    meanInterItemR,
    alpha: { value: alphaValue },
    alphaStandardized,
    alphaCI,
    bootstrapCI,
    omegaTotal: omega,
    splitHalf,
    lambda2,
    lambda6,
    measurementError: sem,
    warnings,
  };
  assertFiniteResult(result, 'result');
  return result;
}

/** Item analysis of a whole scale and of each of its facets (facets in the order given). */
export interface ScaleAnalysis<K = string> {
  scale: ItemAnalysis;
  facets: { facet: K; analysis: ItemAnalysis }[];
}

/**
 * Runs `analyseItems` on the whole scale and on each facet's items with the same options and the same
 * bootstrap seed, so that facet and scale reliabilities come from one call. Under listwise deletion
 * every facet uses the scale's complete cases (a respondent who skipped an item of another facet is
 * left out of this facet too), so every alpha of one run rests on the same respondents; under pairwise
 * deletion each facet uses every answer it has. Bootstrap progress is counted over all the bootstraps
 * together (scale first, then the facets).
 *
 * Cost: that of analyseItems, once per facet plus once for the scale.
 * Throws EngineError when a facet names an item that is not in `names`, or a facet has fewer than two
 * items, and whatever analyseItems throws (`cancelled` when `bootstrap.shouldStop` says so).
 */
export function analyseScaleAndFacets<K extends string | number = string>(
  input: ItemAnalysisInput & { facets: readonly { facet: K; items: readonly string[] }[] },
): ScaleAnalysis<K> {
  const { facets, ...scaleInput } = input;
  const plan = facets.map(({ facet, items }) => {
    const columns = items.map((name) => {
      const index = input.names.indexOf(name);
      if (index < 0)
        throw new EngineError(`facet "${facet}" names item "${name}", which is not among the items`);
      return index;
    });
    if (columns.length < 2) {
      throw new EngineError(`facet "${facet}": alpha requires at least two items`, 'too-few-items');
    }
    return { facet, names: [...items], columns };
  });
  const each = input.bootstrap?.resamples ?? 0;
  const total = each * (plan.length + 1);
  let offset = 0;
  const analyse = (names: string[], data: Responses): ItemAnalysis => {
    const start = offset;
    offset += each;
    const bootstrap = input.bootstrap;
    return analyseItems({
      ...scaleInput,
      names,
      data,
      bootstrap: bootstrap && {
        ...bootstrap,
        onProgress: bootstrap.onProgress && ((done: number) => bootstrap.onProgress?.(start + done, total)),
      },
    });
  };
  const scale = analyse(input.names, input.data);
  const matrix = responseRows(input.data);
  const rows = input.missing === 'listwise' ? matrix.filter((row) => row.every((x) => x !== null)) : matrix;
  return {
    scale,
    facets: plan.map(({ facet, names, columns }) => ({
      facet,
      analysis: analyse(
        names,
        rows.map((row) => columns.map((c) => row[c])),
      ),
    })),
  };
}

/**
 * The registry ids of the methods and rules one item analysis actually used, in reporting order:
 * what a report's `methods` list and reference list cite. A part that was not computed (omega with
 * fewer than three varying items, no bootstrap asked for) is not listed.
 *
 * Cost: O(1). Throws nothing.
 */
export function itemAnalysisMethods(a: ItemAnalysis): string[] {
  const ids = ['scoring.reverse-keying', 'missing.deletion', 'items.descriptives', 'corr.pearson'];
  ids.push('items.corrected-item-total', 'alpha.cronbach', 'alpha.if-item-deleted');
  if (a.alphaStandardized) ids.push('alpha.standardized');
  ids.push('alpha.feldt-ci');
  if (a.bootstrapCI) ids.push('alpha.bootstrap-ci');
  if (a.omegaTotal) ids.push('omega.total', 'omega.one-factor-fit');
  if (a.splitHalf) ids.push('split-half.spearman-brown');
  if (a.lambda2) ids.push('reliability.guttman-lambda2');
  if (a.lambda6) ids.push('reliability.guttman-lambda6');
  if (a.measurementError) ids.push('sem.classical', 'sem.mdc95');
  if (a.n < FEW_RESPONDENTS) ids.push('reliability.few-respondents');
  return ids;
}
