import { getItem, listItems } from '../../../db/repos/items.ts';
import {
  countExpertRatings,
  deleteExpert,
  type ExpertRecord,
  getExpert,
  getForm,
  insertExpert,
  insertRound,
  listExperts,
  listRoundItems,
  listRounds,
  type ReviewForm,
  setForm,
  setRoundItems,
  updateExpert,
} from '../../../db/repos/review.ts';
import type { Study } from '../../../db/study.ts';
import { EXPERT_CODE_PATTERN } from '../../import/ratings/index.ts';

import { changeInPhase } from '../change.ts';
import { RuleError } from '../errors.ts';
import {
  DEFAULT_FORM,
  type RoundScope,
  countWord,
  requireRound,
  requireUnrated,
  roundCandidates,
} from './round-data.ts';

/**
 * Starts a review round over the items kept for review (or only those reworded since their last
 * rating). The panel and the rating form are copied from the previous round, if any.
 */
export function addRound(study: Study, input: { label: string; scope: RoundScope }): number {
  const rounds = listRounds(study);
  const previous = rounds.at(-1);
  if (input.scope === 'revised' && !previous) {
    throw new RuleError('there is no earlier round, so no item has been reworded since its rating');
  }
  const items = roundCandidates(study, input.scope);
  if (items.length === 0) {
    throw new RuleError(
      input.scope === 'kept'
        ? "no items are kept for review: in the item pool, mark the items that go to the experts as 'kept for review'"
        : 'no kept item has been reworded since it was last rated',
    );
  }
  const form = previous ? getForm(study, previous.id) : DEFAULT_FORM;
  const panel = previous ? listExperts(study, previous.id) : [];
  const number = rounds.length + 1;
  return changeInPhase(
    study,
    {
      phase: 'review',
      kind: 'round-started',
      target: `round ${number}`,
      detail: {
        label: input.label.trim(),
        scope: input.scope,
        items: items.map((it) => it.code),
        panelCopied: panel.map((e) => e.code),
        form,
      },
    },
    () => {
      const id = insertRound(study, input.label.trim(), form, new Date().toISOString());
      setRoundItems(
        study,
        id,
        items.map((it) => it.id),
      );
      for (const e of panel) insertExpert(study, id, e);
      return id;
    },
  );
}

/** Brings an unrated round's item list up to date with the items now kept for review. */
export function syncRoundItems(study: Study, roundId: number): void {
  const round = requireRound(study, roundId);
  requireUnrated(study, round, 'its item list');
  const kept = listItems(study).filter((it) => it.state === 'kept');
  const before = new Set(listRoundItems(study, roundId).map((ri) => ri.itemId));
  const codes = (ids: Iterable<number>) => [...ids].map((id) => getItem(study, id)?.code ?? String(id));
  const added = kept.filter((it) => !before.has(it.id)).map((it) => it.id);
  const removed = [...before].filter((id) => !kept.some((it) => it.id === id));
  if (added.length === 0 && removed.length === 0) return;
  changeInPhase(
    study,
    {
      phase: 'review',
      kind: 'round-items-updated',
      target: `round ${round.number}`,
      detail: { added: codes(added), removed: codes(removed) },
    },
    () =>
      setRoundItems(
        study,
        roundId,
        kept.map((it) => it.id),
      ),
  );
}

/** Changes what the round's rating form asks; only before any rating has come back. */
export function updateForm(
  study: Study,
  roundId: number,
  form: Omit<ReviewForm, 'relevanceMin' | 'relevanceMax'>,
) {
  const round = requireRound(study, roundId);
  requireUnrated(study, round, 'the rating form');
  const before = getForm(study, roundId);
  const after: ReviewForm = { ...before, ...form, instructions: form.instructions.trim() };
  if (JSON.stringify(before) === JSON.stringify(after)) return;
  changeInPhase(
    study,
    {
      phase: 'review',
      kind: 'form-changed',
      target: `round ${round.number} rating form`,
      detail: { before, after },
    },
    () => setForm(study, roundId, after),
  );
}

export interface ExpertInput {
  code: string;
  role: string;
  name: string;
  nameWithheld: boolean;
}

function checkExpert(study: Study, roundId: number, input: ExpertInput, exceptId?: number): ExpertInput {
  const code = input.code.trim();
  if (!EXPERT_CODE_PATTERN.test(code)) {
    throw new RuleError(
      code === ''
        ? 'an expert needs an id code (e.g. E1); names are optional'
        : `expert code "${code}" cannot be used: start with a letter or digit and use up to 40 letters, digits, dots, dashes or underscores`,
    );
  }
  const clash = listExperts(study, roundId).find(
    (e) => e.code.toLowerCase() === code.toLowerCase() && e.id !== exceptId,
  );
  if (clash) throw new RuleError(`expert ${clash.code} is already on this round's panel`);
  const name = input.name.trim();
  return { code, role: input.role.trim(), name, nameWithheld: name !== '' && input.nameWithheld };
}

/** What the log may say about an expert: code and role, never the name (see migration 0002). */
function publicExpert(e: ExpertInput) {
  return { code: e.code, role: e.role, named: e.name !== '', nameWithheld: e.nameWithheld };
}

/** Adds an expert to a round's panel: an id code, and optionally a role and a name (which can be withheld). */
export function addExpert(study: Study, roundId: number, input: ExpertInput): number {
  const round = requireRound(study, roundId);
  const expert = checkExpert(study, roundId, input);
  return changeInPhase(
    study,
    {
      phase: 'review',
      kind: 'expert-added',
      target: `expert ${expert.code} (round ${round.number})`,
      detail: publicExpert(expert),
    },
    () => insertExpert(study, roundId, expert),
  );
}

function requireExpert(study: Study, id: number): ExpertRecord {
  const expert = getExpert(study, id);
  if (!expert) throw new RuleError(`expert ${id} does not exist in this study`, 'not-found');
  return expert;
}

/** Changes an expert's code, role, name or whether the name is withheld. */
export function editExpert(study: Study, id: number, input: ExpertInput): void {
  const before = requireExpert(study, id);
  const round = requireRound(study, before.roundId);
  const after = checkExpert(study, before.roundId, input, id);
  if (
    before.code === after.code &&
    before.role === after.role &&
    before.name === after.name &&
    before.nameWithheld === after.nameWithheld
  ) {
    return;
  }
  changeInPhase(
    study,
    {
      phase: 'review',
      kind: 'expert-edited',
      target: `expert ${before.code} (round ${round.number})`,
      detail: { before: publicExpert(before), after: publicExpert(after) },
    },
    () => updateExpert(study, id, after),
  );
}

/** Takes an expert off a round's panel; only while the expert has no ratings in it. */
export function removeExpert(study: Study, id: number): void {
  const expert = requireExpert(study, id);
  const round = requireRound(study, expert.roundId);
  const ratings = countExpertRatings(study, id);
  if (ratings > 0) {
    throw new RuleError(
      `expert ${expert.code} has ${countWord(ratings, 'rating')} in round ${round.number}; withdraw the import that brought them before removing the expert`,
    );
  }
  changeInPhase(
    study,
    {
      phase: 'review',
      kind: 'expert-removed',
      target: `expert ${expert.code} (round ${round.number})`,
      detail: publicExpert(expert),
    },
    () => deleteExpert(study, id),
  );
}
