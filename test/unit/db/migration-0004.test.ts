import path from 'node:path';
import Database from 'better-sqlite3';
import { afterEach, beforeEach, describe, expect, it } from 'vitest';
import { LATEST_VERSION } from '../../../db/migrations/index.ts';
import { APPLICATION_ID } from '../../../db/study-file.ts';
import { migrate, Study } from '../../../db/study.ts';
import { TEST_ACTOR, tempDir } from '../../helpers/tmp.ts';

let tmp: ReturnType<typeof tempDir>;
beforeEach(() => {
  tmp = tempDir();
});
afterEach(() => tmp.cleanup());

/** A study file at version 3 with a facet, an item, a pilot dataset and an analysis run in it. */
function buildVersion3(file: string): void {
  const db = new Database(file);
  db.pragma(`application_id = ${APPLICATION_ID}`);
  db.pragma('foreign_keys = ON');
  migrate(db, 0, 3);
  db.exec(`
    INSERT INTO facet (id, name, definition, position) VALUES (1, 'Confidence in traffic', 'Riding among traffic.', 1);
    INSERT INTO facet (id, name, definition, position) VALUES (2, 'Route planning', 'Choosing a route.', 2);
    INSERT INTO item (id, code, facet_id, keying, state, position, created_at)
      VALUES (1, 'TR1', 1, 'forward', 'kept', 1, '2025-01-01T00:00:00Z');
    INSERT INTO item_revision (item_id, number, text, reason, created_at)
      VALUES (1, 1, 'I can ride through a busy junction.', 'drafted', '2025-01-01T00:00:00Z');
    INSERT INTO dataset (id, role, name, file_name, file_sha256, file_size, file_bytes, reading, mapping, respondents, base, imported_at, imported_by)
      VALUES (1, 'pilot', 'Pilot', 'pilot.csv', 'ab', 1, x'00', '{}', '{}', 0, '{}', '2025-01-02T00:00:00Z', 'T');
    INSERT INTO analysis_run (id, phase, kind, inputs, options, seed, engine_version, results, created_at, actor)
      VALUES (1, 'purification', 'purification-round', '{}', '{}', 1, '0', '{}', '2025-01-03T00:00:00Z', 'T');
  `);
  db.close();
}

describe('migration 4: purification rounds and decisions', () => {
  it('upgrades a version-3 file, keeps what it held, and stores rounds and decisions', () => {
    const file = path.join(tmp.dir, 'v3.scalewright');
    buildVersion3(file);
    const study = Study.open(file, { actor: TEST_ACTOR, app: 'test' });
    try {
      expect(study.version).toBe(LATEST_VERSION);
      expect(study.db.prepare('SELECT code FROM item').pluck().all()).toEqual(['TR1']);
      const tables = study.db
        .prepare("SELECT name, sql FROM sqlite_master WHERE type = 'table' AND name LIKE 'purification_%'")
        .all() as { name: string; sql: string }[];
      expect(tables.map((t) => t.name).sort()).toEqual(['purification_decision', 'purification_round']);
      for (const t of tables) expect(t.sql).toMatch(/STRICT\s*$/);

      study.db
        .prepare(
          `INSERT INTO purification_round (id, number, dataset_id, items, run_id, started_from_round, created_at)
           VALUES (1, 1, 1, '[{"itemId":1,"code":"TR1","facetId":1,"keying":"forward"}]', 1, NULL, 'now')`,
        )
        .run();
      const decide = study.db.prepare(
        `INSERT INTO purification_decision (round_id, item_id, item_code, action, from_facet_id, to_facet_id,
           domain_rationale, statistical_rationale, statistics_only, reverses_id, decided_at, decided_by)
         VALUES (1, 1, 'TR1', ?, 1, ?, ?, ?, ?, ?, 'now', 'T')`,
      );
      decide.run('drop', null, '', 'alpha rises', 1, null);
      decide.run('restore', null, 'belongs to traffic', '', 0, 1);
      decide.run('move', 2, 'about choosing a route', '', 0, null);
      expect(study.db.prepare('SELECT count(*) FROM purification_decision').pluck().get()).toBe(3);

      // The constraints keep every row meaningful.
      const refused: [unknown[], RegExp][] = [
        [['move', null, 'x', '', 0, null], /CHECK constraint failed/],
        [['keep', 2, 'x', '', 0, null], /CHECK constraint failed/],
        [['keep', null, ' ', '', 0, null], /CHECK constraint failed/],
        [['drop', null, '', 'alpha rises', 0, null], /CHECK constraint failed/],
        [['drop', null, 'outside the domain', '', 1, null], /CHECK constraint failed/],
        [['retire', null, 'x', '', 0, null], /CHECK constraint failed/],
        [['restore', null, 'x', '', 0, 99], /FOREIGN KEY constraint failed/],
      ];
      for (const [values, message] of refused)
        expect(() => decide.run(...values), String(values)).toThrow(message);
      expect(() =>
        study.db
          .prepare(
            "INSERT INTO purification_round (number, dataset_id, items, run_id, created_at) VALUES (2, 1, '{}', 1, 'now')",
          )
          .run(),
      ).toThrow(/CHECK constraint failed/);

      // Rounds and decisions are kept as made.
      expect(() => study.db.prepare("UPDATE purification_decision SET action = 'keep'").run()).toThrow(
        'item decisions are kept as made; reverse one with a later decision',
      );
      expect(() => study.db.prepare('DELETE FROM purification_decision').run()).toThrow(/kept as made/);
      expect(() => study.db.prepare('UPDATE purification_round SET number = 5').run()).toThrow(
        'purification rounds are kept as run; run a new round instead',
      );
      expect(() => study.db.prepare('DELETE FROM purification_round').run()).toThrow(/kept as run/);
    } finally {
      study.close();
    }
  });
});
