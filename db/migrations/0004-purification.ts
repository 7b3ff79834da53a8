import type { Migration } from './types.ts';

/**
 * Purification rounds and the researcher's decisions on items.
 *
 * A round is one stored analysis run (`run_id`) of an item set on one pilot dataset; `items` holds
 * the set exactly as analysed (code, item id, facet and keying at the time). A decision drops, keeps,
 * moves (to another facet) or restores one item, cites the round it was made on, and carries two
 * rationales: how the item relates to the construct's domain, and what the statistics show. A drop
 * with no domain rationale is kept but marked `statistics_only`. A later decision may reverse an
 * earlier one (`reverses_id`); nothing is ever updated or deleted (triggers refuse it), so the
 * history of which items left when, and why, stays complete. The table is called
 * `purification_decision` because `item_decision` holds the expert-review decisions (migration 2).
 */
export const migration0004: Migration = {
  version: 4,
  name: 'purification',
  up(db) {
    db.exec(`
      CREATE TABLE purification_round (
        id INTEGER PRIMARY KEY,
        number INTEGER NOT NULL UNIQUE CHECK (number >= 1),
        dataset_id INTEGER NOT NULL REFERENCES dataset (id),
        items TEXT NOT NULL CHECK (json_valid(items) AND json_type(items) = 'array'),
        run_id INTEGER NOT NULL UNIQUE REFERENCES analysis_run (id),
        started_from_round INTEGER REFERENCES purification_round (id),
        created_at TEXT NOT NULL
      ) STRICT;

      CREATE TABLE purification_decision (
        id INTEGER PRIMARY KEY,
        round_id INTEGER NOT NULL REFERENCES purification_round (id),
        item_id INTEGER NOT NULL REFERENCES item (id),
        item_code TEXT NOT NULL,
        action TEXT NOT NULL CHECK (action IN ('drop', 'keep', 'move', 'restore')),
        from_facet_id INTEGER REFERENCES facet (id),
        to_facet_id INTEGER REFERENCES facet (id),
        domain_rationale TEXT NOT NULL,
        statistical_rationale TEXT NOT NULL,
        statistics_only INTEGER NOT NULL CHECK (statistics_only IN (0, 1)),
        reverses_id INTEGER REFERENCES purification_decision (id),
        decided_at TEXT NOT NULL,
        decided_by TEXT NOT NULL,
        CHECK ((action = 'move') = (to_facet_id IS NOT NULL)),
        CHECK (length(trim(domain_rationale)) + length(trim(statistical_rationale)) > 0),
        CHECK (statistics_only = (action = 'drop' AND length(trim(domain_rationale)) = 0))
      ) STRICT;
      CREATE INDEX purification_decision_item ON purification_decision (item_id, id);
      CREATE INDEX purification_decision_round ON purification_decision (round_id);

      CREATE TRIGGER purification_round_no_update BEFORE UPDATE ON purification_round
      BEGIN SELECT RAISE(ABORT, 'purification rounds are kept as run; run a new round instead'); END;
      CREATE TRIGGER purification_round_no_delete BEFORE DELETE ON purification_round
      BEGIN SELECT RAISE(ABORT, 'purification rounds are kept as run; run a new round instead'); END;
      CREATE TRIGGER purification_decision_no_update BEFORE UPDATE ON purification_decision
      BEGIN SELECT RAISE(ABORT, 'item decisions are kept as made; reverse one with a later decision'); END;
      CREATE TRIGGER purification_decision_no_delete BEFORE DELETE ON purification_decision
      BEGIN SELECT RAISE(ABORT, 'item decisions are kept as made; reverse one with a later decision'); END;
    `);
  },
};
