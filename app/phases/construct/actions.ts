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
  orderFacets,
  setConstructText,
  setFacetRetired,
  setRelationRetired,
  setResponseFormat,
  setScoreUse,
  updateFacet,
  updateRelation,
} from '../../../db/repos/construct.ts';
import type { Study } from '../../../db/study.ts';
import { SCORE_USE_LABEL, type ScoreUse } from '../../engine/reliability/criterion.ts';
import { changeInPhase } from '../change.ts';
import { RuleError } from '../errors.ts';

const FIELD_LABEL: Record<ConstructTextField, string> = {
  name: 'construct name',
  definition: 'definition',
  includes: 'what the domain includes',
  excludes: 'what the domain excludes',
  population: 'target population',
  intendedUses: 'intended uses',
};

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
