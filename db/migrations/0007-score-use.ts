import type { Migration } from './types.ts';

/**
 * The use the construct's scores are meant for, as one of a fixed set (`early-research`,
 * `basic-research`, `individual-decisions`), beside the free-text intended uses. The reliability
 * criterion shown beside every alpha is chosen from it; null means not stated yet.
 */
export const migration0007: Migration = {
  version: 7,
  name: 'score-use',
  up(db) {
    db.exec(`
      ALTER TABLE construct ADD COLUMN score_use TEXT
        CHECK (score_use IS NULL OR score_use IN ('early-research', 'basic-research', 'individual-decisions'));
    `);
  },
};
