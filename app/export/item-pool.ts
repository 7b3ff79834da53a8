import Papa from 'papaparse';
import type { ItemRecord } from '../../db/repos/items.ts';

/** The whole pool (retired items too, with their state) as CSV text that importItems reads back. */
export function itemPoolCsv(
  items: readonly ItemRecord[],
  facetNames: ReadonlyMap<number, string>,
): { fileName: string; text: string; items: number } {
  const data = items.map((it) => [
    it.code,
    it.text,
    it.facetId === null ? '' : (facetNames.get(it.facetId) ?? ''),
    it.keying,
    it.sourceType,
    it.sourceNote,
    it.state,
    String(it.revision),
  ]);
  const text = Papa.unparse(
    { fields: ['code', 'text', 'facet', 'keying', 'source', 'source_note', 'state', 'revisions'], data },
    { newline: '\r\n' },
  );
  return { fileName: 'item-pool.csv', text: `${text}\r\n`, items: items.length };
}
