/**
 * The construct screen: facets, relations to other constructs.
 * Declared for the interface, which imports these from here and nothing else of the main side.
 */
export type { RelationInput } from '../../phases/construct/index.ts';
export type { FacetRecord, RelationRecord } from '../../../db/repos/construct.ts';
