import type Database from 'better-sqlite3';
import { Study } from '../../db/study.ts';
import { TEST_ACTOR } from './tmp.ts';

/** Opens a study file read-only, hands it to `read`, and closes it again. */
export function withStudy<T>(file: string, read: (study: Study) => T): T {
  const study = Study.open(file, { actor: TEST_ACTOR, app: 'test', mode: 'read' });
  try {
    return read(study);
  } finally {
    study.close();
  }
}

/** The id of the first stored analysis run of a kind. */
export function runIdOf(db: Database.Database, kind: string): number {
  return (db.prepare('SELECT min(id) AS id FROM analysis_run WHERE kind = ?').get(kind) as { id: number }).id;
}
