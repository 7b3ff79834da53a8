import { getItem } from '../../../db/repos/items.ts';
import { ruleThreshold } from '../../engine/methods/index.ts';
import { RuleError } from '../errors.ts';
import { type FacetRecord, listFacets } from '../../../db/repos/construct.ts';
import {
  getItemByCode,
  type ItemRecord,
  listItems,
  listRevisions,
  MAX_ITEM_FILE_BYTES,
} from '../../../db/repos/items.ts';
import type { Study } from '../../../db/study.ts';
import {
  checkItemWording,
  findNearDuplicates,
  type NearDuplicate,
  textSimilarity,
  NEAR_DUPLICATE_THRESHOLD,
  type WordingReport,
} from '../../engine/wording.ts';
import { itemPoolCsv } from '../../export/item-pool.ts';
import { type ItemImportPreview, readItemPool } from '../../import/item-pool.ts';

/**
 * Common practice: a facet needs at least three items to be measured at all (and a draft pool
 * several times the final number); fewer is a warning in the coverage view and blocks sign-off.
 */
export const MIN_ITEMS_PER_FACET = ruleThreshold('pool.items-per-facet', 'minimum');

export function requireItem(study: Study, id: number): ItemRecord {
  const item = getItem(study, id);
  if (!item) throw new RuleError(`item ${id} does not exist in this study`, 'not-found');
  return item;
}

export interface ItemView extends ItemRecord {
  facetName: string | null;
  wording: WordingReport;
  /** Codes of the other items in the pool worded almost alike (see findNearDuplicates). */
  nearDuplicates: string[];
}

export interface FacetCoverage {
  facetId: number;
  facetName: string;
  definition: string;
  /** Items in the pool (not retired), with their codes. */
  items: number;
  codes: string[];
  kept: number;
  draft: number;
  reverse: number;
  /** reverse / items; null for a facet without items. */
  reverseShare: number | null;
  warning: string | null;
}

export function activeItems(study: Study): ItemRecord[] {
  return listItems(study).filter((it) => it.state !== 'retired');
}

export function coverageOf(facets: readonly FacetRecord[], items: readonly ItemRecord[]): FacetCoverage[] {
  return facets.map((facet) => {
    const mine = items.filter((it) => it.facetId === facet.id);
    const reverse = mine.filter((it) => it.keying === 'reverse').length;
    return {
      facetId: facet.id,
      facetName: facet.name,
      definition: facet.definition,
      items: mine.length,
      codes: mine.map((it) => it.code),
      kept: mine.filter((it) => it.state === 'kept').length,
      draft: mine.filter((it) => it.state === 'draft').length,
      reverse,
      reverseShare: mine.length === 0 ? null : reverse / mine.length,
      warning:
        mine.length < MIN_ITEMS_PER_FACET
          ? `${mine.length === 0 ? 'no items' : `only ${mine.length} item${mine.length === 1 ? '' : 's'}`}: fewer than ${MIN_ITEMS_PER_FACET} (common practice: draft several times the number the final scale will keep)`
          : null,
    };
  });
}

/** Near-duplicate pairs among the items still in the pool. */
function poolDuplicates(items: readonly ItemRecord[]): NearDuplicate[] {
  return findNearDuplicates(items.map((it) => ({ code: it.code, text: it.text })));
}

/** The pool as the item pool screen shows it: every item with its wording checks, facet coverage and near duplicates. */
export function itemsView(study: Study) {
  const facets = listFacets(study);
  const all = listItems(study);
  const active = all.filter((it) => it.state !== 'retired');
  const pairs = poolDuplicates(active);
  const names = new Map(listFacets(study, { includeRetired: true }).map((f) => [f.id, f.name]));
  const items: ItemView[] = all.map((it) => ({
    ...it,
    facetName: it.facetId === null ? null : (names.get(it.facetId) ?? null),
    wording: checkItemWording(it.text),
    nearDuplicates:
      it.state === 'retired'
        ? []
        : pairs.flatMap((p) => (p.a === it.code ? [p.b] : p.b === it.code ? [p.a] : [])),
  }));
  const activeFacetIds = new Set(facets.map((f) => f.id));
  return {
    facets,
    items,
    coverage: coverageOf(facets, active),
    unmapped: active
      .filter((it) => it.facetId === null || !activeFacetIds.has(it.facetId))
      .map((it) => it.code),
    nearDuplicates: pairs,
    nearDuplicateThreshold: NEAR_DUPLICATE_THRESHOLD,
    minItemsPerFacet: MIN_ITEMS_PER_FACET,
    maxFileBytes: MAX_ITEM_FILE_BYTES,
  };
}

/**
 * Wording checks for a text being typed, with the pool items it nearly duplicates (the item being
 * edited, `itemId`, and retired items are left out of the comparison).
 */
export function checkWording(study: Study, text: string, itemId?: number) {
  const others = activeItems(study).filter((it) => it.id !== itemId);
  const duplicates = others
    .map((it) => ({ code: it.code, similarity: textSimilarity(text, it.text) }))
    .filter((d) => d.similarity >= NEAR_DUPLICATE_THRESHOLD)
    .sort((a, b) => b.similarity - a.similarity);
  return { wording: checkItemWording(text), duplicates };
}

/** Every wording an item has had, oldest first. */
export function itemRevisions(study: Study, id: number) {
  requireItem(study, id);
  return listRevisions(study, id);
}

/**
 * Reads an item-pool file (columns code, text, facet, keying; optionally source and source_note)
 * against this study's facets and pool, without writing anything.
 */
export function previewItemImport(study: Study, bytes: Uint8Array, fileName: string): ItemImportPreview {
  return readItemPool(bytes, fileName, {
    facets: listFacets(study),
    retiredFacets: listFacets(study, { includeRetired: true }).filter((f) => f.retiredAt),
    itemByCode: (code) => getItemByCode(study, code),
  });
}

/** The whole pool (retired items too, with their state) as CSV text that importItems reads back. */
export function exportItemsCsv(study: Study): { fileName: string; text: string; items: number } {
  const names = new Map(listFacets(study, { includeRetired: true }).map((f) => [f.id, f.name]));
  return itemPoolCsv(listItems(study), names);
}
