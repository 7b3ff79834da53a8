import { phaseNotYetAvailable } from './later.ts';
import type { PhaseRules } from './types.ts';

export const pilotRules: PhaseRules = phaseNotYetAvailable(
  'pilot',
  'Import pilot responses, map columns, set missing codes, screen respondents.',
);
