import { chiSquareSf } from './distributions.ts';
import { EngineError } from './errors.ts';
import { covarianceMatrix } from './linalg.ts';
import { cholesky } from './dense.ts';
import { ruleThreshold } from './methods/index.ts';
import { EPSILON, kahanSum } from './numeric.ts';

/**
 * Respondent screening: indices that point at careless or invalid responding. Screening proposes,
 * the researcher decides: every function returns flags with their reasons and never removes anyone.
 * Missing answers are NaN in the inputs and null in every output.
 */

/** Mahalanobis D² is flagged when its χ²(p) upper-tail probability is below this (rule screening.mahalanobis-alpha). */
export const MAHALANOBIS_ALPHA = ruleThreshold('screening.mahalanobis-alpha', 'alpha');

/**
 * Longstring is flagged when the longest run of identical answers covers at least this share of the
 * items a respondent answered (rule screening.longstring-share: common practice; cut-offs in the
 * literature vary with the scale).
 */
export const LONGSTRING_SHARE = ruleThreshold('screening.longstring-share', 'share');

/** Fewest answered items for which longstring and IRV are worth flagging (rule screening.longstring-share). */
export const MIN_ITEMS_FOR_PATTERN = ruleThreshold('screening.longstring-share', 'minimumItems');

/** IRV at or below this counts as no variation at all (identical answers to every item). */
export const IRV_FLOOR = EPSILON;

/** A response time below this fraction of the median marks a speeder (rule screening.speeder). */
export const SPEEDER_FRACTION = ruleThreshold('screening.speeder', 'fractionOfMedian');

/** A respondent who skipped more than this share of the items is flagged (rule screening.missing-share). */
export const MAX_MISSING_SHARE = ruleThreshold('screening.missing-share', 'maximumShare');

export type ScreeningCheck =
  | 'longstring'
  | 'irv'
  | 'mahalanobis'
  | 'attention'
  | 'duplicateId'
  | 'speeder'
  | 'missing';

export interface ScreeningFlag {
  check: ScreeningCheck;
  reason: string;
}

export type AttentionOutcome = 'pass' | 'fail' | 'missing';

export interface ScreeningInput {
  /** Respondent ids in data order. */
  ids: readonly string[];
  /** Item answers, one array per item, NaN for missing; all as long as `ids`. */
  items: readonly { name: string; values: ArrayLike<number> }[];
  /** Response durations (any unit), NaN for missing. */
  durations?: ArrayLike<number>;
  attention?: readonly { name: string; outcomes: readonly AttentionOutcome[] }[];
  /** File row of each respondent, for messages; default position + 2 (header on row 1). */
  rowNumbers?: readonly number[];
}

export interface ScreeningOptions {
  longstringShare?: number;
  mahalanobisAlpha?: number;
  speederFraction?: number;
  maxMissingShare?: number;
}

export interface RespondentScreening {
  index: number;
  id: string;
  answered: number;
  missing: number;
  longstring: number;
  /** SD across the respondent's answered items (divisor n − 1); null with fewer than two answers. */
  irv: number | null;
  /** Null for respondents with a missing answer or when D² could not be computed. */
  mahalanobis: number | null;
  mahalanobisP: number | null;
  duration: number | null;
  flags: ScreeningFlag[];
}

export interface ScreeningResult {
  respondents: RespondentScreening[];
  /** Respondents with at least one flag. */
  flagged: number;
  missingPerItem: { name: string; missing: number }[];
  /** The thresholds actually used, so the proposal can be reported with them. */
  thresholds: {
    longstringShare: number;
    mahalanobisAlpha: number;
    mahalanobisDf: number;
    speederFraction: number;
    speederBelow: number | null;
    maxMissingShare: number;
    medianDuration: number | null;
  };
  warnings: string[];
}

/**
 * Longstring index: the longest run of identical consecutive answers, in item order (registry:
 * screening.longstring). A missing answer ends a run. Cost O(k). Throws nothing.
 *
 * @example longstring([3, 3, 3, 1, 3]) // 3
 */
export function longstring(answers: ArrayLike<number>): number {
  let best = 0;
  let run = 0;
  let previous = Number.NaN;
  for (let i = 0; i < answers.length; i++) {
    const v = answers[i];
    if (Number.isNaN(v)) {
      run = 0;
      previous = Number.NaN;
      continue;
    }
    run = v === previous ? run + 1 : 1;
    previous = v;
    if (run > best) best = run;
  }
  return best;
}

/**
 * Intra-individual response variability: the standard deviation (divisor n − 1) of one respondent's
 * answered items (registry: screening.irv). Returns null with fewer than
 * two answers. Cost O(k). Throws nothing.
 *
 * @example intraIndividualVariability([1, 2, 3, 4]) // 1.2909944487358056
 */
export function intraIndividualVariability(answers: ArrayLike<number>): number | null {
  const present: number[] = [];
  for (let i = 0; i < answers.length; i++) if (!Number.isNaN(answers[i])) present.push(answers[i]);
  const n = present.length;
  if (n < 2) return null;
  const m = kahanSum(present) / n;
  const dev = present.map((v) => (v - m) * (v - m));
  return Math.sqrt(kahanSum(dev) / (n - 1));
}

/**
 * Squared Mahalanobis distance of each complete row from the centroid, D² = (x − x̄)ᵀS⁻¹(x − x̄) with
 * the sample covariance S (divisor n − 1), and its upper-tail probability under χ² with p degrees of
 * freedom (screening.mahalanobis; the cut-off is rule screening.mahalanobis-alpha).
 * S⁻¹ is applied by solving with the Cholesky factor of S (S = L·Lᵀ, D² = ‖L⁻¹(x − x̄)‖²), never by
 * inverting S. Source: screening.mahalanobis, linalg.cholesky (the method registry).
 * Cost O(n·p² + p³). Throws EngineError "Mahalanobis distance requires more complete rows than items"
 * and "covariance matrix is singular" when an item is constant or the items are linearly dependent.
 */
export function mahalanobisDistances(rows: readonly (readonly number[])[]): { d2: number[]; p: number[] } {
  const n = rows.length;
  const k = n > 0 ? rows[0].length : 0;
  if (k === 0) throw new EngineError('Mahalanobis distance requires at least one item');
  if (n <= k + 1) {
    throw new EngineError(
      `Mahalanobis distance requires more complete rows than items plus one (${n} rows, ${k} items)`,
    );
  }
  const data = rows.map((r) => [...r]);
  const s = covarianceMatrix(data);
  // D² = ‖z‖² with L·z = x − x̄ and S = L·Lᵀ: one Cholesky factor, then a triangular solve per row;
  // S⁻¹ is never formed.
  let l: number[][];
  try {
    l = cholesky(s);
  } catch (error) {
    if (error instanceof EngineError && error.code === 'not-positive-definite') {
      throw new EngineError(
        "the items' covariance matrix is singular (an item is constant or a linear combination of others)",
        'singular',
      );
    }
    throw error;
  }
  const means = new Float64Array(k);
  for (let j = 0; j < k; j++) {
    const column = new Float64Array(n);
    for (let i = 0; i < n; i++) column[i] = data[i][j];
    means[j] = kahanSum(column) / n;
  }
  const d2: number[] = [];
  const p: number[] = [];
  const z = new Float64Array(k);
  for (let i = 0; i < n; i++) {
    let sum = 0;
    for (let a = 0; a < k; a++) {
      const la = l[a];
      let v = data[i][a] - means[a];
      for (let b = 0; b < a; b++) v -= la[b] * z[b];
      z[a] = v / la[a];
      sum += z[a] * z[a];
    }
    d2.push(sum);
    p.push(chiSquareSf(sum, k));
  }
  return { d2, p };
}

function median(values: number[]): number {
  const sorted = [...values].sort((a, b) => a - b);
  const mid = sorted.length >> 1;
  return sorted.length % 2 === 1 ? sorted[mid] : (sorted[mid - 1] + sorted[mid]) / 2;
}

function checkShare(value: number, name: string): number {
  if (!(value >= 0 && value <= 1)) throw new EngineError(`${name} must lie between 0 and 1, got ${value}`);
  return value;
}

/**
 * Screens respondents: longstring, IRV, Mahalanobis D² with its χ² p (complete cases), failed
 * attention checks, duplicate ids, speeders (duration below SPEEDER_FRACTION × median when durations
 * are given) and too many missing answers, plus missing counts per item and respondent. Sources as in
 * the functions above (Meade & Craig 2012; Curran 2016, from memory). Proposes flags with reasons;
 * decides nothing. Cost O(n·k² + k³).
 * Throws EngineError when there are no items, when an item or the durations or an attention check do
 * not have one value per respondent, or when a threshold is out of range. Mahalanobis D² that cannot be
 * computed (too few complete rows, linearly dependent items) becomes a warning, not an error.
 */
export function screenRespondents(input: ScreeningInput, options: ScreeningOptions = {}): ScreeningResult {
  const n = input.ids.length;
  const k = input.items.length;
  if (k === 0) throw new EngineError('screening requires at least one item');
  for (const item of input.items) {
    if (item.values.length !== n) {
      throw new EngineError(
        `screening requires one answer per respondent; item ${item.name} has ${item.values.length}, ids ${n}`,
      );
    }
  }
  if (input.durations && input.durations.length !== n) {
    throw new EngineError(
      `screening requires one duration per respondent; got ${input.durations.length}, ids ${n}`,
    );
  }
  for (const check of input.attention ?? []) {
    if (check.outcomes.length !== n) {
      throw new EngineError(
        `screening requires one outcome per respondent; attention check ${check.name} has ${check.outcomes.length}, ids ${n}`,
      );
    }
  }
  const longstringShare = checkShare(options.longstringShare ?? LONGSTRING_SHARE, 'longstring share');
  const mahalanobisAlpha = checkShare(options.mahalanobisAlpha ?? MAHALANOBIS_ALPHA, 'Mahalanobis alpha');
  const speederFraction = checkShare(options.speederFraction ?? SPEEDER_FRACTION, 'speeder fraction');
  const maxMissingShare = checkShare(options.maxMissingShare ?? MAX_MISSING_SHARE, 'missing share');
  const rowOf = (i: number) => input.rowNumbers?.[i] ?? i + 2;
  const warnings: string[] = [];

  const missingPerItem = input.items.map((item) => {
    let missing = 0;
    for (let i = 0; i < n; i++) if (Number.isNaN(item.values[i])) missing++;
    return { name: item.name, missing };
  });

  const answers = new Float64Array(k);
  const respondents: RespondentScreening[] = [];
  const completeRows: number[][] = [];
  const completeIndex: number[] = [];
  for (let i = 0; i < n; i++) {
    let missing = 0;
    for (let j = 0; j < k; j++) {
      answers[j] = input.items[j].values[i];
      if (Number.isNaN(answers[j])) missing++;
    }
    const answered = k - missing;
    const run = longstring(answers);
    const irv = intraIndividualVariability(answers);
    const flags: ScreeningFlag[] = [];
    if (answered >= MIN_ITEMS_FOR_PATTERN && run >= Math.max(2, Math.ceil(longstringShare * answered))) {
      flags.push({
        check: 'longstring',
        reason: `the same answer ${run} times in a row (of ${answered} answered items)`,
      });
    }
    if (answered >= MIN_ITEMS_FOR_PATTERN && irv !== null && irv <= IRV_FLOOR) {
      flags.push({ check: 'irv', reason: `no variation: the same answer to all ${answered} answered items` });
    }
    if (missing > 0 && missing / k > maxMissingShare) {
      flags.push({
        check: 'missing',
        reason: `${missing} of ${k} items unanswered, more than ${Math.round(maxMissingShare * 100)}%`,
      });
    }
    const raw = input.durations ? input.durations[i] : Number.NaN;
    respondents.push({
      index: i,
      id: input.ids[i],
      answered,
      missing,
      longstring: run,
      irv,
      mahalanobis: null,
      mahalanobisP: null,
      duration: Number.isNaN(raw) ? null : raw,
      flags,
    });
    if (missing === 0) {
      completeRows.push(Array.from(answers));
      completeIndex.push(i);
    }
  }

  try {
    const { d2, p } = mahalanobisDistances(completeRows);
    for (let c = 0; c < completeIndex.length; c++) {
      const r = respondents[completeIndex[c]];
      r.mahalanobis = d2[c];
      r.mahalanobisP = p[c];
      if (p[c] < mahalanobisAlpha) {
        r.flags.push({
          check: 'mahalanobis',
          reason: `Mahalanobis D² = ${d2[c].toFixed(2)} on ${k} df, p = ${p[c].toExponential(2)} < ${mahalanobisAlpha}`,
        });
      }
    }
    if (completeIndex.length < n) {
      warnings.push(`Mahalanobis D² uses the ${completeIndex.length} respondents who answered every item`);
    }
  } catch (e) {
    if (!(e instanceof EngineError)) throw e;
    warnings.push(`Mahalanobis D² was not computed: ${e.message}`);
  }

  for (const check of input.attention ?? []) {
    check.outcomes.forEach((outcome, i) => {
      if (outcome === 'fail') {
        respondents[i].flags.push({
          check: 'attention',
          reason: `wrong answer to attention check ${check.name}`,
        });
      } else if (outcome === 'missing') {
        respondents[i].flags.push({
          check: 'attention',
          reason: `attention check ${check.name} left unanswered`,
        });
      }
    });
  }

  const byId = new Map<string, number[]>();
  input.ids.forEach((id, i) => {
    const list = byId.get(id);
    if (list) list.push(i);
    else byId.set(id, [i]);
  });
  for (const [id, list] of byId) {
    if (list.length < 2) continue;
    const rows = list.map(rowOf).join(', ');
    for (const i of list) {
      respondents[i].flags.push({
        check: 'duplicateId',
        reason: `id '${id}' appears ${list.length} times (rows ${rows})`,
      });
    }
  }

  let medianDuration: number | null = null;
  let speederBelow: number | null = null;
  if (input.durations) {
    const present = respondents.map((r) => r.duration).filter((d): d is number => d !== null);
    if (present.length === 0) {
      warnings.push('the duration column has no values; speeders were not checked');
    } else {
      medianDuration = median(present);
      speederBelow = speederFraction * medianDuration;
      for (const r of respondents) {
        if (r.duration !== null && r.duration < speederBelow) {
          r.flags.push({
            check: 'speeder',
            reason: `took ${r.duration}, under ${speederFraction} × the median ${medianDuration} = ${speederBelow}`,
          });
        }
      }
    }
  }

  return {
    respondents,
    flagged: respondents.filter((r) => r.flags.length > 0).length,
    missingPerItem,
    thresholds: {
      longstringShare,
      mahalanobisAlpha,
      mahalanobisDf: k,
      speederFraction,
      speederBelow,
      maxMissingShare,
      medianDuration,
    },
    warnings,
  };
}
