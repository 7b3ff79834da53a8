import path from 'node:path';
import Database from 'better-sqlite3';
import { afterEach, beforeEach, describe, expect, it } from 'vitest';
import { currentDataset } from '../../../app/phases/analysis-data.ts';
import { listDatasetChoices } from '../../../db/repos/datasets.ts';
import { LATEST_VERSION } from '../../../db/migrations/index.ts';
import { APPLICATION_ID } from '../../../db/study-file.ts';
import { migrate, Study } from '../../../db/study.ts';
import { TEST_ACTOR, tempDir } from '../../helpers/tmp.ts';

let tmp: ReturnType<typeof tempDir>;
beforeEach(() => {
  tmp = tempDir();
});
afterEach(() => tmp.cleanup());

/** A study file at version 4 with two pilot datasets and one retest dataset. */
function buildVersion4(file: string): void {
  const db = new Database(file);
  db.pragma(`application_id = ${APPLICATION_ID}`);
  db.pragma('foreign_keys = ON');
  migrate(db, 0, 4);
  const insert = db.prepare(
    `INSERT INTO dataset (id, role, name, file_name, file_sha256, file_size, file_bytes, reading, mapping, respondents, base, imported_at, imported_by)
     VALUES (?, ?, ?, ?, 'ab', 1, x'00', '{}', '{}', ?, '{}', ?, 'T')`,
  );
  insert.run(1, 'pilot', 'Spring', 'spring.csv', 480, '2025-01-02T00:00:00Z');
  insert.run(2, 'retest', 'Retest', 'retest.csv', 90, '2025-01-03T00:00:00Z');
  insert.run(3, 'pilot', 'Late', 'late.csv', 40, '2025-01-04T00:00:00Z');
  db.close();
}

describe('migration 6: the current dataset of each role', () => {
  it('upgrades a version-4 file, keeps its datasets, and records the latest import of each role as current', () => {
    const file = path.join(tmp.dir, 'v4.scalewright');
    buildVersion4(file);
    const study = Study.open(file, { actor: TEST_ACTOR, app: 'test' });
    try {
      expect(study.version).toBe(LATEST_VERSION);
      expect(study.db.prepare('SELECT name FROM dataset ORDER BY id').pluck().all()).toEqual([
        'Spring',
        'Retest',
        'Late',
      ]);
      // What version 4 used (the latest import of the role) stays what the analyses use.
      expect(currentDataset(study, 'pilot')?.id).toBe(3);
      expect(currentDataset(study, 'retest')?.id).toBe(2);
      expect(currentDataset(study, 'validation')).toBeUndefined();
      expect(listDatasetChoices(study).map((c) => [c.role, c.datasetId, c.decidedAt])).toEqual([
        ['retest', 2, '2025-01-03T00:00:00Z'],
        ['pilot', 3, '2025-01-04T00:00:00Z'],
      ]);
      const sql = study.db
        .prepare("SELECT sql FROM sqlite_master WHERE type = 'table' AND name = 'dataset_choice'")
        .pluck()
        .get() as string;
      expect(sql).toMatch(/STRICT\s*$/);
      expect(() => study.db.exec('DELETE FROM dataset_choice')).toThrow(/never removed/);
      expect(() => study.db.exec('UPDATE dataset_choice SET reason = 1')).toThrow(/never changed/);
    } finally {
      study.close();
    }
  });
});
