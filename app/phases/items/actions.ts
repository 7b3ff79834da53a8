import { type FacetRecord, listFacets } from '../../../db/repos/construct.ts';
import {
  getItemByCode,
  type ItemFields,
  type ItemKeying,
  type ItemRecord,
  type ItemSource,
  type ItemState,
  insertItem,
  insertRevision,
  type NewItem,
  setItemState,
  updateItemFields,
  ITEM_CODE_PATTERN,
  MAX_ITEM_TEXT,
} from '../../../db/repos/items.ts';
import type { Study } from '../../../db/study.ts';
import { changeInPhase } from '../change.ts';
import { RuleError } from '../errors.ts';
import { previewItemImport, requireItem } from './views.ts';

function requireEditable(item: ItemRecord): void {
  if (item.state === 'retired') {
    throw new RuleError(`item ${item.code} is retired; restore it before changing it`);
  }
}

function checkCode(study: Study, raw: string, exceptId?: number): string {
  const code = raw.trim();
  if (code === '') throw new RuleError('an item needs a code');
  if (!ITEM_CODE_PATTERN.test(code)) {
    throw new RuleError(
      `item code "${code}" cannot be used: start with a letter or digit and use up to 20 letters, digits, dots, dashes or underscores`,
    );
  }
  const clash = getItemByCode(study, code);
  if (clash && clash.id !== exceptId) {
    throw new RuleError(`an item with code ${clash.code} already exists (codes ignore letter case)`);
  }
  return code;
}

function checkText(raw: string): string {
  const text = raw.trim();
  if (text === '') throw new RuleError('an item needs its wording');
  if (text.length > MAX_ITEM_TEXT) {
    throw new RuleError(`item wording is ${text.length} characters, above the limit of ${MAX_ITEM_TEXT}`);
  }
  return text;
}

function checkFacet(study: Study, facetId: number | null): FacetRecord | null {
  if (facetId === null) return null;
  const facet = listFacets(study).find((f) => f.id === facetId);
  if (!facet) throw new RuleError(`facet ${facetId} is not an active facet of this study`, 'not-found');
  return facet;
}

export interface ItemInput {
  code: string;
  text: string;
  facetId: number | null;
  keying: ItemKeying;
  sourceType: ItemSource;
  sourceNote: string;
}

/** Adds a draft item with its first revision. */
export function addItem(study: Study, input: ItemInput): number {
  const code = checkCode(study, input.code);
  const text = checkText(input.text);
  const facet = checkFacet(study, input.facetId);
  const item: NewItem = { ...input, code, text, sourceNote: input.sourceNote.trim(), state: 'draft' };
  return changeInPhase(
    study,
    {
      phase: 'items',
      kind: 'item-added',
      target: `item ${code}`,
      detail: {
        code,
        text,
        facet: facet?.name ?? null,
        keying: input.keying,
        source: input.sourceType,
        sourceNote: item.sourceNote,
      },
    },
    () => insertItem(study, item, 'drafted', new Date().toISOString()),
  );
}

/** Rewords an item: a new revision is added, the earlier wording stays in the study. */
export function rewordItem(study: Study, id: number, rawText: string): void {
  const item = requireItem(study, id);
  requireEditable(item);
  const text = checkText(rawText);
  if (text === item.text) return;
  changeInPhase(
    study,
    {
      phase: 'items',
      kind: 'item-reworded',
      target: `item ${item.code}`,
      detail: { revision: item.revision + 1, before: item.text, after: text },
    },
    () => insertRevision(study, id, text, 'edited', null, new Date().toISOString()),
  );
}

/** Changes an item's code, facet, keying or source; each change is logged with before and after. */
export function editItem(study: Study, id: number, fields: ItemFields): void {
  const item = requireItem(study, id);
  requireEditable(item);
  const clean: ItemFields = {};
  const changed: Record<string, { before: unknown; after: unknown }> = {};
  const facetNames = new Map(listFacets(study, { includeRetired: true }).map((f) => [f.id, f.name]));
  if (fields.code !== undefined) {
    const code = checkCode(study, fields.code, id);
    if (code !== item.code) {
      clean.code = code;
      changed.code = { before: item.code, after: code };
    }
  }
  if (fields.facetId !== undefined && fields.facetId !== item.facetId) {
    const facet = checkFacet(study, fields.facetId);
    clean.facetId = fields.facetId;
    changed.facet = {
      before: item.facetId === null ? null : (facetNames.get(item.facetId) ?? null),
      after: facet?.name ?? null,
    };
  }
  if (fields.keying !== undefined && fields.keying !== item.keying) {
    clean.keying = fields.keying;
    changed.keying = { before: item.keying, after: fields.keying };
  }
  if (fields.sourceType !== undefined && fields.sourceType !== item.sourceType) {
    clean.sourceType = fields.sourceType;
    changed.source = { before: item.sourceType, after: fields.sourceType };
  }
  if (fields.sourceNote !== undefined && fields.sourceNote.trim() !== item.sourceNote) {
    clean.sourceNote = fields.sourceNote.trim();
    changed.sourceNote = { before: item.sourceNote, after: clean.sourceNote };
  }
  if (Object.keys(changed).length === 0) return;
  changeInPhase(
    study,
    {
      phase: 'items',
      kind: changed.facet && Object.keys(changed).length === 1 ? 'item-mapped' : 'item-edited',
      target: `item ${item.code}`,
      detail: { itemId: id, ...changed },
    },
    () => updateItemFields(study, id, clean),
  );
}

/**
 * Moves an item between draft and kept for review, or retires / restores it. Retiring and
 * restoring need a rationale; the log keeps it.
 */
export function changeItemState(study: Study, id: number, state: ItemState, rationale = ''): void {
  const item = requireItem(study, id);
  if (item.state === state) return;
  const why = rationale.trim();
  if ((state === 'retired' || item.state === 'retired') && why === '') {
    throw new RuleError(`say why item ${item.code} is ${state === 'retired' ? 'retired' : 'restored'}`);
  }
  const kind =
    state === 'retired' ? 'item-retired' : item.state === 'retired' ? 'item-restored' : `item-${state}`;
  changeInPhase(
    study,
    {
      phase: 'items',
      kind,
      target: `item ${item.code}`,
      rationale: why,
      detail: { itemId: id, before: item.state, after: state },
    },
    () => setItemState(study, id, state),
  );
}

/**
 * Imports an item pool in one transaction after reading it again (the preview may be stale): any
 * problem refuses the whole file and nothing is written. Items start as drafts; a row without a
 * source takes the batch's source.
 */
export function importItems(
  study: Study,
  bytes: Uint8Array,
  fileName: string,
  batch: { sourceType: ItemSource; sourceNote: string },
): { added: number; codes: string[] } {
  const preview = previewItemImport(study, bytes, fileName);
  if (preview.problems.length > 0) {
    const more = preview.problems.length > 1 ? ` (and ${preview.problems.length - 1} more)` : '';
    throw new RuleError(`${fileName} was not imported: ${preview.problems[0].text}${more}`, 'file');
  }
  const codes = preview.rows.map((r) => r.code);
  const at = new Date().toISOString();
  changeInPhase(
    study,
    {
      phase: 'items',
      kind: 'items-imported',
      target: `file "${fileName}"`,
      detail: {
        fileName,
        sha256: preview.sha256,
        items: codes.length,
        codes,
        source: batch.sourceType,
        sourceNote: batch.sourceNote.trim(),
      },
    },
    () => {
      for (const r of preview.rows) {
        insertItem(
          study,
          {
            code: r.code,
            text: r.text,
            facetId: r.facetId,
            keying: r.keying,
            sourceType: r.sourceType ?? batch.sourceType,
            sourceNote: r.sourceNote || batch.sourceNote.trim(),
            state: 'draft',
          },
          'imported',
          at,
        );
      }
    },
  );
  return { added: codes.length, codes };
}
