import type { PhaseId } from '../../db/repos/phase-state.ts';
import type { PhaseRules } from './types.ts';

/**
 * Rules for a phase whose screens are not in this version yet: it holds nothing and cannot be
 * signed off, and the overview says so plainly.
 */
export function phaseNotYetAvailable(id: PhaseId, purpose: string): PhaseRules {
  return {
    id,
    purpose,
    holds: () => [],
    checklist: () => [
      {
        id: 'available',
        label: 'The tools for this phase are available in this version of Scalewright',
        met: false,
        detail: 'not in this version yet',
      },
    ],
  };
}
