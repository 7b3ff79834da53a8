import type { Database } from 'better-sqlite3';
import type { Actor } from '../decision-log.ts';

/** What a migration may need beyond the database: who is upgrading the file (for a logged row). */
export interface MigrationContext {
  actor: Actor;
}

/** One numbered step of the study-file schema. `up` runs inside the caller's transaction. */
export interface Migration {
  version: number;
  name: string;
  up(db: Database, context: MigrationContext): void;
}
