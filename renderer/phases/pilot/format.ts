/** "1 respondent", "12 respondents". */
export function plural(n: number, word: string, many = `${word}s`): string {
  return `${n.toLocaleString('en')} ${n === 1 ? word : many}`;
}

/** "12.3 KB" for file sizes. */
export function formatBytes(bytes: number): string {
  if (bytes < 1024) return `${bytes} bytes`;
  if (bytes < 1024 * 1024) return `${(bytes / 1024).toFixed(1)} KB`;
  return `${(bytes / 1024 / 1024).toFixed(1)} MB`;
}

/** A statistic for a table cell: fixed decimals, a dash when there is none. */
export function fixed(x: number | null | undefined, digits = 2): string {
  return x === null || x === undefined || !Number.isFinite(x) ? '–' : x.toFixed(digits);
}

/** A p-value: "< .001" below a thousandth, else three decimals without the leading zero. */
export function pValue(p: number | null | undefined): string {
  if (p === null || p === undefined || !Number.isFinite(p)) return '–';
  if (p < 0.001) return '< .001';
  return p.toFixed(3).replace(/^0/, '');
}

/** A share as a percentage with one decimal. */
export function percent(part: number, whole: number): string {
  return whole === 0 ? '–' : `${((100 * part) / whole).toFixed(1)}%`;
}

export const DECIMAL_NAME: Record<string, string> = { '.': 'point', ',': 'comma' };
