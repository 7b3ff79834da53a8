/** The items phase: its rules (checklist, gates), its actions (each write with its decision) and its views. */
export * from './actions.ts';
export * from './rules.ts';
export * from './views.ts';
/** SHA-256 of a file's bytes, stored with every import so the file can be recognised later. */
export { sha256Hex } from '../../import/sha256.ts';
export {
  ITEM_CODE_PATTERN,
  MAX_IMPORT_ITEMS,
  MAX_ITEM_FILE_BYTES,
  MAX_ITEM_TEXT,
  SOURCE_LABEL,
} from '../../../db/repos/items.ts';
export type { FileProblem } from '../../import/file-problem.ts';
export { tableProblem } from '../../import/file-problem.ts';
export type { ImportRow, ItemImportPreview } from '../../import/item-pool.ts';
