import type { Migration } from './types.ts';

/**
 * The study itself: metadata, phase states, the construct with its facets and planned relations,
 * analysis runs, and the hash-chained decision log.
 */
export const migration0001: Migration = {
  version: 1,
  name: 'core',
  up(db) {
    db.exec(`
      CREATE TABLE study_meta (
        key TEXT PRIMARY KEY,
        value TEXT NOT NULL
      ) STRICT;

      CREATE TABLE phase_state (
        phase TEXT PRIMARY KEY,
        state TEXT NOT NULL CHECK (state IN ('not-started', 'in-progress', 'signed-off', 'reopened')),
        changed_at TEXT NOT NULL
      ) STRICT;

      CREATE TABLE construct (
        id INTEGER PRIMARY KEY CHECK (id = 1),
        name TEXT NOT NULL DEFAULT '',
        definition TEXT NOT NULL DEFAULT '',
        includes TEXT NOT NULL DEFAULT '',
        excludes TEXT NOT NULL DEFAULT '',
        population TEXT NOT NULL DEFAULT '',
        intended_uses TEXT NOT NULL DEFAULT '',
        response_points INTEGER NOT NULL DEFAULT 5 CHECK (response_points BETWEEN 2 AND 11),
        response_min INTEGER NOT NULL DEFAULT 1,
        anchors TEXT NOT NULL DEFAULT '[]'
      ) STRICT;

      CREATE TABLE facet (
        id INTEGER PRIMARY KEY,
        name TEXT NOT NULL,
        definition TEXT NOT NULL DEFAULT '',
        position INTEGER NOT NULL,
        retired_at TEXT
      ) STRICT;

      CREATE TABLE planned_relation (
        id INTEGER PRIMARY KEY,
        other_construct TEXT NOT NULL,
        kind TEXT NOT NULL CHECK (kind IN ('convergent', 'discriminant', 'criterion', 'known-groups')),
        expected_sign TEXT NOT NULL CHECK (expected_sign IN ('positive', 'negative', 'none')),
        expected_strength TEXT NOT NULL CHECK (expected_strength IN ('near-zero', 'weak', 'moderate', 'strong')),
        measure TEXT NOT NULL DEFAULT '',
        rationale TEXT NOT NULL DEFAULT '',
        retired_at TEXT
      ) STRICT;

      CREATE TABLE analysis_run (
        id INTEGER PRIMARY KEY,
        phase TEXT NOT NULL,
        kind TEXT NOT NULL,
        inputs TEXT NOT NULL,
        options TEXT NOT NULL,
        seed INTEGER,
        engine_version TEXT NOT NULL,
        results TEXT NOT NULL,
        created_at TEXT NOT NULL,
        actor TEXT NOT NULL
      ) STRICT;

      CREATE TABLE decision_log (
        seq INTEGER PRIMARY KEY,
        at TEXT NOT NULL,
        actor_user TEXT NOT NULL,
        actor_name TEXT NOT NULL,
        phase TEXT NOT NULL,
        kind TEXT NOT NULL,
        target TEXT NOT NULL,
        rationale TEXT NOT NULL,
        detail TEXT NOT NULL,
        run_id INTEGER REFERENCES analysis_run (id),
        prev_hash TEXT NOT NULL,
        hash TEXT NOT NULL UNIQUE
      ) STRICT;

      CREATE TRIGGER decision_log_no_update BEFORE UPDATE ON decision_log
      BEGIN SELECT RAISE(ABORT, 'the decision log is append-only'); END;
      CREATE TRIGGER decision_log_no_delete BEFORE DELETE ON decision_log
      BEGIN SELECT RAISE(ABORT, 'the decision log is append-only'); END;

      INSERT INTO construct (id) VALUES (1);
    `);
  },
};
