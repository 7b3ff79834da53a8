import type { RoundJobOutput } from '../../workers/jobs.ts';
import type { FacetFactorRow } from './rules/factor.ts';
import type { ItemFlag } from './rules/flags.ts';

/** How often each response category was given (scored values: reverse-keyed items reversed). */
export interface ItemDistribution {
  /** Counts for each category from the declared minimum to the maximum. */
  counts: number[];
  missing: number;
  /** Answers that are not one of the categories (e.g. 2.5). */
  offCategory: number;
}

/** What a stored round's analysis run holds in `results`. */
export interface RoundResults extends RoundJobOutput {
  distributions: Record<string, ItemDistribution>;
  flags: Record<string, ItemFlag[]>;
  /** Facet-by-factor correspondence of the factor solution (absent in rounds stored before it). */
  correspondence?: FacetFactorRow[];
  /** Why the round has no factor analysis (absent in rounds stored before it). */
  factorNote?: string | null;
}
