import type { AlphaBand } from '../../../app/engine/reliability/alpha.ts';

import { NO_VALUE } from '../../shared/format.ts';

/** A share as a whole percentage. */
export function pct(x: number | null | undefined): string {
  if (x === null || x === undefined || !Number.isFinite(x)) return NO_VALUE;
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

export function shortDate(iso: string): string {
  return new Date(iso).toLocaleDateString(undefined, { year: 'numeric', month: 'short', day: 'numeric' });
}
