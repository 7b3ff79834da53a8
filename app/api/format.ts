/**
 * How Scalewright prints numbers, in the screens and the command line's tables alike: the trade's
 * conventions in one place. JSON output is never rounded; these functions are for people to read.
 *
 * - A statistic bounded by ±1 (r, alpha, omega, loadings, I-CVI, kappa) has no leading zero: `.842`.
 * - Other statistics (means, SDs, t, F, χ²) keep it: `3.41`, `0.52`.
 * - Negative values use the minus sign (U+2212), never a hyphen; a value that rounds to zero has no sign.
 * - p values read `p < .001` or `p = .034`, never in exponent notation.
 * - Counts carry thousands separators; durations carry units.
 */

/** The minus sign. */
export const MINUS = '\u2212';
/** Shown where a value was not computed or does not apply. */
export const NO_VALUE = '\u2013';

type Maybe = number | null | undefined;

function missing(x: Maybe): x is null | undefined {
  return x === null || x === undefined || !Number.isFinite(x);
}

/** Fixed decimals with the minus sign; never exponent notation, even for 1e21 or 7e-7. */
function fixed(x: number, digits: number): string {
  const abs = Math.abs(x);
  const text = abs < 1e21 ? abs.toFixed(digits) : BigInt(Math.round(abs)).toString();
  const grouped = text.replace(/^(\d+)/, (whole) => whole.replace(/\B(?=(\d{3})+(?!\d))/g, ','));
  return x < 0 && /[1-9]/.test(text) ? `${MINUS}${grouped}` : grouped;
}

/** A statistic bounded by ±1 (r, alpha, omega, a loading, I-CVI, kappa): `.842`, `−.120`, `1.000`. */
export function bounded(x: Maybe, digits = 3): string {
  if (missing(x)) return NO_VALUE;
  return fixed(x, digits).replace(/^(\u2212?)0\./, '$1.');
}

/**
 * A small bounded quantity (a determinant of a correlation matrix, a tiny share) to `significant`
 * digits, still without exponent notation: `.0000123`. Beyond `maxDigits` decimals it reads as zero.
 */
export function boundedSignificant(x: Maybe, significant = 3, maxDigits = 12): string {
  if (missing(x)) return NO_VALUE;
  const abs = Math.abs(x);
  const needed = abs === 0 ? 3 : significant - 1 - Math.floor(Math.log10(abs));
  return bounded(x, Math.max(3, Math.min(maxDigits, needed)));
}

/** An unbounded statistic (mean, SD, t, F, χ², skewness): `3.41`, `−0.52`, `1,204.50`. */
export function unbounded(x: Maybe, digits = 2): string {
  if (missing(x)) return NO_VALUE;
  return fixed(x, digits);
}

/** A p value as a table cell under a "p" header: `< .001`, `.034`, `1.000`. */
export function pCell(p: Maybe): string {
  if (missing(p)) return NO_VALUE;
  if (p < 0 || p > 1) throw new RangeError(`a p value lies between 0 and 1 (got ${p})`);
  if (p < 0.001) return '< .001';
  return bounded(p, 3);
}

/** A p value in running text: `p < .001`, `p = .034`. */
export function pValue(p: Maybe): string {
  const cell = pCell(p);
  if (cell === NO_VALUE) return `p ${NO_VALUE}`;
  return cell.startsWith('<') ? `p ${cell}` : `p = ${cell}`;
}

/** A count with thousands separators: `1,000`. */
export function count(n: Maybe): string {
  if (missing(n)) return NO_VALUE;
  return fixed(n, 0);
}

/** "1 respondent", "1,200 respondents". */
export function plural(n: number, one: string, many = `${one}s`): string {
  return `${count(n)} ${n === 1 ? one : many}`;
}

/** A share (0–1) as a percentage: `12.5%`. */
export function percent(share: Maybe, digits = 1): string {
  if (missing(share)) return NO_VALUE;
  return `${fixed(100 * share, digits)}%`;
}

/** A part of a whole as a percentage: `12.5%`; a dash when the whole is zero. */
export function percentOf(part: number, whole: number, digits = 1): string {
  return whole === 0 ? NO_VALUE : percent(part / whole, digits);
}

/** A duration with its unit: `850 ms`, `2.4 s`, `3 min 05 s`, `2 h 07 min`. */
export function duration(ms: Maybe): string {
  if (missing(ms)) return NO_VALUE;
  if (ms < 0) throw new RangeError(`a duration cannot be negative (got ${ms} ms)`);
  if (ms < 1_000) return `${Math.round(ms)} ms`;
  if (ms < 60_000) {
    const s = ms / 1_000;
    return s < 10 ? `${s.toFixed(1)} s` : `${Math.round(s)} s`;
  }
  const totalS = Math.round(ms / 1_000);
  if (totalS < 3_600) return `${Math.floor(totalS / 60)} min ${String(totalS % 60).padStart(2, '0')} s`;
  const totalMin = Math.round(ms / 60_000);
  return `${count(Math.floor(totalMin / 60))} h ${String(totalMin % 60).padStart(2, '0')} min`;
}

/**
 * One label per statistic, used by the screens and the command line's tables, so that the same
 * number carries the same name everywhere.
 */
export const STAT_LABELS = {
  n: 'n',
  k: 'k',
  missing: 'Missing',
  mean: 'Mean',
  sd: 'SD',
  skewness: 'Skew',
  kurtosis: 'Kurtosis',
  floor: 'Floor',
  ceiling: 'Ceiling',
  correctedItemTotal: 'Corrected item–total r',
  alphaIfDeleted: 'α if item deleted',
  alpha: 'Cronbach’s α',
  alphaStandardized: 'Standardized α',
  omegaTotal: 'McDonald’s ω total',
  meanInterItemR: 'Mean inter-item r',
  sem: 'SEM',
  mdc95: 'MDC95',
  criterion: 'Criterion',
  iCvi: 'I-CVI',
  modifiedKappa: 'Modified κ*',
  cvr: 'CVR',
  aikenV: 'Aiken’s V',
  sCviAve: 'S-CVI/Ave',
  sCviUa: 'S-CVI/UA',
  p: 'p',
} as const;

export type StatName = keyof typeof STAT_LABELS;

/** The name of a decimal mark, as a file-reading note says it. */
export const DECIMAL_MARK_NAME: Record<string, string> = { '.': 'point', ',': 'comma' };

/** A date without the time: `1 Dec 2026` (in the reader's locale). */
export function shortDate(iso: string): string {
  return new Date(iso).toLocaleDateString(undefined, { year: 'numeric', month: 'short', day: 'numeric' });
}

/**
 * Progress of a round's bootstrap, counted as the researcher asked for it: `resamples` for the
 * scale and again for each facet, e.g. "1,000 resamples for the scale and 4 facets: facet 2 of 4,
 * resample 600 of 1,000". `done` counts over all parts together.
 */
export function resampleProgress(done: number, resamples: number, facets: number): string {
  const parts = facets + 1;
  const what = facets === 0 ? 'the scale' : `the scale and ${plural(facets, 'facet')}`;
  const head = `${plural(resamples, 'resample')} for ${what}`;
  if (resamples <= 0) return head;
  const clamped = Math.min(Math.max(done, 0), resamples * parts);
  const part = Math.min(Math.floor(clamped / resamples), parts - 1);
  const within = clamped - part * resamples;
  const where = part === 0 ? 'scale' : `facet ${part} of ${facets}`;
  return `${head}: ${where}, resample ${count(within)} of ${count(resamples)}`;
}
