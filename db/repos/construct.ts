import type { ScoreUse } from '../../app/engine/reliability/criterion.ts';
import type { Study } from '../study.ts';

export interface ConstructRecord {
  name: string;
  definition: string;
  includes: string;
  excludes: string;
  population: string;
  intendedUses: string;
  /** The use of scores the reliability criterion is chosen from; null when not stated. */
  scoreUse: ScoreUse | null;
  responsePoints: number;
  responseMin: number;
  anchors: string[];
}

export type ConstructTextField =
  | 'name'
  | 'definition'
  | 'includes'
  | 'excludes'
  | 'population'
  | 'intendedUses';

const COLUMN: Record<ConstructTextField, string> = {
  name: 'name',
  definition: 'definition',
  includes: 'includes',
  excludes: 'excludes',
  population: 'population',
  intendedUses: 'intended_uses',
};

export interface FacetRecord {
  id: number;
  name: string;
  definition: string;
  position: number;
  retiredAt: string | null;
}

export type RelationKind = 'convergent' | 'discriminant' | 'criterion' | 'known-groups';
export type ExpectedSign = 'positive' | 'negative' | 'none';
export type ExpectedStrength = 'near-zero' | 'weak' | 'moderate' | 'strong';

export interface RelationRecord {
  id: number;
  otherConstruct: string;
  kind: RelationKind;
  expectedSign: ExpectedSign;
  expectedStrength: ExpectedStrength;
  measure: string;
  rationale: string;
  retiredAt: string | null;
}

export function getConstruct(study: Study): ConstructRecord {
  const row = study.db.prepare('SELECT * FROM construct WHERE id = 1').get() as Record<string, unknown>;
  return {
    name: row.name as string,
    definition: row.definition as string,
    includes: row.includes as string,
    excludes: row.excludes as string,
    population: row.population as string,
    intendedUses: row.intended_uses as string,
    scoreUse: (row.score_use as ScoreUse | null) ?? null,
    responsePoints: row.response_points as number,
    responseMin: row.response_min as number,
    anchors: JSON.parse(row.anchors as string) as string[],
  };
}

export function setConstructText(study: Study, field: ConstructTextField, value: string): void {
  study.db.prepare(`UPDATE construct SET ${COLUMN[field]} = ? WHERE id = 1`).run(value);
}

export function setScoreUse(study: Study, use: ScoreUse | null): void {
  study.db.prepare('UPDATE construct SET score_use = ? WHERE id = 1').run(use);
}

export function setResponseFormat(study: Study, points: number, min: number, anchors: string[]): void {
  study.db
    .prepare('UPDATE construct SET response_points = ?, response_min = ?, anchors = ? WHERE id = 1')
    .run(points, min, JSON.stringify(anchors));
}

export function listFacets(study: Study, options: { includeRetired?: boolean } = {}): FacetRecord[] {
  const rows = study.db
    .prepare(
      `SELECT id, name, definition, position, retired_at AS retiredAt FROM facet
       WHERE (? OR retired_at IS NULL) ORDER BY retired_at IS NOT NULL, position, id`,
    )
    .all(options.includeRetired ? 1 : 0) as FacetRecord[];
  return rows;
}

export function getFacet(study: Study, id: number): FacetRecord | undefined {
  return study.db
    .prepare('SELECT id, name, definition, position, retired_at AS retiredAt FROM facet WHERE id = ?')
    .get(id) as FacetRecord | undefined;
}

export function insertFacet(study: Study, name: string, definition: string): number {
  const next = study.db.prepare('SELECT coalesce(max(position), 0) + 1 AS p FROM facet').get() as {
    p: number;
  };
  return Number(
    study.db
      .prepare('INSERT INTO facet (name, definition, position) VALUES (?, ?, ?)')
      .run(name, definition, next.p).lastInsertRowid,
  );
}

export function updateFacet(study: Study, id: number, fields: { name?: string; definition?: string }): void {
  if (fields.name !== undefined)
    study.db.prepare('UPDATE facet SET name = ? WHERE id = ?').run(fields.name, id);
  if (fields.definition !== undefined) {
    study.db.prepare('UPDATE facet SET definition = ? WHERE id = ?').run(fields.definition, id);
  }
}

/** Renumbers the active facets in the given order (positions 1..n). */
export function orderFacets(study: Study, ids: number[]): void {
  const set = study.db.prepare('UPDATE facet SET position = ? WHERE id = ?');
  for (const [index, id] of ids.entries()) set.run(index + 1, id);
}

export function setFacetRetired(study: Study, id: number, retiredAt: string | null): void {
  study.db.prepare('UPDATE facet SET retired_at = ? WHERE id = ?').run(retiredAt, id);
}

export function listRelations(study: Study, options: { includeRetired?: boolean } = {}): RelationRecord[] {
  return study.db
    .prepare(
      `SELECT id, other_construct AS otherConstruct, kind, expected_sign AS expectedSign,
              expected_strength AS expectedStrength, measure, rationale, retired_at AS retiredAt
       FROM planned_relation WHERE (? OR retired_at IS NULL) ORDER BY id`,
    )
    .all(options.includeRetired ? 1 : 0) as RelationRecord[];
}

export function getRelation(study: Study, id: number): RelationRecord | undefined {
  return listRelations(study, { includeRetired: true }).find((r) => r.id === id);
}

export function insertRelation(study: Study, r: Omit<RelationRecord, 'id' | 'retiredAt'>): number {
  return Number(
    study.db
      .prepare(
        `INSERT INTO planned_relation (other_construct, kind, expected_sign, expected_strength, measure, rationale)
         VALUES (?, ?, ?, ?, ?, ?)`,
      )
      .run(r.otherConstruct, r.kind, r.expectedSign, r.expectedStrength, r.measure, r.rationale)
      .lastInsertRowid,
  );
}

export function updateRelation(study: Study, id: number, r: Omit<RelationRecord, 'id' | 'retiredAt'>): void {
  study.db
    .prepare(
      `UPDATE planned_relation SET other_construct = ?, kind = ?, expected_sign = ?, expected_strength = ?,
       measure = ?, rationale = ? WHERE id = ?`,
    )
    .run(r.otherConstruct, r.kind, r.expectedSign, r.expectedStrength, r.measure, r.rationale, id);
}

export function setRelationRetired(study: Study, id: number, retiredAt: string | null): void {
  study.db.prepare('UPDATE planned_relation SET retired_at = ? WHERE id = ?').run(retiredAt, id);
}
