import type { Migration } from './types.ts';

/**
 * Which dataset of each role the analyses use. Every choice is a row (a dataset made current, or none:
 * the current one withdrawn) with its reason; the latest row of a role is the one in force, so the
 * history of choices stays complete and each one can be reversed by a later one (triggers refuse
 * updates and deletes). Files made before this version used the latest import of each role; that
 * dataset is recorded here as current, with a reason saying so.
 */
export const migration0006: Migration = {
  version: 6,
  name: 'dataset-choice',
  up(db) {
    db.exec(`
      CREATE TABLE dataset_choice (
        id INTEGER PRIMARY KEY,
        role TEXT NOT NULL CHECK (role IN ('pilot', 'validation', 'retest')),
        dataset_id INTEGER REFERENCES dataset (id),
        reason TEXT NOT NULL,
        decided_at TEXT NOT NULL,
        decided_by TEXT NOT NULL
      ) STRICT;
      CREATE INDEX dataset_choice_by_role ON dataset_choice (role, id);

      CREATE TRIGGER dataset_choice_no_update BEFORE UPDATE ON dataset_choice
      BEGIN SELECT RAISE(ABORT, 'a dataset choice is never changed; record a new one'); END;
      CREATE TRIGGER dataset_choice_no_delete BEFORE DELETE ON dataset_choice
      BEGIN SELECT RAISE(ABORT, 'a dataset choice is never removed; record a new one'); END;

      INSERT INTO dataset_choice (role, dataset_id, reason, decided_at, decided_by)
        SELECT d.role, d.id,
               'the latest import of its role, which analyses used before choices were recorded',
               d.imported_at, d.imported_by
        FROM dataset d
        WHERE d.id = (SELECT max(id) FROM dataset WHERE role = d.role)
        ORDER BY d.id;
    `);
  },
};
