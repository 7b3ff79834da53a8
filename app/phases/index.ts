import {
  PHASE_IDS,
  type PhaseId,
  getPhaseStatus,
  setPhaseStatus,
  type PhaseStatus,
} from '../../db/repos/phase-state.ts';
import type { Study } from '../../db/study.ts';
import { appendixRules } from './appendix/rules.ts';
import { constructRules } from './construct/index.ts';
import { itemsRules } from './items/index.ts';
import { pilotRules } from './pilot/index.ts';
import { purificationRules } from './purification/index.ts';
import { reviewRules } from './review/index.ts';
import { validityRules } from './validity/index.ts';
import { RuleError } from './errors.ts';
import { REOPENED, SIGNED_OFF, type SignOffReview, signOffReview } from './stale.ts';
import { PHASE_TITLES } from './titles.ts';
import type { ChecklistItem, PhaseRules } from './types.ts';

export type { SignOffReview, UpstreamChange } from './stale.ts';

/** Every phase's rules, in the order a scale is built. */
export const PHASE_RULES: Record<PhaseId, PhaseRules> = {
  construct: constructRules,
  items: itemsRules,
  review: reviewRules,
  pilot: pilotRules,
  purification: purificationRules,
  validity: validityRules,
  appendix: appendixRules,
};

export interface PhaseOverview {
  id: PhaseId;
  title: string;
  purpose: string;
  status: PhaseStatus;
  holds: string[];
  checklist: ChecklistItem[];
  /**
   * For a signed-off phase whose earlier phases changed after its sign-off: what changed and since
   * when. Signing off again, once the checklist is met, clears it. Null otherwise.
   */
  needsReview: SignOffReview | null;
  /** Why sign-off is not possible now; empty when it is. */
  blockers: string[];
}

function previousPhase(phase: PhaseId): PhaseId | undefined {
  const index = PHASE_IDS.indexOf(phase);
  return index > 0 ? PHASE_IDS[index - 1] : undefined;
}

export function phaseOverview(study: Study, phase: PhaseId): PhaseOverview {
  const rules = PHASE_RULES[phase];
  const checklist = rules.checklist(study);
  const before = previousPhase(phase);
  if (before) {
    const beforeStatus = getPhaseStatus(study, before);
    checklist.unshift({
      id: 'previous-signed-off',
      label: `The ${PHASE_TITLES[before]} phase is signed off`,
      met: beforeStatus === 'signed-off',
      detail: beforeStatus.replace('-', ' '),
    });
  }
  const status = getPhaseStatus(study, phase);
  const needsReview = signOffReview(study, phase, status === 'signed-off');
  const blockers = checklist.filter((c) => !c.met).map((c) => `${c.label}: ${c.detail}`);
  if (status === 'signed-off' && !needsReview) blockers.unshift('already signed off');
  return {
    id: phase,
    title: PHASE_TITLES[phase],
    purpose: rules.purpose,
    status,
    holds: rules.holds(study),
    checklist,
    needsReview,
    blockers,
  };
}

export function studyOverview(study: Study): PhaseOverview[] {
  return PHASE_IDS.map((phase) => phaseOverview(study, phase));
}

/**
 * Signs a phase off: every checklist item must be met and the note is logged with the checklist.
 * A signed-off phase that needs review (earlier phases changed since) may be signed off again in
 * place: the note then says why it is still valid, and the log row lists the changes it reviewed.
 */
export function signOffPhase(study: Study, phase: PhaseId, rationale: string): void {
  const overview = phaseOverview(study, phase);
  if (overview.status === 'signed-off' && !overview.needsReview)
    throw new RuleError(`the ${overview.title} phase is already signed off`);
  if (rationale.trim() === '')
    throw new RuleError(
      overview.needsReview
        ? `say why the ${overview.title} phase is still valid after the changes before it`
        : `give a sign-off note for the ${overview.title} phase`,
    );
  if (overview.blockers.length > 0) {
    throw new RuleError(
      `the ${overview.title} phase cannot be signed off yet: ${overview.blockers.join('; ')}`,
      'gate',
    );
  }
  const reviewed = overview.needsReview?.changes.map((c) => c.seq);
  study.change(
    {
      phase,
      kind: SIGNED_OFF,
      target: `${overview.title} phase`,
      rationale,
      detail: { checklist: overview.checklist, ...(reviewed ? { reviewedChanges: reviewed } : {}) },
    },
    () => setPhaseStatus(study, phase, 'signed-off'),
  );
}

/** Reopens a signed-off phase; the reason is required and logged. */
export function reopenPhase(study: Study, phase: PhaseId, rationale: string): void {
  const status = getPhaseStatus(study, phase);
  const title = PHASE_TITLES[phase];
  if (status !== 'signed-off')
    throw new RuleError(`the ${title} phase is not signed off, so there is nothing to reopen`);
  if (rationale.trim() === '') throw new RuleError(`say why the ${title} phase is reopened`);
  study.change({ phase, kind: REOPENED, target: `${title} phase`, rationale }, () =>
    setPhaseStatus(study, phase, 'reopened'),
  );
}
