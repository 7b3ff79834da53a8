/**
 * The item pool screen: items, their keying, source and state, facet coverage, wording checks.
 * Declared for the interface, which imports these from here and nothing else of the main side.
 */
export type { WordingCheck, WordingReport } from '../../engine/wording.ts';
export type { FacetCoverage, ItemView } from '../../phases/items/index.ts';
export type { ItemKeying, ItemSource, ItemState } from '../../../db/repos/items.ts';
