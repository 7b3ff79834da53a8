import { listFacets } from '../../../db/repos/construct.ts';
import { listItems } from '../../../db/repos/items.ts';
import { checkItemWording } from '../../engine/wording.ts';
import type { ChecklistItem, PhaseRules } from '../types.ts';
import { activeItems, coverageOf, MIN_ITEMS_PER_FACET } from './views.ts';

export const itemsRules: PhaseRules = {
  id: 'items',
  purpose: 'Draft the item pool, map each item to a facet, and check its wording.',
  holds(study) {
    const all = listItems(study);
    const active = all.filter((it) => it.state !== 'retired');
    const reverse = active.filter((it) => it.keying === 'reverse').length;
    const retired = all.length - active.length;
    const flagged = active.filter((it) => checkItemWording(it.text).flags.length > 0).length;
    return [
      `${active.length} item${active.length === 1 ? '' : 's'}${retired > 0 ? ` (${retired} retired)` : ''}`,
      `${reverse} reverse-keyed`,
      `${flagged} with wording flags`,
    ];
  },
  checklist(study) {
    const facets = listFacets(study);
    const active = activeItems(study);
    const coverage = coverageOf(facets, active);
    const thin = coverage.filter((c) => c.items < MIN_ITEMS_PER_FACET);
    const facetIds = new Set(facets.map((f) => f.id));
    const unmapped = active.filter((it) => it.facetId === null || !facetIds.has(it.facetId));
    const drafts = active.filter((it) => it.state === 'draft');
    const list = (codes: readonly string[]) =>
      codes.length > 6 ? `${codes.slice(0, 6).join(', ')} and ${codes.length - 6} more` : codes.join(', ');
    const items: ChecklistItem[] = [
      {
        id: 'pool',
        label: 'The pool holds items',
        met: active.length > 0,
        detail: `${active.length} item${active.length === 1 ? '' : 's'}`,
      },
      {
        id: 'mapped',
        label: 'Every item is mapped to an active facet',
        met: active.length > 0 && unmapped.length === 0,
        detail: unmapped.length === 0 ? 'all mapped' : `not mapped: ${list(unmapped.map((it) => it.code))}`,
      },
      {
        id: 'coverage',
        label: `Every facet has at least ${MIN_ITEMS_PER_FACET} items (common practice: several times the final number)`,
        met: facets.length > 0 && thin.length === 0,
        detail:
          facets.length === 0
            ? 'no facets defined'
            : thin.length === 0
              ? `${Math.min(...coverage.map((c) => c.items))} or more per facet`
              : thin.map((c) => `${c.facetName}: ${c.items}`).join('; '),
      },
      {
        id: 'triaged',
        label: 'No item is left as a draft: each is kept for review or retired',
        met: active.length > 0 && drafts.length === 0,
        detail: drafts.length === 0 ? 'none left' : `drafts: ${list(drafts.map((it) => it.code))}`,
      },
    ];
    return items;
  },
};
