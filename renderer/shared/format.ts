/** How every screen prints numbers: the trade's conventions, one place. */
const MINUS = '\u2212';
/** Shown where a value was not computed. */
export const NO_VALUE = '\u2013';

/** A coefficient bounded by ±1 (alpha, r, I-CVI, kappa): no leading zero, a true minus sign. */
export function coef(x: number | null | undefined, digits = 3): string {
  if (x === null || x === undefined || !Number.isFinite(x)) return NO_VALUE;
  const text = Math.abs(x).toFixed(digits).replace(/^0\./, '.');
  return x < 0 && Number(text) !== 0 ? `${MINUS}${text}` : text;
}

/** A mean, SD or moment: fixed decimals with a true minus sign. */
export function num(x: number | null | undefined, digits = 2): string {
  if (x === null || x === undefined || !Number.isFinite(x)) return NO_VALUE;
  const text = Math.abs(x).toFixed(digits);
  return x < 0 && Number(text) !== 0 ? `${MINUS}${text}` : text;
}

/** "1 respondent", "12 respondents", "1,200 respondents". */
export function plural(n: number, one: string, many = `${one}s`): string {
  return `${n.toLocaleString('en')} ${n === 1 ? one : many}`;
}
