import path from 'node:path';
import Database from 'better-sqlite3';
import { afterEach, beforeEach, describe, expect, it } from 'vitest';
import { getItem, insertItem, insertRevision, listItems, listRevisions } from '../../../db/repos/items.ts';
import { APPLICATION_ID } from '../../../db/study-file.ts';
import { migrate, Study } from '../../../db/study.ts';
import { TEST_ACTOR, tempDir } from '../../helpers/tmp.ts';

const opts = { actor: TEST_ACTOR, app: 'migration test' };
const AT = '2026-04-01T09:00:00.000Z';
let tmp: ReturnType<typeof tempDir>;
let file: string;

/** A study file at version 1 with a construct, two facets and a log row, as version 1 wrote them. */
function buildVersionOne(target: string): void {
  const db = new Database(target);
  db.pragma(`application_id = ${APPLICATION_ID}`);
  migrate(db, 0, 1);
  db.prepare("INSERT INTO study_meta (key, value) VALUES ('title', 'Old study')").run();
  db.prepare(
    "UPDATE construct SET name = 'Everyday Cycling Confidence', response_points = 5 WHERE id = 1",
  ).run();
  db.prepare(
    "INSERT INTO facet (name, definition, position) VALUES ('Confidence in traffic', 'Riding among cars', 1)",
  ).run();
  db.prepare(
    "INSERT INTO facet (name, definition, position) VALUES ('Route planning', 'Choosing a route', 2)",
  ).run();
  db.prepare("INSERT INTO phase_state (phase, state, changed_at) VALUES ('construct', 'signed-off', ?)").run(
    AT,
  );
  db.close();
}

beforeEach(() => {
  tmp = tempDir();
  file = path.join(tmp.dir, 'v1.scalewright');
  buildVersionOne(file);
});
afterEach(() => tmp.cleanup());

describe('migration 0002: item pool and expert review', () => {
  it('upgrades a version-1 study, keeping its construct and facets, and adds the new tables', () => {
    const study = Study.open(file, opts);
    try {
      expect(study.version).toBeGreaterThanOrEqual(2);
      expect(study.meta('title')).toBe('Old study');
      const facets = study.db.prepare('SELECT name FROM facet ORDER BY position').all() as { name: string }[];
      expect(facets.map((f) => f.name)).toEqual(['Confidence in traffic', 'Route planning']);
      const construct = study.db.prepare('SELECT name FROM construct').get() as { name: string };
      expect(construct.name).toBe('Everyday Cycling Confidence');
      const tables = study.db.prepare("SELECT name, sql FROM sqlite_master WHERE type = 'table'").all() as {
        name: string;
        sql: string;
      }[];
      const names = tables.map((t) => t.name);
      for (const table of [
        'item',
        'item_revision',
        'review_round',
        'review_form',
        'review_round_item',
        'review_expert',
        'review_import',
        'review_rating',
        'item_decision',
      ]) {
        expect(names, table).toContain(table);
        expect(tables.find((t) => t.name === table)?.sql, table).toMatch(/STRICT\s*$/);
      }
      expect(listItems(study)).toEqual([]);
    } finally {
      study.close();
    }
  });

  it('maps items to the facets that were already there, and keeps every text change as a revision', () => {
    const study = Study.open(file, opts);
    try {
      const facet = study.db.prepare("SELECT id FROM facet WHERE name = 'Route planning'").get() as {
        id: number;
      };
      const id = insertItem(
        study,
        {
          code: 'RP01',
          text: 'I can plan a route.',
          facetId: facet.id,
          keying: 'forward',
          sourceType: 'interviews',
          sourceNote: '',
          state: 'draft',
        },
        'drafted',
        AT,
      );
      insertRevision(
        study,
        id,
        'I can plan a bike route to a part of the city I do not know.',
        'edited',
        null,
        AT,
      );
      expect(getItem(study, id)?.text).toBe('I can plan a bike route to a part of the city I do not know.');
      expect(getItem(study, id)?.revision).toBe(2);
      expect(listRevisions(study, id).map((r) => r.text)).toEqual([
        'I can plan a route.',
        'I can plan a bike route to a part of the city I do not know.',
      ]);
      expect(() =>
        study.db.prepare('UPDATE item_revision SET text = ? WHERE item_id = ?').run('x', id),
      ).toThrow(/kept as written/);
      expect(() => study.db.prepare('DELETE FROM item_revision WHERE item_id = ?').run(id)).toThrow(
        /kept as written/,
      );
    } finally {
      study.close();
    }
  });

  it('enforces unique codes (ignoring case), foreign keys and the allowed values', () => {
    const study = Study.open(file, opts);
    try {
      const insert = (code: string, facetId: number | null, keying = 'forward') =>
        study.db
          .prepare(
            "INSERT INTO item (code, facet_id, keying, position, created_at) VALUES (?, ?, ?, 1, '2026-04-01')",
          )
          .run(code, facetId, keying);
      insert('TR01', 1);
      expect(() => insert('tr01', 1)).toThrow(/UNIQUE/);
      expect(() => insert('TR02', 99)).toThrow(/FOREIGN KEY/);
      expect(() => insert('TR03', 1, 'sideways')).toThrow(/CHECK/);
      expect(() =>
        study.db
          .prepare('INSERT INTO review_form (round_id, relevance_min, relevance_max) VALUES (1, 1, 4)')
          .run(),
      ).toThrow(/FOREIGN KEY/);
    } finally {
      study.close();
    }
  });
});
