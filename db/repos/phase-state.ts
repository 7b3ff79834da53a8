import type { Study } from '../study.ts';

export const PHASE_IDS = [
  'construct',
  'items',
  'review',
  'pilot',
  'purification',
  'validity',
  'appendix',
] as const;
export type PhaseId = (typeof PHASE_IDS)[number];
export type PhaseStatus = 'not-started' | 'in-progress' | 'signed-off' | 'reopened';

export function getPhaseStatus(study: Study, phase: PhaseId): PhaseStatus {
  const row = study.db.prepare('SELECT state FROM phase_state WHERE phase = ?').get(phase) as
    | { state: PhaseStatus }
    | undefined;
  return row?.state ?? 'not-started';
}

export function setPhaseStatus(study: Study, phase: PhaseId, state: PhaseStatus): void {
  study.db
    .prepare(
      `INSERT INTO phase_state (phase, state, changed_at) VALUES (?, ?, ?)
       ON CONFLICT (phase) DO UPDATE SET state = excluded.state, changed_at = excluded.changed_at`,
    )
    .run(phase, state, new Date().toISOString());
}
