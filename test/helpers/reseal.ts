import Database from 'better-sqlite3';
import { rootDigest, syncAllDigests } from '../../db/content-digest.ts';
import { entryFromRow, GENESIS_HASH, type LogRow, rowHash, runDigest } from '../../db/decision-log.ts';

/**
 * Tampers with a study file the way a careful forger would: runs `edit` on the file, then
 * recomputes every digest the file keeps (content digests, the run digests log rows hold, the
 * state the last row records) and the whole hash chain with its head, so that the integrity,
 * chain, run-digest and content checks all pass again. Only a re-run of the stored analyses (or a
 * head recorded outside the file) can still tell.
 */
export function editAndReseal(file: string, edit: (db: Database.Database) => void): void {
  const db = new Database(file);
  try {
    db.transaction(() => {
      edit(db);
      syncAllDigests(db);
      // The log's append-only triggers are taken off for the rewrite and put back as they were.
      const triggers = db
        .prepare("SELECT name, sql FROM sqlite_master WHERE type = 'trigger' AND tbl_name = 'decision_log'")
        .all() as { name: string; sql: string }[];
      for (const t of triggers) db.exec(`DROP TRIGGER "${t.name}"`);
      const rows = db.prepare('SELECT * FROM decision_log ORDER BY seq').all() as LogRow[];
      const last = rows.at(-1)?.seq;
      let prevHash = GENESIS_HASH;
      const update = db.prepare(
        'UPDATE decision_log SET run_digest = ?, state_digest = ?, prev_hash = ?, hash = ? WHERE seq = ?',
      );
      for (const row of rows) {
        const { hash: _old, ...body } = entryFromRow(row);
        if (body.runDigest !== undefined && body.runId !== null) body.runDigest = runDigest(db, body.runId);
        if (row.seq === last && body.stateDigest !== undefined) body.stateDigest = rootDigest(db);
        body.prevHash = prevHash;
        const hash = rowHash(body);
        update.run(body.runDigest ?? null, body.stateDigest ?? null, prevHash, hash, row.seq);
        prevHash = hash;
      }
      db.prepare("UPDATE study_meta SET value = ? WHERE key = 'log_head'").run(`${last}:${prevHash}`);
      for (const t of triggers) db.exec(t.sql);
    })();
  } finally {
    db.close();
  }
}
