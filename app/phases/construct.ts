import {
  type ConstructTextField,
  type ExpectedSign,
  type ExpectedStrength,
  type RelationKind,
  getConstruct,
  getFacet,
  getRelation,
  insertFacet,
  insertRelation,
  listFacets,
  listRelations,
  orderFacets,
  setConstructText,
  setFacetRetired,
  setRelationRetired,
  setResponseFormat,
  setScoreUse,
  updateFacet,
  updateRelation,
} from '../../db/repos/construct.ts';
import type { Study } from '../../db/study.ts';
import {
  SCORE_USE_LABEL,
  SCORE_USES,
  type ScoreUse,
  reliabilityCriterion,
} from '../engine/reliability/criterion.ts';
import { changeInPhase } from './change.ts';
import { RuleError } from './errors.ts';
import type { ChecklistItem, PhaseRules } from './types.ts';

/** Common practice: a definition that can guide item writing takes more than a phrase. */
export const MIN_DEFINITION_WORDS = 15;

const FIELD_LABEL: Record<ConstructTextField, string> = {
  name: 'construct name',
  definition: 'definition',
  includes: 'what the domain includes',
  excludes: 'what the domain excludes',
  population: 'target population',
  intendedUses: 'intended uses',
};

export function wordCount(text: string): number {
  return text.trim() === '' ? 0 : text.trim().split(/\s+/u).length;
}

export function constructView(study: Study) {
  return {
    construct: getConstruct(study),
    facets: listFacets(study, { includeRetired: true }),
    relations: listRelations(study, { includeRetired: true }),
    /** The uses of scores to choose from, each with the reliability criterion it sets. */
    scoreUses: SCORE_USES.map((use) => ({
      use,
      label: SCORE_USE_LABEL[use],
      minimum: reliabilityCriterion(use).minimum,
      source: reliabilityCriterion(use).citation,
    })),
  };
}

export function updateConstructText(study: Study, field: ConstructTextField, value: string): void {
  const before = getConstruct(study)[field];
  if (before === value) return;
  changeInPhase(
    study,
    { phase: 'construct', kind: 'edit', target: FIELD_LABEL[field], detail: { field, before, after: value } },
    () => setConstructText(study, field, value),
  );
}

/**
 * States what the scores will be used for, which sets the reliability criterion shown beside every
 * alpha (registry `reliability.criterion.*`). Logged with the use before and after.
 */
export function updateScoreUse(study: Study, use: ScoreUse | null): void {
  const before = getConstruct(study).scoreUse;
  if (before === use) return;
  changeInPhase(
    study,
    {
      phase: 'construct',
      kind: 'edit',
      target: 'use of scores',
      detail: {
        field: 'scoreUse',
        before,
        after: use,
        label: use === null ? 'not stated' : SCORE_USE_LABEL[use],
      },
    },
    () => setScoreUse(study, use),
  );
}

export function updateResponseFormat(study: Study, points: number, min: number, anchors: string[]): void {
  if (!Number.isInteger(points) || points < 2 || points > 11) {
    throw new RuleError(`response format needs 2 to 11 points, not ${points}`);
  }
  if (anchors.length !== points) {
    throw new RuleError(
      `response format has ${points} points but ${anchors.length} anchor labels; give one label per point (blank allowed)`,
    );
  }
  const before = getConstruct(study);
  changeInPhase(
    study,
    {
      phase: 'construct',
      kind: 'edit',
      target: 'response format',
      detail: {
        before: { points: before.responsePoints, min: before.responseMin, anchors: before.anchors },
        after: { points, min, anchors },
      },
    },
    () => setResponseFormat(study, points, min, anchors),
  );
}

function requireFacet(study: Study, id: number) {
  const facet = getFacet(study, id);
  if (!facet) throw new RuleError(`facet ${id} does not exist in this study`, 'not-found');
  return facet;
}

function requireUniqueFacetName(study: Study, name: string, exceptId?: number): string {
  const trimmed = name.trim();
  if (trimmed === '') throw new RuleError('a facet needs a name');
  const clash = listFacets(study).find(
    (f) => f.name.toLowerCase() === trimmed.toLowerCase() && f.id !== exceptId,
  );
  if (clash) throw new RuleError(`a facet named "${clash.name}" already exists`);
  return trimmed;
}

export function addFacet(study: Study, name: string, definition: string): number {
  const clean = requireUniqueFacetName(study, name);
  return changeInPhase(
    study,
    {
      phase: 'construct',
      kind: 'facet-added',
      target: `facet "${clean}"`,
      detail: { name: clean, definition },
    },
    () => insertFacet(study, clean, definition),
  );
}

export function editFacet(study: Study, id: number, fields: { name?: string; definition?: string }): void {
  const facet = requireFacet(study, id);
  const name = fields.name === undefined ? undefined : requireUniqueFacetName(study, fields.name, id);
  const changed: Record<string, { before: string; after: string }> = {};
  if (name !== undefined && name !== facet.name) changed.name = { before: facet.name, after: name };
  if (fields.definition !== undefined && fields.definition !== facet.definition) {
    changed.definition = { before: facet.definition, after: fields.definition };
  }
  if (Object.keys(changed).length === 0) return;
  changeInPhase(
    study,
    {
      phase: 'construct',
      kind: changed.name ? 'facet-renamed' : 'facet-edited',
      target: `facet "${facet.name}"`,
      detail: { facetId: id, ...changed },
    },
    () => updateFacet(study, id, { name, definition: fields.definition }),
  );
}

export function moveFacet(study: Study, id: number, toIndex: number): void {
  const facet = requireFacet(study, id);
  if (facet.retiredAt) throw new RuleError(`facet "${facet.name}" is retired; restore it before moving it`);
  const order = listFacets(study).map((f) => f.id);
  const from = order.indexOf(id);
  const to = Math.max(0, Math.min(order.length - 1, toIndex));
  if (from === to) return;
  order.splice(from, 1);
  order.splice(to, 0, id);
  changeInPhase(
    study,
    {
      phase: 'construct',
      kind: 'facet-moved',
      target: `facet "${facet.name}"`,
      detail: { from: from + 1, to: to + 1 },
    },
    () => orderFacets(study, order),
  );
}

export function retireFacet(study: Study, id: number, rationale: string): void {
  const facet = requireFacet(study, id);
  if (facet.retiredAt) throw new RuleError(`facet "${facet.name}" is already retired`);
  if (rationale.trim() === '') throw new RuleError(`say why facet "${facet.name}" is retired`);
  changeInPhase(
    study,
    {
      phase: 'construct',
      kind: 'facet-retired',
      target: `facet "${facet.name}"`,
      rationale,
      detail: { facetId: id },
    },
    () => setFacetRetired(study, id, new Date().toISOString()),
  );
}

export function restoreFacet(study: Study, id: number, rationale: string): void {
  const facet = requireFacet(study, id);
  if (!facet.retiredAt) throw new RuleError(`facet "${facet.name}" is not retired`);
  requireUniqueFacetName(study, facet.name, id);
  changeInPhase(
    study,
    {
      phase: 'construct',
      kind: 'facet-restored',
      target: `facet "${facet.name}"`,
      rationale,
      detail: { facetId: id },
    },
    () => {
      setFacetRetired(study, id, null);
      orderFacets(study, [
        ...listFacets(study)
          .map((f) => f.id)
          .filter((f) => f !== id),
        id,
      ]);
    },
  );
}

export interface RelationInput {
  otherConstruct: string;
  kind: RelationKind;
  expectedSign: ExpectedSign;
  expectedStrength: ExpectedStrength;
  measure: string;
  rationale: string;
}

function checkRelation(r: RelationInput): RelationInput {
  const otherConstruct = r.otherConstruct.trim();
  if (otherConstruct === '') throw new RuleError('a planned relation needs the other construct');
  if (r.expectedSign === 'none' && r.expectedStrength !== 'near-zero') {
    throw new RuleError('a relation expected to have no sign must have near-zero strength');
  }
  return { ...r, otherConstruct };
}

export function addRelation(study: Study, input: RelationInput): number {
  const r = checkRelation(input);
  return changeInPhase(
    study,
    {
      phase: 'construct',
      kind: 'relation-planned',
      target: `relation to "${r.otherConstruct}"`,
      rationale: r.rationale,
      detail: { ...r },
    },
    () => insertRelation(study, r),
  );
}

export function editRelation(study: Study, id: number, input: RelationInput): void {
  const before = getRelation(study, id);
  if (!before) throw new RuleError(`planned relation ${id} does not exist in this study`, 'not-found');
  const r = checkRelation(input);
  changeInPhase(
    study,
    {
      phase: 'construct',
      kind: 'relation-edited',
      target: `relation to "${r.otherConstruct}"`,
      rationale: r.rationale,
      detail: { relationId: id, before, after: r },
    },
    () => updateRelation(study, id, r),
  );
}

export function retireRelation(study: Study, id: number, rationale: string): void {
  const before = getRelation(study, id);
  if (!before) throw new RuleError(`planned relation ${id} does not exist in this study`, 'not-found');
  if (before.retiredAt)
    throw new RuleError(`the relation to "${before.otherConstruct}" is already withdrawn`);
  if (rationale.trim() === '')
    throw new RuleError(`say why the relation to "${before.otherConstruct}" is withdrawn`);
  changeInPhase(
    study,
    {
      phase: 'construct',
      kind: 'relation-withdrawn',
      target: `relation to "${before.otherConstruct}"`,
      rationale,
      detail: { relationId: id },
    },
    () => setRelationRetired(study, id, new Date().toISOString()),
  );
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
