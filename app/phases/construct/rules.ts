import { getConstruct, listFacets, listRelations } from '../../../db/repos/construct.ts';
import type { ChecklistItem, PhaseRules } from '../types.ts';

/** Common practice: a definition that can guide item writing takes more than a phrase. */
export const MIN_DEFINITION_WORDS = 15;

export function wordCount(text: string): number {
  return text.trim() === '' ? 0 : text.trim().split(/\s+/u).length;
}

function filled(id: string, label: string, value: string, what: string): ChecklistItem {
  return { id, label, met: value.trim() !== '', detail: value.trim() !== '' ? 'stated' : `no ${what} yet` };
}

export const constructRules: PhaseRules = {
  id: 'construct',
  purpose:
    'Define what the scale measures, its facets, who it is for, and how it is expected to relate to other constructs.',
  holds(study) {
    const c = getConstruct(study);
    const facets = listFacets(study);
    const relations = listRelations(study);
    return [
      c.name.trim() === '' ? 'unnamed construct' : c.name,
      `${facets.length} facet${facets.length === 1 ? '' : 's'}`,
      `${relations.length} planned relation${relations.length === 1 ? '' : 's'}`,
      `${c.responsePoints}-point response format`,
    ];
  },
  checklist(study) {
    const c = getConstruct(study);
    const facets = listFacets(study);
    const undefinedFacets = facets.filter((f) => f.definition.trim() === '');
    const relations = listRelations(study);
    const words = wordCount(c.definition);
    const labelled = c.anchors.filter((a) => a.trim() !== '').length;
    return [
      filled('name', 'The construct has a name', c.name, 'name'),
      {
        id: 'definition',
        label: `The definition has at least ${MIN_DEFINITION_WORDS} words (common practice: precise enough to guide item writing)`,
        met: words >= MIN_DEFINITION_WORDS,
        detail: `${words} word${words === 1 ? '' : 's'}`,
      },
      filled('includes', 'The domain says what it includes', c.includes, 'statement of what is included'),
      filled('excludes', 'The domain says what it excludes', c.excludes, 'statement of what is excluded'),
      {
        id: 'facets',
        label: 'At least one facet, each with a definition',
        met: facets.length > 0 && undefinedFacets.length === 0,
        detail:
          facets.length === 0
            ? 'no facets yet'
            : undefinedFacets.length > 0
              ? `no definition for ${undefinedFacets.map((f) => `"${f.name}"`).join(', ')}`
              : `${facets.length} defined`,
      },
      filled('population', 'The target population is stated', c.population, 'target population'),
      filled('uses', 'The intended uses are stated', c.intendedUses, 'intended uses'),
      {
        id: 'anchors',
        label: 'The response format labels at least its two end points',
        met: (c.anchors[0] ?? '').trim() !== '' && (c.anchors[c.anchors.length - 1] ?? '').trim() !== '',
        detail: `${labelled} of ${c.responsePoints} points labelled`,
      },
      {
        id: 'relations',
        label: 'At least one planned relation to another construct (these become the validity hypotheses)',
        met: relations.length > 0,
        detail: `${relations.length} planned`,
      },
    ];
  },
};
