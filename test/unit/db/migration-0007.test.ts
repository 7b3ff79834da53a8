import path from 'node:path';
import Database from 'better-sqlite3';
import { afterEach, beforeEach, describe, expect, it } from 'vitest';
import { LATEST_VERSION } from '../../../db/migrations/index.ts';
import { getConstruct, setScoreUse } from '../../../db/repos/construct.ts';
import { APPLICATION_ID } from '../../../db/study-file.ts';
import { migrate, Study } from '../../../db/study.ts';
import { TEST_ACTOR, tempDir } from '../../helpers/tmp.ts';

let tmp: ReturnType<typeof tempDir>;
beforeEach(() => {
  tmp = tempDir();
});
afterEach(() => tmp.cleanup());

describe('migration 7: the use of scores', () => {
  it('upgrades a version-6 file, keeps the construct, starts with no use stated, and refuses unknown uses', () => {
    const file = path.join(tmp.dir, 'v6.scalewright');
    const db = new Database(file);
    db.pragma(`application_id = ${APPLICATION_ID}`);
    db.pragma('foreign_keys = ON');
    migrate(db, 0, 6);
    db.prepare(
      "UPDATE construct SET name = 'Trail reading', intended_uses = 'Group comparisons' WHERE id = 1",
    ).run();
    db.close();

    const study = Study.open(file, { actor: TEST_ACTOR, app: 'test' });
    try {
      expect(study.version).toBe(LATEST_VERSION);
      const construct = getConstruct(study);
      expect(construct.name).toBe('Trail reading');
      expect(construct.intendedUses).toBe('Group comparisons');
      expect(construct.scoreUse).toBeNull();
      setScoreUse(study, 'basic-research');
      expect(getConstruct(study).scoreUse).toBe('basic-research');
      expect(() => study.db.prepare("UPDATE construct SET score_use = 'hiring' WHERE id = 1").run()).toThrow(
        /CHECK constraint failed/,
      );
    } finally {
      study.close();
    }
  });
});
