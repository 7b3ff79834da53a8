import type { Study } from '../study.ts';

export type ValidityDecisionKind = 'model' | 'measure' | 'groups' | 'acknowledge';

export interface ValidityDecision<T = unknown> {
  id: number;
  kind: ValidityDecisionKind;
  subject: string;
  body: T;
  rationale: string;
  decidedAt: string;
  decidedBy: string;
}

interface Row {
  id: number;
  kind: ValidityDecisionKind;
  subject: string;
  body: string;
  rationale: string;
  decided_at: string;
  decided_by: string;
}

function fromRow<T>(row: Row): ValidityDecision<T> {
  return {
    id: row.id,
    kind: row.kind,
    subject: row.subject,
    body: JSON.parse(row.body) as T,
    rationale: row.rationale,
    decidedAt: row.decided_at,
    decidedBy: row.decided_by,
  };
}

/** Call inside a change (see changeInPhase): the row and its log row go in one transaction. */
export function insertValidityDecision(
  study: Study,
  d: { kind: ValidityDecisionKind; subject: string; body: unknown; rationale: string },
): number {
  return Number(
    study.db
      .prepare(
        `INSERT INTO validity_decision (kind, subject, body, rationale, decided_at, decided_by)
         VALUES (?, ?, ?, ?, ?, ?)`,
      )
      .run(d.kind, d.subject, JSON.stringify(d.body), d.rationale, new Date().toISOString(), study.actor.name)
      .lastInsertRowid,
  );
}

/** Every decision of a kind, oldest first. */
export function listValidityDecisions<T>(study: Study, kind: ValidityDecisionKind): ValidityDecision<T>[] {
  return (
    study.db.prepare('SELECT * FROM validity_decision WHERE kind = ? ORDER BY id').all(kind) as Row[]
  ).map((r) => fromRow<T>(r));
}

/** The decision in force for each subject of a kind: the latest row per subject. */
export function currentValidityDecisions<T>(
  study: Study,
  kind: ValidityDecisionKind,
): Map<string, ValidityDecision<T>> {
  const out = new Map<string, ValidityDecision<T>>();
  for (const d of listValidityDecisions<T>(study, kind)) out.set(d.subject, d);
  return out;
}
