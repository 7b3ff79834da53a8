import type { Migration } from './types.ts';

/** Items, their revisions, expert review rounds and ratings. */
export const migration0002: Migration = {
  version: 2,
  name: 'item-pool',
  up(db) {
    db.exec(``);
  },
};
