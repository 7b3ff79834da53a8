import type { Study } from '../study.ts';

export const ITEM_KEYINGS = ['forward', 'reverse'] as const;
export type ItemKeying = (typeof ITEM_KEYINGS)[number];

/** Where an item came from: the literature, interviews, an expert's suggestion, or the team's own drafting. */
export const ITEM_SOURCES = ['literature', 'interviews', 'expert-suggestion', 'own-drafting'] as const;
export type ItemSource = (typeof ITEM_SOURCES)[number];

/** draft: still being written; kept: kept for expert review and beyond; retired: taken out of the pool. */
export const ITEM_STATES = ['draft', 'kept', 'retired'] as const;
export type ItemState = (typeof ITEM_STATES)[number];

/** Longest item wording accepted (characters); the wording checks flag long items well before this. */
export const MAX_ITEM_TEXT = 600;

/** Item codes: a letter or digit, then up to 19 letters, digits, dots, dashes or underscores. */
export const ITEM_CODE_PATTERN = /^[A-Za-z0-9][A-Za-z0-9._-]{0,19}$/;

/** Largest item-pool file read in one import (a pool of a few hundred items is a few kilobytes). */
export const MAX_ITEM_FILE_BYTES = 2 * 1024 * 1024;

/** Most items one import may bring in (a larger pool is split over several files). */
export const MAX_IMPORT_ITEMS = 500;

export const SOURCE_LABEL: Record<ItemSource, string> = {
  literature: 'literature',
  interviews: 'interviews',
  'expert-suggestion': 'expert suggestion',
  'own-drafting': 'own drafting',
};

export const REVISION_REASONS = ['drafted', 'edited', 'imported', 'revised-after-review'] as const;
export type RevisionReason = (typeof REVISION_REASONS)[number];

export interface ItemRecord {
  id: number;
  code: string;
  /** The current wording: the text of the latest revision. */
  text: string;
  facetId: number | null;
  keying: ItemKeying;
  sourceType: ItemSource;
  sourceNote: string;
  state: ItemState;
  position: number;
  /** Number of the latest revision (1 for an item never reworded). */
  revision: number;
  revisionId: number;
  createdAt: string;
}

export interface RevisionRecord {
  id: number;
  itemId: number;
  number: number;
  text: string;
  reason: RevisionReason;
  roundId: number | null;
  createdAt: string;
}

export interface NewItem {
  code: string;
  text: string;
  facetId: number | null;
  keying: ItemKeying;
  sourceType: ItemSource;
  sourceNote: string;
  state: ItemState;
}

const ITEM_SELECT = `
  SELECT i.id, i.code, r.text, i.facet_id AS facetId, i.keying, i.source_type AS sourceType,
         i.source_note AS sourceNote, i.state, i.position, r.number AS revision, r.id AS revisionId,
         i.created_at AS createdAt
  FROM item i
  JOIN item_revision r ON r.item_id = i.id
   AND r.number = (SELECT max(number) FROM item_revision WHERE item_id = i.id)`;

/** Every item in pool order (retired ones included; callers filter). */
export function listItems(study: Study): ItemRecord[] {
  return study.db.prepare(`${ITEM_SELECT} ORDER BY i.position, i.id`).all() as ItemRecord[];
}

export function getItem(study: Study, id: number): ItemRecord | undefined {
  return study.db.prepare(`${ITEM_SELECT} WHERE i.id = ?`).get(id) as ItemRecord | undefined;
}

/** Codes are matched without regard to letter case (TR01 and tr01 are the same item). */
export function getItemByCode(study: Study, code: string): ItemRecord | undefined {
  return study.db.prepare(`${ITEM_SELECT} WHERE i.code = ? COLLATE NOCASE`).get(code) as
    | ItemRecord
    | undefined;
}

/** Inserts an item with its first revision; returns the item id. */
export function insertItem(study: Study, item: NewItem, reason: RevisionReason, at: string): number {
  const next = study.db.prepare('SELECT coalesce(max(position), 0) + 1 AS p FROM item').get() as {
    p: number;
  };
  const id = Number(
    study.db
      .prepare(
        `INSERT INTO item (code, facet_id, keying, source_type, source_note, state, position, created_at)
         VALUES (?, ?, ?, ?, ?, ?, ?, ?)`,
      )
      .run(item.code, item.facetId, item.keying, item.sourceType, item.sourceNote, item.state, next.p, at)
      .lastInsertRowid,
  );
  insertRevision(study, id, item.text, reason, null, at);
  return id;
}

/** Appends a revision (the next number) and returns its id; earlier revisions stay as they were. */
export function insertRevision(
  study: Study,
  itemId: number,
  text: string,
  reason: RevisionReason,
  roundId: number | null,
  at: string,
): number {
  const next = study.db
    .prepare('SELECT coalesce(max(number), 0) + 1 AS n FROM item_revision WHERE item_id = ?')
    .get(itemId) as { n: number };
  return Number(
    study.db
      .prepare(
        `INSERT INTO item_revision (item_id, number, text, reason, round_id, created_at)
         VALUES (?, ?, ?, ?, ?, ?)`,
      )
      .run(itemId, next.n, text, reason, roundId, at).lastInsertRowid,
  );
}

export function listRevisions(study: Study, itemId: number): RevisionRecord[] {
  return study.db
    .prepare(
      `SELECT id, item_id AS itemId, number, text, reason, round_id AS roundId, created_at AS createdAt
       FROM item_revision WHERE item_id = ? ORDER BY number`,
    )
    .all(itemId) as RevisionRecord[];
}

export function getRevision(study: Study, id: number): RevisionRecord | undefined {
  return study.db
    .prepare(
      `SELECT id, item_id AS itemId, number, text, reason, round_id AS roundId, created_at AS createdAt
       FROM item_revision WHERE id = ?`,
    )
    .get(id) as RevisionRecord | undefined;
}

export interface ItemFields {
  code?: string;
  facetId?: number | null;
  keying?: ItemKeying;
  sourceType?: ItemSource;
  sourceNote?: string;
}

const FIELD_COLUMN: Record<keyof ItemFields, string> = {
  code: 'code',
  facetId: 'facet_id',
  keying: 'keying',
  sourceType: 'source_type',
  sourceNote: 'source_note',
};

export function updateItemFields(study: Study, id: number, fields: ItemFields): void {
  for (const key of Object.keys(FIELD_COLUMN) as (keyof ItemFields)[]) {
    const value = fields[key];
    if (value === undefined) continue;
    study.db.prepare(`UPDATE item SET ${FIELD_COLUMN[key]} = ? WHERE id = ?`).run(value, id);
  }
}

export function setItemState(study: Study, id: number, state: ItemState): void {
  study.db.prepare('UPDATE item SET state = ? WHERE id = ?').run(state, id);
}
