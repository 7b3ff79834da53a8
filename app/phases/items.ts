import { phaseNotYetAvailable } from './later.ts';
import type { PhaseRules } from './types.ts';

export const itemsRules: PhaseRules = phaseNotYetAvailable(
  'items',
  'Draft the item pool, map each item to a facet, and check its wording.',
);
