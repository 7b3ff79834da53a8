import type { Study } from '../study.ts';

export interface RoundRecord {
  id: number;
  number: number;
  label: string;
  createdAt: string;
}

/** What the experts were asked in one round. */
export interface ReviewForm {
  relevanceMin: number;
  relevanceMax: number;
  /** Lawshe's question: essential / useful but not essential / not necessary. */
  asksEssential: boolean;
  /** Which facet the expert would place the item in. */
  asksFacet: boolean;
  asksComment: boolean;
  instructions: string;
}

export interface RoundItemRecord {
  itemId: number;
  position: number;
  /** The revision the experts rated, fixed when the first ratings arrive; null until then. */
  revisionId: number | null;
}

export interface ExpertRecord {
  id: number;
  roundId: number;
  code: string;
  role: string;
  /** Empty when no name was given. */
  name: string;
  /** A name kept in the study but never shown outside the panel editor. */
  nameWithheld: boolean;
}

export interface NewRating {
  expertId: number;
  itemId: number;
  relevance: number | null;
  essential: boolean | null;
  facetId: number | null;
  comment: string | null;
  sourceRow: number;
}

export interface RatingRecord extends NewRating {
  id: number;
  importId: number;
}

export interface ImportRecord {
  id: number;
  roundId: number;
  fileName: string;
  sha256: string;
  layout: 'long' | 'wide';
  ratings: number;
  importedAt: string;
  withdrawnAt: string | null;
}

export type Decision = 'keep' | 'revise' | 'retire';

export interface DecisionRecord {
  id: number;
  itemId: number;
  roundId: number;
  decision: Decision;
  rationale: string;
  revisionId: number | null;
  runId: number | null;
  decidedAt: string;
}

export function listRounds(study: Study): RoundRecord[] {
  return study.db
    .prepare('SELECT id, number, label, created_at AS createdAt FROM review_round ORDER BY number')
    .all() as RoundRecord[];
}

export function getRound(study: Study, id: number): RoundRecord | undefined {
  return study.db
    .prepare('SELECT id, number, label, created_at AS createdAt FROM review_round WHERE id = ?')
    .get(id) as RoundRecord | undefined;
}

export function insertRound(study: Study, label: string, form: ReviewForm, at: string): number {
  const next = study.db.prepare('SELECT coalesce(max(number), 0) + 1 AS n FROM review_round').get() as {
    n: number;
  };
  const id = Number(
    study.db
      .prepare('INSERT INTO review_round (number, label, created_at) VALUES (?, ?, ?)')
      .run(next.n, label, at).lastInsertRowid,
  );
  study.db
    .prepare(
      `INSERT INTO review_form (round_id, relevance_min, relevance_max, asks_essential, asks_facet, asks_comment, instructions)
       VALUES (?, ?, ?, ?, ?, ?, ?)`,
    )
    .run(
      id,
      form.relevanceMin,
      form.relevanceMax,
      Number(form.asksEssential),
      Number(form.asksFacet),
      Number(form.asksComment),
      form.instructions,
    );
  return id;
}

export function getForm(study: Study, roundId: number): ReviewForm {
  const row = study.db.prepare('SELECT * FROM review_form WHERE round_id = ?').get(roundId) as Record<
    string,
    unknown
  >;
  return {
    relevanceMin: row.relevance_min as number,
    relevanceMax: row.relevance_max as number,
    asksEssential: row.asks_essential === 1,
    asksFacet: row.asks_facet === 1,
    asksComment: row.asks_comment === 1,
    instructions: row.instructions as string,
  };
}

export function setForm(study: Study, roundId: number, form: ReviewForm): void {
  study.db
    .prepare(
      `UPDATE review_form SET relevance_min = ?, relevance_max = ?, asks_essential = ?, asks_facet = ?,
       asks_comment = ?, instructions = ? WHERE round_id = ?`,
    )
    .run(
      form.relevanceMin,
      form.relevanceMax,
      Number(form.asksEssential),
      Number(form.asksFacet),
      Number(form.asksComment),
      form.instructions,
      roundId,
    );
}

export function listRoundItems(study: Study, roundId: number): RoundItemRecord[] {
  return study.db
    .prepare(
      `SELECT item_id AS itemId, position, revision_id AS revisionId FROM review_round_item
       WHERE round_id = ? ORDER BY position`,
    )
    .all(roundId) as RoundItemRecord[];
}

/** Replaces the round's item list (only while it has no ratings). */
export function setRoundItems(study: Study, roundId: number, itemIds: readonly number[]): void {
  study.db.prepare('DELETE FROM review_round_item WHERE round_id = ?').run(roundId);
  const insert = study.db.prepare(
    'INSERT INTO review_round_item (round_id, item_id, position) VALUES (?, ?, ?)',
  );
  for (const [index, itemId] of itemIds.entries()) insert.run(roundId, itemId, index + 1);
}

/** Fixes, for every item of the round, the revision the experts rated (its latest revision now). */
export function freezeRoundRevisions(study: Study, roundId: number): void {
  study.db
    .prepare(
      `UPDATE review_round_item SET revision_id = (
         SELECT id FROM item_revision r WHERE r.item_id = review_round_item.item_id ORDER BY number DESC LIMIT 1)
       WHERE round_id = ? AND revision_id IS NULL`,
    )
    .run(roundId);
}

/** Releases the fixed revisions again once a round has no ratings left (its wording may then be brought up to date). */
export function unfreezeRoundRevisions(study: Study, roundId: number): void {
  study.db.prepare('UPDATE review_round_item SET revision_id = NULL WHERE round_id = ?').run(roundId);
}

const EXPERT_SELECT = `SELECT id, round_id AS roundId, code, role, name, name_withheld AS nameWithheld
  FROM review_expert`;

type ExpertRow = Omit<ExpertRecord, 'nameWithheld'> & { nameWithheld: number };

function expertFromRow(row: ExpertRow): ExpertRecord {
  return { ...row, nameWithheld: row.nameWithheld === 1 };
}

export function listExperts(study: Study, roundId: number): ExpertRecord[] {
  return (
    study.db.prepare(`${EXPERT_SELECT} WHERE round_id = ? ORDER BY id`).all(roundId) as ExpertRow[]
  ).map(expertFromRow);
}

export function getExpert(study: Study, id: number): ExpertRecord | undefined {
  const row = study.db.prepare(`${EXPERT_SELECT} WHERE id = ?`).get(id) as ExpertRow | undefined;
  return row ? expertFromRow(row) : undefined;
}

export function insertExpert(
  study: Study,
  roundId: number,
  expert: { code: string; role: string; name: string; nameWithheld: boolean },
): number {
  return Number(
    study.db
      .prepare('INSERT INTO review_expert (round_id, code, role, name, name_withheld) VALUES (?, ?, ?, ?, ?)')
      .run(roundId, expert.code, expert.role, expert.name, Number(expert.nameWithheld)).lastInsertRowid,
  );
}

export function updateExpert(
  study: Study,
  id: number,
  expert: { code: string; role: string; name: string; nameWithheld: boolean },
): void {
  study.db
    .prepare('UPDATE review_expert SET code = ?, role = ?, name = ?, name_withheld = ? WHERE id = ?')
    .run(expert.code, expert.role, expert.name, Number(expert.nameWithheld), id);
}

export function deleteExpert(study: Study, id: number): void {
  study.db.prepare('DELETE FROM review_expert WHERE id = ?').run(id);
}

export function insertImport(study: Study, record: Omit<ImportRecord, 'id' | 'withdrawnAt'>): number {
  return Number(
    study.db
      .prepare(
        `INSERT INTO review_import (round_id, file_name, sha256, layout, ratings, imported_at)
         VALUES (?, ?, ?, ?, ?, ?)`,
      )
      .run(record.roundId, record.fileName, record.sha256, record.layout, record.ratings, record.importedAt)
      .lastInsertRowid,
  );
}

export function listImports(study: Study, roundId: number): ImportRecord[] {
  return study.db
    .prepare(
      `SELECT id, round_id AS roundId, file_name AS fileName, sha256, layout, ratings,
              imported_at AS importedAt, withdrawn_at AS withdrawnAt
       FROM review_import WHERE round_id = ? ORDER BY id`,
    )
    .all(roundId) as ImportRecord[];
}

export function getImport(study: Study, id: number): ImportRecord | undefined {
  return study.db
    .prepare(
      `SELECT id, round_id AS roundId, file_name AS fileName, sha256, layout, ratings,
              imported_at AS importedAt, withdrawn_at AS withdrawnAt
       FROM review_import WHERE id = ?`,
    )
    .get(id) as ImportRecord | undefined;
}

/** Removes the ratings an import brought in and marks the import withdrawn (the record stays). */
export function withdrawImport(study: Study, id: number, at: string): void {
  study.db.prepare('DELETE FROM review_rating WHERE import_id = ?').run(id);
  study.db.prepare('UPDATE review_import SET withdrawn_at = ? WHERE id = ?').run(at, id);
}

export function insertRatings(
  study: Study,
  roundId: number,
  importId: number,
  ratings: readonly NewRating[],
): void {
  const insert = study.db.prepare(
    `INSERT INTO review_rating (round_id, expert_id, item_id, relevance, essential, facet_id, comment, import_id, source_row)
     VALUES (?, ?, ?, ?, ?, ?, ?, ?, ?)`,
  );
  for (const r of ratings) {
    insert.run(
      roundId,
      r.expertId,
      r.itemId,
      r.relevance,
      r.essential === null ? null : Number(r.essential),
      r.facetId,
      r.comment,
      importId,
      r.sourceRow,
    );
  }
}

export function listRatings(study: Study, roundId: number): RatingRecord[] {
  const rows = study.db
    .prepare(
      `SELECT id, expert_id AS expertId, item_id AS itemId, relevance, essential, facet_id AS facetId,
              comment, import_id AS importId, source_row AS sourceRow
       FROM review_rating WHERE round_id = ? ORDER BY id`,
    )
    .all(roundId) as (Omit<RatingRecord, 'essential'> & { essential: number | null })[];
  return rows.map((r) => ({ ...r, essential: r.essential === null ? null : r.essential === 1 }));
}

export function countRatings(study: Study, roundId: number): number {
  return (
    study.db.prepare('SELECT count(*) AS n FROM review_rating WHERE round_id = ?').get(roundId) as {
      n: number;
    }
  ).n;
}

export function countExpertRatings(study: Study, expertId: number): number {
  return (
    study.db.prepare('SELECT count(*) AS n FROM review_rating WHERE expert_id = ?').get(expertId) as {
      n: number;
    }
  ).n;
}

export function insertDecision(study: Study, d: Omit<DecisionRecord, 'id'>): number {
  return Number(
    study.db
      .prepare(
        `INSERT INTO item_decision (item_id, round_id, decision, rationale, revision_id, run_id, decided_at)
         VALUES (?, ?, ?, ?, ?, ?, ?)`,
      )
      .run(d.itemId, d.roundId, d.decision, d.rationale, d.revisionId, d.runId, d.decidedAt).lastInsertRowid,
  );
}

/** Every decision taken in a round, oldest first (a later decision on the same item supersedes). */
export function listDecisions(study: Study, roundId: number): DecisionRecord[] {
  return study.db
    .prepare(
      `SELECT id, item_id AS itemId, round_id AS roundId, decision, rationale, revision_id AS revisionId,
              run_id AS runId, decided_at AS decidedAt
       FROM item_decision WHERE round_id = ? ORDER BY id`,
    )
    .all(roundId) as DecisionRecord[];
}

/** Stores one analysis run (inputs, options, engine version, results) and returns its id. */
export function insertAnalysisRun(
  study: Study,
  run: {
    phase: string;
    kind: string;
    inputs: unknown;
    options: unknown;
    engineVersion: string;
    results: unknown;
    at: string;
  },
): number {
  return Number(
    study.db
      .prepare(
        `INSERT INTO analysis_run (phase, kind, inputs, options, seed, engine_version, results, created_at, actor)
         VALUES (?, ?, ?, ?, NULL, ?, ?, ?, ?)`,
      )
      .run(
        run.phase,
        run.kind,
        JSON.stringify(run.inputs),
        JSON.stringify(run.options),
        run.engineVersion,
        JSON.stringify(run.results),
        run.at,
        study.actor.name,
      ).lastInsertRowid,
  );
}

/** The latest stored run of a kind whose inputs name this round, if any. */
export function latestRoundRun(study: Study, kind: string, roundId: number): number | null {
  const row = study.db
    .prepare(
      `SELECT id FROM analysis_run WHERE kind = ? AND json_extract(inputs, '$.roundId') = ?
       ORDER BY id DESC LIMIT 1`,
    )
    .get(kind, roundId) as { id: number } | undefined;
  return row?.id ?? null;
}
