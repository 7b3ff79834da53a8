/**
 * The expert review screen: rounds, per-item results and decisions.
 * Declared for the interface, which imports these from here and nothing else of the main side.
 */
export type { RoundItemView, RoundView } from '../../phases/review/index.ts';
export type { Decision } from '../../../db/repos/review.ts';
