import { phaseNotYetAvailable } from './later.ts';
import type { PhaseRules } from './types.ts';

export const reviewRules: PhaseRules = phaseNotYetAvailable(
  'review',
  'Have experts rate each item; compute content-validity statistics and decide.',
);
