import type { Migration } from './types.ts';

/** Imported data files, their columns and respondent exclusions. */
export const migration0003: Migration = {
  version: 3,
  name: 'datasets',
  up(db) {
    db.exec(``);
  },
};
