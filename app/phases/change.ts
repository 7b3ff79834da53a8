import { type RunInput, insertRun } from '../../db/repos/analysis-runs.ts';
import {
  type PhaseId,
  type PhaseStatus,
  getPhaseStatus,
  setPhaseStatus,
} from '../../db/repos/phase-state.ts';
import type { ChangeEntry, Study } from '../../db/study.ts';
import { ENGINE_VERSION } from '../engine/version.ts';
import { RuleError } from './errors.ts';
import { PHASE_TITLES } from './titles.ts';

export type PhaseEntry = Omit<ChangeEntry, 'phase'> & { phase: PhaseId };

/** Refuses work on a signed-off phase; returns the phase's state before the change. */
export function requireOpen(study: Study, phase: PhaseId): PhaseStatus {
  const status = getPhaseStatus(study, phase);
  if (status === 'signed-off') {
    throw new RuleError(
      `the ${PHASE_TITLES[phase]} phase is signed off; reopen it (with a reason) before changing it`,
      'signed-off',
    );
  }
  return status;
}

function markStarted(study: Study, phase: PhaseId, status: PhaseStatus): void {
  if (status === 'not-started') setPhaseStatus(study, phase, 'in-progress');
}

/**
 * The one way a phase changes the study: refuses changes to a signed-off phase, moves a phase
 * that has not started to "in progress", and stores the change with its log row in one
 * transaction.
 */
export function changeInPhase<T>(study: Study, entry: PhaseEntry, apply: () => T): T {
  const status = requireOpen(study, entry.phase);
  return study.change(entry, () => {
    markStarted(study, entry.phase, status);
    return apply();
  });
}

/**
 * Stores an analysis run (inputs, options, seed, engine version, results) and its log row in one
 * transaction, and returns the run's id, which later decisions cite. The log row carries a digest
 * of the run as stored, which verify recomputes. `alongside` stores what belongs with the run
 * (a round that cites it) in the same change, so that the row's content digest covers it too.
 */
export function recordRun(
  study: Study,
  run: Omit<RunInput, 'engineVersion'> & { phase: PhaseId; label: string },
  alongside?: (runId: number) => void,
): number {
  const status = requireOpen(study, run.phase);
  return study.change(
    (runId: number) => ({
      phase: run.phase,
      kind: 'analysis-run',
      target: run.label,
      runId,
      detail: { analysis: run.kind, seed: run.seed ?? null },
    }),
    () => {
      markStarted(study, run.phase, status);
      const runId = insertRun(study, { ...run, engineVersion: ENGINE_VERSION });
      alongside?.(runId);
      return runId;
    },
  );
}
