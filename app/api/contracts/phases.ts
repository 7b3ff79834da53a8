/**
 * The phases as screens show them: ids, titles, states, checklists, the overview and sign-off review.
 * Declared for the interface, which imports these from here and nothing else of the main side.
 */
export type { PhaseOverview, SignOffReview } from '../../phases/index.ts';
export { PHASE_TITLES } from '../../phases/titles.ts';
export type { ChecklistItem } from '../../phases/types.ts';
export { PHASE_IDS } from '../../../db/repos/phase-state.ts';
export type { PhaseId, PhaseStatus } from '../../../db/repos/phase-state.ts';
