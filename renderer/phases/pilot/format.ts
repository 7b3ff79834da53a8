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
