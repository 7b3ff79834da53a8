import type { LogEntry } from '../../db/decision-log.ts';
import { PHASE_IDS, type PhaseId } from '../../db/repos/phase-state.ts';
import type { Study } from '../../db/study.ts';
import { PHASE_TITLES } from './titles.ts';

/** Log kinds of the phase actions themselves (sign-off and reopen). */
export const SIGNED_OFF = 'signed-off';
export const REOPENED = 'reopened';

/**
 * Log kinds that change no content: the phase actions, and analysis runs (which compute from
 * content but leave it as it was). Every other row of a phase changes what later phases rest on.
 */
const NOT_CONTENT = [SIGNED_OFF, REOPENED, 'analysis-run'] as const;

/** One logged change in an earlier phase, made after a later phase was signed off. */
export interface UpstreamChange {
  seq: number;
  at: string;
  /** The display name on the log row. */
  by: string;
  phase: PhaseId;
  phaseTitle: string;
  kind: string;
  target: string;
}

/** Why a signed-off phase needs review: what changed upstream, and since when. */
export interface SignOffReview {
  /** The sign-off the changes came after: its log row and time. */
  signedOffSeq: number;
  signedOffAt: string;
  /** Time of the first change after that sign-off. */
  since: string;
  /** Oldest first. */
  changes: UpstreamChange[];
}

function upstreamOf(phase: PhaseId): PhaseId[] {
  return PHASE_IDS.slice(0, PHASE_IDS.indexOf(phase));
}

function toChange(row: LogEntry): UpstreamChange {
  const phase = row.phase as PhaseId;
  return {
    seq: row.seq,
    at: row.at,
    by: row.actorName,
    phase,
    phaseTitle: PHASE_TITLES[phase] ?? row.phase,
    kind: row.kind,
    target: row.target,
  };
}

/**
 * The one rule for stale sign-offs: a signed-off phase needs review when an earlier phase has a
 * content-changing log row after the phase's latest sign-off row. Signing the phase off again
 * (after reading what changed) writes a newer sign-off row and so clears it. Returns null when the
 * phase is not signed off or nothing upstream changed since.
 */
export function signOffReview(study: Study, phase: PhaseId, signedOff: boolean): SignOffReview | null {
  if (!signedOff) return null;
  const signOff = study.log.latest(phase, SIGNED_OFF);
  if (!signOff) return null;
  const rows = study.log.after(signOff.seq, upstreamOf(phase), NOT_CONTENT);
  if (rows.length === 0) return null;
  return {
    signedOffSeq: signOff.seq,
    signedOffAt: signOff.at,
    since: rows[0].at,
    changes: rows.map(toChange),
  };
}
