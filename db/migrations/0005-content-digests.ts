import { syncAllDigests } from '../content-digest.ts';
import { DecisionLog } from '../decision-log.ts';
import type { Migration } from './types.ts';

/**
 * Content digests: the bookkeeping table of per-row digests (see `content-digest.ts`), and two
 * columns on the log: the root digest of the content after each row's change, and the digest of
 * the analysis run a row cites. Existing rows keep their hashes (a column that is NULL does not
 * enter a row's hash). The digests of what an older file already holds are established here and,
 * when the file has a log, recorded in one logged row, so that its verify has a state to check from.
 */
export const migration0005: Migration = {
  version: 5,
  name: 'content-digests',
  up(db, context) {
    db.exec(`
      CREATE TABLE content_digest (
        tbl TEXT NOT NULL,
        row_id INTEGER NOT NULL,
        digest TEXT NOT NULL,
        columns TEXT NOT NULL,
        PRIMARY KEY (tbl, row_id)
      ) WITHOUT ROWID, STRICT;

      ALTER TABLE decision_log ADD COLUMN state_digest TEXT;
      ALTER TABLE decision_log ADD COLUMN run_digest TEXT;
    `);
    const rows = syncAllDigests(db);
    const log = new DecisionLog(db);
    if (log.count() > 0) {
      log.append(context.actor, {
        phase: 'study',
        kind: 'digests-recorded',
        target: 'existing content',
        rationale: 'digests recorded for existing content',
        detail: { rows, fileVersion: 5 },
      });
    }
  },
};
