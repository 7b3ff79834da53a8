import { z } from 'zod';
import { ITEM_KEYINGS, ITEM_SOURCES, ITEM_STATES } from '../../../db/repos/items.ts';
import {
  addItem,
  changeItemState,
  checkWording,
  editItem,
  exportItemsCsv,
  importItems,
  ITEM_CODE_PATTERN,
  itemRevisions,
  itemsView,
  MAX_ITEM_FILE_BYTES,
  MAX_ITEM_TEXT,
  previewItemImport,
  rewordItem,
} from '../../phases/items/index.ts';
import { command } from '../define.ts';
import { id, text } from './schemas.ts';

const BASE64 = /^[A-Za-z0-9+/]*={0,2}$/;

/**
 * A file the renderer read and sends inside the command's JSON input: its name (for messages) and
 * its bytes as base64, limited so that one command stays small.
 */
export function uploadedFile(maxBytes: number) {
  return {
    fileName: text(255).trim().min(1, 'the file needs a name'),
    content: z
      .string()
      .max(Math.ceil(maxBytes / 3) * 4, `the file is larger than ${maxBytes} bytes`)
      .regex(BASE64, 'the file content must be base64'),
  };
}

export function fileBytes(content: string): Uint8Array {
  return new Uint8Array(Buffer.from(content, 'base64'));
}

const code = text(20).regex(
  ITEM_CODE_PATTERN,
  'a code is a letter or digit, then up to 19 letters, digits, . - or _',
);
const facetId = id.nullable();
const keying = z.enum(ITEM_KEYINGS);
const sourceType = z.enum(ITEM_SOURCES);
const itemText = text(MAX_ITEM_TEXT);

/** Phase 2: the item pool, its wording checks, import and export. */
export const itemsCommands = {
  'items.get': command(z.object({}), (s) => itemsView(s.study)),
  'items.checkWording': command(z.object({ text: itemText, itemId: id.optional() }), (s, input) =>
    checkWording(s.study, input.text, input.itemId),
  ),
  'items.revisions': command(z.object({ id }), (s, input) => itemRevisions(s.study, input.id)),
  'items.add': command(
    z.object({ code, text: itemText, facetId, keying, sourceType, sourceNote: text(1_000) }),
    (s, input) => addItem(s.study, input),
  ),
  'items.reword': command(z.object({ id, text: itemText }), (s, input) =>
    rewordItem(s.study, input.id, input.text),
  ),
  'items.edit': command(
    z.object({
      id,
      code: code.optional(),
      facetId: facetId.optional(),
      keying: keying.optional(),
      sourceType: sourceType.optional(),
      sourceNote: text(1_000).optional(),
    }),
    (s, { id: itemId, ...fields }) => editItem(s.study, itemId, fields),
  ),
  'items.setState': command(
    z.object({ id, state: z.enum(ITEM_STATES), rationale: text(10_000).default('') }),
    (s, input) => changeItemState(s.study, input.id, input.state, input.rationale),
  ),
  'items.previewImport': command(z.object(uploadedFile(MAX_ITEM_FILE_BYTES)), (s, input) =>
    previewItemImport(s.study, fileBytes(input.content), input.fileName),
  ),
  'items.import': command(
    z.object({ ...uploadedFile(MAX_ITEM_FILE_BYTES), sourceType, sourceNote: text(1_000).default('') }),
    (s, input) =>
      importItems(s.study, fileBytes(input.content), input.fileName, {
        sourceType: input.sourceType,
        sourceNote: input.sourceNote,
      }),
  ),
  'items.exportCsv': command(z.object({}), (s) => exportItemsCsv(s.study)),
};
