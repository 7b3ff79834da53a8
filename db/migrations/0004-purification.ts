import type { Migration } from './types.ts';

/** Purification rounds and item decisions. */
export const migration0004: Migration = {
  version: 4,
  name: 'purification',
  up(db) {
    db.exec(``);
  },
};
