import type { Migration } from './types.ts';

/**
 * The validity phase's own decisions: the measurement model in force (`model`), how a criterion or
 * other-measure column is read (`measure`: which planned relation it answers, whether it was
 * measured at the same time or later, its reliability), how a group column answers a known-groups
 * relation (`groups`), and the researcher's acknowledgement of a finding (`acknowledge`). Each
 * row is one decision with its rationale; the latest row of a kind and subject is the one in force,
 * so every earlier setting stays on record (triggers refuse updates and deletes).
 */
export const migration0008: Migration = {
  version: 8,
  name: 'validity',
  up(db) {
    db.exec(`
      CREATE TABLE validity_decision (
        id INTEGER PRIMARY KEY,
        kind TEXT NOT NULL CHECK (kind IN ('model', 'measure', 'groups', 'acknowledge')),
        subject TEXT NOT NULL,
        body TEXT NOT NULL CHECK (json_valid(body)),
        rationale TEXT NOT NULL,
        decided_at TEXT NOT NULL,
        decided_by TEXT NOT NULL
      ) STRICT;
      CREATE INDEX validity_decision_by_subject ON validity_decision (kind, subject, id);

      CREATE TRIGGER validity_decision_no_update BEFORE UPDATE ON validity_decision
      BEGIN SELECT RAISE(ABORT, 'a validity decision is never changed; record a new one'); END;
      CREATE TRIGGER validity_decision_no_delete BEFORE DELETE ON validity_decision
      BEGIN SELECT RAISE(ABORT, 'a validity decision is never removed; record a new one'); END;
    `);
  },
};
