import { type PhaseId, getPhaseStatus, setPhaseStatus } from '../../db/repos/phase-state.ts';
import type { ChangeEntry, Study } from '../../db/study.ts';
import { RuleError } from './errors.ts';
import { PHASE_TITLES } from './titles.ts';

/**
 * The one way a phase changes the study: refuses changes to a signed-off phase, moves a phase
 * that has not started to "in progress", and stores the change with its log row in one
 * transaction.
 */
export function changeInPhase<T>(
  study: Study,
  entry: Omit<ChangeEntry, 'phase'> & { phase: PhaseId },
  apply: () => T,
): T {
  const status = getPhaseStatus(study, entry.phase);
  if (status === 'signed-off') {
    throw new RuleError(
      `the ${PHASE_TITLES[entry.phase]} phase is signed off; reopen it (with a reason) before changing it`,
      'signed-off',
    );
  }
  return study.change(entry, () => {
    if (status === 'not-started') setPhaseStatus(study, entry.phase, 'in-progress');
    return apply();
  });
}
