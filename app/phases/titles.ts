import type { PhaseId } from '../../db/repos/phase-state.ts';

export const PHASE_TITLES: Record<PhaseId, string> = {
  construct: 'Construct',
  items: 'Item pool',
  review: 'Expert review',
  pilot: 'Pilot data',
  purification: 'Purification',
  validity: 'Validity evidence',
  appendix: 'Methods appendix',
};
