import path from 'node:path';
import Database from 'better-sqlite3';
import { afterEach, beforeEach, describe, expect, it } from 'vitest';
import { DecisionLog } from '../../../db/decision-log.ts';
import { LATEST_VERSION } from '../../../db/migrations/index.ts';
import { APPLICATION_ID } from '../../../db/study-file.ts';
import { Study, migrate } from '../../../db/study.ts';
import { verifyStudy } from '../../../db/verify.ts';
import { TEST_ACTOR, tempDir } from '../../helpers/tmp.ts';

let tmp: ReturnType<typeof tempDir>;
beforeEach(() => {
  tmp = tempDir();
});
afterEach(() => tmp.cleanup());

/** A version-4 study, as the app wrote it before digests: content, a run, and log rows. */
function buildVersion4(file: string): string[] {
  const db = new Database(file);
  db.pragma(`application_id = ${APPLICATION_ID}`);
  db.pragma('foreign_keys = ON');
  migrate(db, 0, 4);
  // The file's recorded SHA-256 is that of one zero byte, as `python3 -c "import hashlib;
  // print(hashlib.sha256(b'\x00').hexdigest())"` prints it.
  db.exec(`
    INSERT INTO study_meta (key, value) VALUES ('title', 'Everyday cycling, older file');
    INSERT INTO facet (id, name, definition, position) VALUES (1, 'Confidence in traffic', 'Riding among traffic.', 1);
    INSERT INTO item (id, code, facet_id, keying, state, position, created_at)
      VALUES (1, 'TR1', 1, 'forward', 'kept', 1, '2025-01-01T00:00:00Z');
    INSERT INTO item_revision (item_id, number, text, reason, created_at)
      VALUES (1, 1, 'I can ride through a busy junction.', 'drafted', '2025-01-01T00:00:00Z');
    INSERT INTO dataset (id, role, name, file_name, file_sha256, file_size, file_bytes, reading, mapping, respondents, base, imported_at, imported_by)
      VALUES (1, 'pilot', 'Pilot', 'pilot.csv', '6e340b9cffb37a989ca544e6bb780a2c78901d3fb33738768511a30617afa01d', 1, x'00', '{}', '{}', 0, '{}', '2025-01-02T00:00:00Z', 'T');
    INSERT INTO analysis_run (id, phase, kind, inputs, options, seed, engine_version, results, created_at, actor)
      VALUES (1, 'purification', 'purification-round', '{}', '{}', 1, '0', '{"alpha":0.8}', '2025-01-03T00:00:00Z', 'T');
  `);
  const log = new DecisionLog(db);
  log.append(TEST_ACTOR, {
    phase: 'construct',
    kind: 'facet-added',
    target: 'facet "Confidence in traffic"',
  });
  log.append(TEST_ACTOR, { phase: 'items', kind: 'item-added', target: 'item TR1' });
  log.append(TEST_ACTOR, { phase: 'purification', kind: 'analysis-run', target: 'round 1', runId: 1 });
  const hashes = db.prepare('SELECT hash FROM decision_log ORDER BY seq').pluck().all() as string[];
  db.close();
  return hashes;
}

describe('migration 5: content digests', () => {
  it('upgrades a version-4 file: its rows and hashes stay, the digests are recorded in one logged row', () => {
    const file = path.join(tmp.dir, 'v4.scalewright');
    const hashes = buildVersion4(file);
    const study = Study.open(file, { actor: TEST_ACTOR, app: 'test' });
    let rowsAfterUpgrade = 0;
    try {
      expect(study.version).toBe(LATEST_VERSION);
      expect(study.db.prepare('SELECT code FROM item').pluck().all()).toEqual(['TR1']);
      const table = study.db
        .prepare("SELECT sql FROM sqlite_master WHERE name = 'content_digest'")
        .pluck()
        .get();
      expect(table).toMatch(/STRICT\s*$/);
      const rows = study.log.list().reverse();
      expect(rows.map((r) => r.hash).slice(0, 3)).toEqual(hashes);
      // Row 4 is this upgrade's; a later migration that changes content may add its own row after it.
      expect(rows.length).toBeGreaterThanOrEqual(4);
      expect(rows[3]).toMatchObject({
        seq: 4,
        phase: 'study',
        kind: 'digests-recorded',
        rationale: 'digests recorded for existing content',
        actorName: TEST_ACTOR.name,
      });
      expect(rows[3].stateDigest).toMatch(/^[0-9a-f]{64}$/);
      // Every covered row has its digest: construct, facet, item, revision, dataset, run, meta.
      const counted = study.db
        .prepare('SELECT tbl, count(*) AS n FROM content_digest GROUP BY tbl ORDER BY tbl')
        .all();
      expect(counted).toEqual([
        { tbl: 'analysis_run', n: 1 },
        { tbl: 'construct', n: 1 },
        { tbl: 'dataset', n: 1 },
        { tbl: 'facet', n: 1 },
        { tbl: 'item', n: 1 },
        { tbl: 'item_revision', n: 1 },
        { tbl: 'study_meta', n: 1 },
      ]);
      expect(verifyStudy(study).breaks).toEqual([]);
      rowsAfterUpgrade = study.log.count();
    } finally {
      study.close();
    }
    // Opening it again changes nothing more.
    const again = Study.open(file, { actor: TEST_ACTOR, app: 'test' });
    expect(again.log.count()).toBe(rowsAfterUpgrade);
    again.close();
  });

  it('after the upgrade, an older row edited in SQLite is named', () => {
    const file = path.join(tmp.dir, 'v4.scalewright');
    buildVersion4(file);
    Study.open(file, { actor: TEST_ACTOR, app: 'test' }).close();
    const db = new Database(file);
    db.exec('DROP TRIGGER item_revision_no_update');
    db.exec("UPDATE item_revision SET text = 'I can ride anywhere.' WHERE item_id = 1");
    db.close();
    const study = Study.open(file, { actor: TEST_ACTOR, app: 'test', mode: 'read' });
    try {
      expect(verifyStudy(study).breaks).toEqual([
        expect.objectContaining({ check: 'content', table: 'item_revision', row: 'id 1', columns: ['text'] }),
      ]);
    } finally {
      study.close();
    }
  });

  it('a version-4 file with no log gets its digests but no log row', () => {
    const file = path.join(tmp.dir, 'empty.scalewright');
    const db = new Database(file);
    db.pragma(`application_id = ${APPLICATION_ID}`);
    migrate(db, 0, 4);
    db.close();
    const study = Study.open(file, { actor: TEST_ACTOR, app: 'test' });
    try {
      expect(study.log.count()).toBe(0);
      expect(verifyStudy(study).breaks).toEqual([]);
    } finally {
      study.close();
    }
  });
});
