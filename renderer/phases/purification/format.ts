import type { AlphaBand } from '../../../app/engine/reliability/alpha.ts';

const MINUS = '\u2212';
const DASH = '\u2014';

/** A coefficient bounded by ±1 (alpha, r): three decimals, no leading zero, a true minus sign. */
export function coef(x: number | null | undefined, digits = 3): string {
  if (x === null || x === undefined || !Number.isFinite(x)) return DASH;
  const text = Math.abs(x).toFixed(digits).replace(/^0\./, '.');
  return x < 0 && Number(text) !== 0 ? `${MINUS}${text}` : text;
}

/** A mean, SD or moment: two decimals with a true minus sign. */
export function num(x: number | null | undefined, digits = 2): string {
  if (x === null || x === undefined || !Number.isFinite(x)) return DASH;
  const text = Math.abs(x).toFixed(digits);
  return x < 0 && Number(text) !== 0 ? `${MINUS}${text}` : text;
}

/** A share as a whole percentage. */
export function pct(x: number | null | undefined): string {
  if (x === null || x === undefined || !Number.isFinite(x)) return DASH;
  return `${Math.round(x * 100)}%`;
}

/** Common-practice bands in words, as shown beside every alpha. */
export const BAND_WORDS: Record<AlphaBand, string> = {
  good: 'good',
  acceptable: 'acceptable',
  questionable: 'questionable',
  unacceptable: 'unacceptable',
};

export const BAND_LEGEND =
  'Bands (common practice): .80 and above good, .70 to .80 acceptable, .60 to .70 questionable, below .60 unacceptable. A band describes a value; it is not a verdict.';

export function plural(n: number, one: string, many = `${one}s`): string {
  return `${n} ${n === 1 ? one : many}`;
}

export function shortDate(iso: string): string {
  return new Date(iso).toLocaleDateString(undefined, { year: 'numeric', month: 'short', day: 'numeric' });
}
