import type { PhaseId } from '../../db/repos/phase-state.ts';
import type { Study } from '../../db/study.ts';

/** One condition for signing a phase off, shown to the researcher with the reason it matters. */
export interface ChecklistItem {
  id: string;
  label: string;
  met: boolean;
  /** What is there now, or what is missing. */
  detail: string;
}

/** What a phase module tells the overview. */
export interface PhaseRules {
  id: PhaseId;
  /** One line saying what the phase is for. */
  purpose: string;
  /** Short facts about what the phase holds ("4 facets", "31 items"). */
  holds(study: Study): string[];
  checklist(study: Study): ChecklistItem[];
}
