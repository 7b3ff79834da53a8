import type { Migration } from './types.ts';

/**
 * Items, their revisions, expert review rounds and ratings.
 *
 * An item's wording lives only in `item_revision`, which is append-only (triggers refuse UPDATE and
 * DELETE): the current text is the revision with the highest number, so no wording is ever lost.
 * A review round lists the items it covers in `review_round_item`; the revision the experts rated is
 * fixed there when the first ratings arrive. Expert names are optional and never enter the decision
 * log, so a name that is withheld later is not left behind in the append-only record.
 */
export const migration0002: Migration = {
  version: 2,
  name: 'item-pool',
  up(db) {
    db.exec(`
      CREATE TABLE item (
        id INTEGER PRIMARY KEY,
        code TEXT NOT NULL COLLATE NOCASE UNIQUE CHECK (length(code) BETWEEN 1 AND 20),
        facet_id INTEGER REFERENCES facet (id),
        keying TEXT NOT NULL DEFAULT 'forward' CHECK (keying IN ('forward', 'reverse')),
        source_type TEXT NOT NULL DEFAULT 'own-drafting'
          CHECK (source_type IN ('literature', 'interviews', 'expert-suggestion', 'own-drafting')),
        source_note TEXT NOT NULL DEFAULT '',
        state TEXT NOT NULL DEFAULT 'draft' CHECK (state IN ('draft', 'kept', 'retired')),
        position INTEGER NOT NULL,
        created_at TEXT NOT NULL
      ) STRICT;
      CREATE INDEX item_facet ON item (facet_id);

      CREATE TABLE review_round (
        id INTEGER PRIMARY KEY,
        number INTEGER NOT NULL UNIQUE CHECK (number >= 1),
        label TEXT NOT NULL DEFAULT '',
        created_at TEXT NOT NULL
      ) STRICT;

      CREATE TABLE item_revision (
        id INTEGER PRIMARY KEY,
        item_id INTEGER NOT NULL REFERENCES item (id),
        number INTEGER NOT NULL CHECK (number >= 1),
        text TEXT NOT NULL CHECK (length(trim(text)) > 0),
        reason TEXT NOT NULL CHECK (reason IN ('drafted', 'edited', 'imported', 'revised-after-review')),
        round_id INTEGER REFERENCES review_round (id),
        created_at TEXT NOT NULL,
        UNIQUE (item_id, number)
      ) STRICT;

      CREATE TRIGGER item_revision_no_update BEFORE UPDATE ON item_revision
      BEGIN SELECT RAISE(ABORT, 'item revisions are kept as written; add a new revision instead'); END;
      CREATE TRIGGER item_revision_no_delete BEFORE DELETE ON item_revision
      BEGIN SELECT RAISE(ABORT, 'item revisions are kept as written; add a new revision instead'); END;

      CREATE TABLE review_form (
        round_id INTEGER PRIMARY KEY REFERENCES review_round (id),
        relevance_min INTEGER NOT NULL DEFAULT 1,
        relevance_max INTEGER NOT NULL DEFAULT 4,
        asks_essential INTEGER NOT NULL DEFAULT 0 CHECK (asks_essential IN (0, 1)),
        asks_facet INTEGER NOT NULL DEFAULT 0 CHECK (asks_facet IN (0, 1)),
        asks_comment INTEGER NOT NULL DEFAULT 1 CHECK (asks_comment IN (0, 1)),
        instructions TEXT NOT NULL DEFAULT '',
        CHECK (relevance_min < relevance_max)
      ) STRICT;

      CREATE TABLE review_round_item (
        round_id INTEGER NOT NULL REFERENCES review_round (id),
        item_id INTEGER NOT NULL REFERENCES item (id),
        position INTEGER NOT NULL,
        revision_id INTEGER REFERENCES item_revision (id),
        PRIMARY KEY (round_id, item_id)
      ) STRICT;

      CREATE TABLE review_expert (
        id INTEGER PRIMARY KEY,
        round_id INTEGER NOT NULL REFERENCES review_round (id),
        code TEXT NOT NULL COLLATE NOCASE CHECK (length(code) BETWEEN 1 AND 40),
        role TEXT NOT NULL DEFAULT '',
        name TEXT NOT NULL DEFAULT '',
        name_withheld INTEGER NOT NULL DEFAULT 0 CHECK (name_withheld IN (0, 1)),
        UNIQUE (round_id, code)
      ) STRICT;

      CREATE TABLE review_import (
        id INTEGER PRIMARY KEY,
        round_id INTEGER NOT NULL REFERENCES review_round (id),
        file_name TEXT NOT NULL,
        sha256 TEXT NOT NULL,
        layout TEXT NOT NULL CHECK (layout IN ('long', 'wide')),
        ratings INTEGER NOT NULL,
        imported_at TEXT NOT NULL,
        withdrawn_at TEXT
      ) STRICT;

      CREATE TABLE review_rating (
        id INTEGER PRIMARY KEY,
        round_id INTEGER NOT NULL REFERENCES review_round (id),
        expert_id INTEGER NOT NULL REFERENCES review_expert (id),
        item_id INTEGER NOT NULL REFERENCES item (id),
        relevance INTEGER,
        essential INTEGER CHECK (essential IN (0, 1)),
        facet_id INTEGER REFERENCES facet (id),
        comment TEXT,
        import_id INTEGER NOT NULL REFERENCES review_import (id),
        source_row INTEGER NOT NULL,
        UNIQUE (round_id, expert_id, item_id)
      ) STRICT;
      CREATE INDEX review_rating_round ON review_rating (round_id, item_id);

      CREATE TABLE item_decision (
        id INTEGER PRIMARY KEY,
        item_id INTEGER NOT NULL REFERENCES item (id),
        round_id INTEGER NOT NULL REFERENCES review_round (id),
        decision TEXT NOT NULL CHECK (decision IN ('keep', 'revise', 'retire')),
        rationale TEXT NOT NULL CHECK (length(trim(rationale)) > 0),
        revision_id INTEGER REFERENCES item_revision (id),
        run_id INTEGER REFERENCES analysis_run (id),
        decided_at TEXT NOT NULL,
        CHECK ((decision = 'revise') = (revision_id IS NOT NULL))
      ) STRICT;
      CREATE INDEX item_decision_item ON item_decision (item_id, round_id);
    `);
  },
};
