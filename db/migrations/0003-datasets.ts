import type { Migration } from './types.ts';

/**
 * Imported data files: the original bytes with their SHA-256, how they were read (mapping, codes,
 * bounds), the respondents' ids and text columns, the numeric columns in the compact layout, and
 * the exclusion decisions (the latest decision per respondent is the one in force).
 */
export const migration0003: Migration = {
  version: 3,
  name: 'datasets',
  up(db) {
    db.exec(`
      CREATE TABLE dataset (
        id INTEGER PRIMARY KEY,
        role TEXT NOT NULL CHECK (role IN ('pilot', 'validation', 'retest')),
        name TEXT NOT NULL,
        file_name TEXT NOT NULL,
        file_sha256 TEXT NOT NULL,
        file_size INTEGER NOT NULL,
        file_bytes BLOB NOT NULL,
        reading TEXT NOT NULL,
        mapping TEXT NOT NULL,
        respondents INTEGER NOT NULL,
        base TEXT NOT NULL,
        imported_at TEXT NOT NULL,
        imported_by TEXT NOT NULL
      ) STRICT;

      CREATE TABLE dataset_column (
        dataset_id INTEGER NOT NULL REFERENCES dataset (id),
        position INTEGER NOT NULL,
        name TEXT NOT NULL,
        role TEXT NOT NULL CHECK (role IN ('item', 'criterion', 'duration')),
        item_code TEXT,
        missing INTEGER NOT NULL,
        encoded BLOB NOT NULL,
        PRIMARY KEY (dataset_id, position)
      ) STRICT;

      CREATE TABLE respondent_exclusion (
        id INTEGER PRIMARY KEY,
        dataset_id INTEGER NOT NULL REFERENCES dataset (id),
        respondent INTEGER NOT NULL,
        excluded INTEGER NOT NULL CHECK (excluded IN (0, 1)),
        reason TEXT NOT NULL,
        rule TEXT,
        decided_at TEXT NOT NULL
      ) STRICT;
      CREATE INDEX respondent_exclusion_by_dataset ON respondent_exclusion (dataset_id, respondent, id);
    `);
  },
};
