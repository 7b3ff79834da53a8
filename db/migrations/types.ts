import type { Database } from 'better-sqlite3';

/** One numbered step of the study-file schema. `up` runs inside the caller's transaction. */
export interface Migration {
  version: number;
  name: string;
  up(db: Database): void;
}
