import { migration0001 } from './0001-core.ts';
import { migration0002 } from './0002-item-pool.ts';
import { migration0003 } from './0003-datasets.ts';
import { migration0004 } from './0004-purification.ts';
import { migration0005 } from './0005-content-digests.ts';
import { migration0006 } from './0006-dataset-choice.ts';
import { migration0007 } from './0007-score-use.ts';
import { migration0008 } from './0008-validity.ts';
import type { Migration } from './types.ts';

/** Every migration, in order. A new one is a new numbered file appended here (see DEVELOPERS.md). */
export const MIGRATIONS: readonly Migration[] = [
  migration0001,
  migration0002,
  migration0003,
  migration0004,
  migration0005,
  migration0006,
  migration0007,
  migration0008,
];

for (let i = 0; i < MIGRATIONS.length; i++) {
  if (MIGRATIONS[i].version !== i + 1) {
    throw new Error(`migration list out of order: position ${i + 1} holds version ${MIGRATIONS[i].version}`);
  }
}

export const LATEST_VERSION = MIGRATIONS.length;
