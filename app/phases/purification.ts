import { phaseNotYetAvailable } from './later.ts';
import type { PhaseRules } from './types.ts';

export const purificationRules: PhaseRules = phaseNotYetAvailable(
  'purification',
  'Analyse items and reliability in rounds; keep or drop items with reasons.',
);
