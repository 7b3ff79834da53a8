import crypto from 'node:crypto';
import Database from 'better-sqlite3';
import { canonicalJson } from '../../db/canonical-json.ts';
import { rootDigest, syncAllDigests } from '../../db/content-digest.ts';
import { GENESIS_HASH, runDigest } from '../../db/decision-log.ts';

interface RawRow {
  seq: number;
  at: string;
  actor_user: string;
  actor_name: string;
  phase: string;
  kind: string;
  target: string;
  rationale: string;
  detail: string;
  run_id: number | null;
  state_digest: string | null;
  run_digest: string | null;
}

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
      const rows = db.prepare('SELECT * FROM decision_log ORDER BY seq').all() as RawRow[];
      const last = rows.at(-1)?.seq;
      let prevHash = GENESIS_HASH;
      const update = db.prepare(
        'UPDATE decision_log SET run_digest = ?, state_digest = ?, prev_hash = ?, hash = ? WHERE seq = ?',
      );
      for (const row of rows) {
        const runDigestNow =
          row.run_digest !== null && row.run_id !== null
            ? (runDigest(db, row.run_id) ?? null)
            : row.run_digest;
        const stateDigest = row.seq === last && row.state_digest !== null ? rootDigest(db) : row.state_digest;
        const body = {
          seq: row.seq,
          at: row.at,
          actorUser: row.actor_user,
          actorName: row.actor_name,
          phase: row.phase,
          kind: row.kind,
          target: row.target,
          rationale: row.rationale,
          detail: JSON.parse(row.detail),
          runId: row.run_id,
          stateDigest: stateDigest ?? undefined,
          runDigest: runDigestNow ?? undefined,
          prevHash,
        };
        const hash = crypto.createHash('sha256').update(prevHash).update(canonicalJson(body)).digest('hex');
        update.run(runDigestNow, stateDigest, prevHash, hash, row.seq);
        prevHash = hash;
      }
      db.prepare("UPDATE study_meta SET value = ? WHERE key = 'log_head'").run(`${last}:${prevHash}`);
      for (const t of triggers) db.exec(t.sql);
    })();
  } finally {
    db.close();
  }
}
