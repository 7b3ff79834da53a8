import { sha256Hex } from '../import/sha256.ts';
import { ruleThreshold } from '../engine/methods/index.ts';
import Papa from 'papaparse';
import { type FacetRecord, listFacets } from '../../db/repos/construct.ts';
import {
  getItem,
  getItemByCode,
  ITEM_SOURCES,
  type ItemFields,
  type ItemKeying,
  type ItemRecord,
  type ItemSource,
  type ItemState,
  insertItem,
  insertRevision,
  listItems,
  listRevisions,
  type NewItem,
  setItemState,
  updateItemFields,
} from '../../db/repos/items.ts';
import type { Study } from '../../db/study.ts';
import {
  checkItemWording,
  findNearDuplicates,
  type NearDuplicate,
  textSimilarity,
  NEAR_DUPLICATE_THRESHOLD,
  type WordingReport,
} from '../engine/wording.ts';
import { delimiterName } from '../import/detect-format.ts';
import { parseTable, TableError } from '../import/parse-table.ts';
import { describeProblem } from '../import/ratings.ts';
import { changeInPhase } from './change.ts';
import { RuleError } from './errors.ts';
import type { ChecklistItem, PhaseRules } from './types.ts';

/**
 * Common practice: a facet needs at least three items to be measured at all (and a draft pool
 * several times the final number); fewer is a warning in the coverage view and blocks sign-off.
 */
export const MIN_ITEMS_PER_FACET = ruleThreshold('pool.items-per-facet', 'minimum');

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

/** SHA-256 of a file's bytes, stored with every import so the file can be recognised later. */
export { sha256Hex };

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

function activeItems(study: Study): ItemRecord[] {
  return listItems(study).filter((it) => it.state !== 'retired');
}

function coverageOf(facets: readonly FacetRecord[], items: readonly ItemRecord[]): FacetCoverage[] {
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

function requireItem(study: Study, id: number): ItemRecord {
  const item = getItem(study, id);
  if (!item) throw new RuleError(`item ${id} does not exist in this study`, 'not-found');
  return item;
}

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

/** One cell or row of an item-pool file that cannot be imported. */
export interface FileProblem {
  row: number;
  column: string;
  message: string;
  /** The one-line form, naming row and column: "row 4, column 3 ('facet'): …". */
  text: string;
}

export interface ImportRow {
  row: number;
  code: string;
  text: string;
  facetName: string | null;
  facetId: number | null;
  keying: ItemKeying;
  sourceType: ItemSource | null;
  sourceNote: string;
  wordingFlags: string[];
}

export interface ItemImportPreview {
  fileName: string;
  sha256: string;
  delimiter: string;
  header: string[];
  rowCount: number;
  /** The rows that can be imported (rows with a problem are left out and listed in `problems`). */
  rows: ImportRow[];
  problems: FileProblem[];
  warnings: string[];
}

const REQUIRED_COLUMNS = ['code', 'text', 'facet', 'keying'] as const;
const OPTIONAL_COLUMNS = ['source', 'source_note'] as const;
const KEYING_WORDS: Record<string, ItemKeying> = {
  forward: 'forward',
  f: 'forward',
  '+': 'forward',
  reverse: 'reverse',
  r: 'reverse',
  '-': 'reverse',
  '−': 'reverse',
};
const SOURCE_WORDS: Record<string, ItemSource> = {
  literature: 'literature',
  interviews: 'interviews',
  interview: 'interviews',
  'expert-suggestion': 'expert-suggestion',
  'expert suggestion': 'expert-suggestion',
  expert: 'expert-suggestion',
  'own-drafting': 'own-drafting',
  'own drafting': 'own-drafting',
  own: 'own-drafting',
};

function problemAt(row: number, column: string, message: string, header: readonly string[]): FileProblem {
  const problem = { row, column, message };
  return { ...problem, text: describeProblem(problem, header) };
}

/** A problem for a file that is not a readable table at all (empty, binary, ragged, broken quotes). */
export function tableProblem(error: TableError): FileProblem {
  const row = error.row ?? 1;
  const column = error.column ?? '';
  const message = error.message;
  const text = /^row \d+/.test(message) ? message : `row ${row}: ${message}`;
  return { row, column, message, text };
}

/**
 * Reads an item-pool file (columns code, text, facet, keying; optionally source and source_note)
 * without writing anything: every row parsed, every problem named by row and column.
 */
export function previewItemImport(study: Study, bytes: Uint8Array, fileName: string): ItemImportPreview {
  const sha256 = sha256Hex(bytes);
  const empty = { fileName, sha256, delimiter: '', header: [], rowCount: 0, rows: [], warnings: [] };
  let table: ReturnType<typeof parseTable>;
  try {
    table = parseTable(bytes, { fileName, maxBytes: MAX_ITEM_FILE_BYTES });
  } catch (error) {
    if (error instanceof TableError) return { ...empty, problems: [tableProblem(error)] };
    throw error;
  }
  const { header } = table;
  const folded = header.map((h) => h.trim().toLowerCase().replace(/\s+/g, '_'));
  const problems: FileProblem[] = [];
  const warnings = [...table.warnings];
  const at: Record<string, number> = {};
  folded.forEach((name, i) => {
    if (
      (REQUIRED_COLUMNS as readonly string[]).includes(name) ||
      (OPTIONAL_COLUMNS as readonly string[]).includes(name)
    ) {
      at[name] = i;
    } else {
      warnings.push(
        `column '${header[i]}' is not read (an item-pool file uses ${[...REQUIRED_COLUMNS, ...OPTIONAL_COLUMNS].join(', ')})`,
      );
    }
  });
  const absent = REQUIRED_COLUMNS.filter((c) => at[c] === undefined);
  if (absent.length > 0) {
    problems.push(
      problemAt(
        1,
        '',
        `the header lacks ${absent.map((c) => `'${c}'`).join(', ')}; an item-pool file needs code, text, facet, keying (found ${header.join(', ')})`,
        header,
      ),
    );
    return { ...empty, delimiter: delimiterName(table.delimiter), header, problems, warnings };
  }
  const facets = listFacets(study);
  const retiredFacets = listFacets(study, { includeRetired: true }).filter((f) => f.retiredAt);
  const facetList = facets.map((f) => f.name).join(', ');
  const seen = new Map<string, number>();
  const rows: ImportRow[] = [];
  const blankKeying: number[] = [];
  const blankFacet: number[] = [];
  const col = (name: string) => header[at[name]];
  table.rows.forEach((cells, i) => {
    const row = table.rowNumbers?.[i] ?? i + 2;
    const before = problems.length;
    const code = cells[at.code].trim();
    if (code === '') {
      problems.push(problemAt(row, col('code'), 'the item code is blank', header));
    } else if (!ITEM_CODE_PATTERN.test(code)) {
      problems.push(
        problemAt(
          row,
          col('code'),
          `item code '${code}' cannot be used: start with a letter or digit, then up to 20 letters, digits, dots, dashes or underscores`,
          header,
        ),
      );
    } else {
      const earlier = seen.get(code.toLowerCase());
      const existing = getItemByCode(study, code);
      if (earlier !== undefined) {
        problems.push(
          problemAt(row, col('code'), `item code '${code}' already appears on row ${earlier}`, header),
        );
      } else if (existing) {
        problems.push(
          problemAt(
            row,
            col('code'),
            `item code '${code}' is already in the pool (${existing.code})`,
            header,
          ),
        );
      }
      seen.set(code.toLowerCase(), row);
    }
    const text = cells[at.text].trim();
    if (text === '') problems.push(problemAt(row, col('text'), 'the item wording is blank', header));
    else if (text.length > MAX_ITEM_TEXT) {
      problems.push(
        problemAt(
          row,
          col('text'),
          `the wording is ${text.length} characters, above the limit of ${MAX_ITEM_TEXT}`,
          header,
        ),
      );
    }
    const facetText = cells[at.facet].trim();
    let facet: FacetRecord | null = null;
    if (facetText === '') {
      blankFacet.push(row);
    } else {
      facet = facets.find((f) => f.name.toLowerCase() === facetText.toLowerCase()) ?? null;
      if (!facet) {
        const retired = retiredFacets.some((f) => f.name.toLowerCase() === facetText.toLowerCase());
        problems.push(
          problemAt(
            row,
            col('facet'),
            retired
              ? `facet '${facetText}' is retired; restore it in the construct phase or choose one of ${facetList}`
              : `facet '${facetText}' is not a facet of this study; use one of ${facetList || '(no facets defined yet)'}`,
            header,
          ),
        );
      }
    }
    const keyingText = cells[at.keying].trim().toLowerCase();
    let keying: ItemKeying = 'forward';
    if (keyingText === '') blankKeying.push(row);
    else if (Object.hasOwn(KEYING_WORDS, keyingText)) keying = KEYING_WORDS[keyingText];
    else {
      problems.push(
        problemAt(
          row,
          col('keying'),
          `'${cells[at.keying].trim()}' is not a keying; use forward or reverse`,
          header,
        ),
      );
    }
    let sourceType: ItemSource | null = null;
    if (at.source !== undefined) {
      const sourceText = cells[at.source].trim().toLowerCase();
      if (sourceText !== '') {
        if (Object.hasOwn(SOURCE_WORDS, sourceText)) sourceType = SOURCE_WORDS[sourceText];
        else {
          problems.push(
            problemAt(
              row,
              col('source'),
              `'${cells[at.source].trim()}' is not a source; use ${ITEM_SOURCES.map((s) => SOURCE_LABEL[s]).join(', ')}`,
              header,
            ),
          );
        }
      }
    }
    const sourceNote = at.source_note === undefined ? '' : cells[at.source_note].trim();
    if (problems.length > before || rows.length >= MAX_IMPORT_ITEMS) return;
    rows.push({
      row,
      code,
      text,
      facetName: facet?.name ?? null,
      facetId: facet?.id ?? null,
      keying,
      sourceType,
      sourceNote,
      wordingFlags: checkItemWording(text).flags.map((f) => f.check),
    });
  });
  if (table.rows.length > MAX_IMPORT_ITEMS) {
    problems.push(
      problemAt(
        table.rowNumbers?.[MAX_IMPORT_ITEMS] ?? MAX_IMPORT_ITEMS + 2,
        '',
        `the file has ${table.rows.length} items; one import takes at most ${MAX_IMPORT_ITEMS} (split the file)`,
        header,
      ),
    );
  }
  if (blankKeying.length > 0) {
    warnings.push(`keying is blank on ${rowList(blankKeying)}: read as forward`);
  }
  if (blankFacet.length > 0) {
    warnings.push(`facet is blank on ${rowList(blankFacet)}: those items start unmapped`);
  }
  return {
    fileName,
    sha256,
    delimiter: delimiterName(table.delimiter),
    header,
    rowCount: table.rows.length,
    rows,
    problems,
    warnings,
  };
}

function rowList(rows: readonly number[]): string {
  return rows.length === 1 ? `row ${rows[0]}` : `rows ${rows.join(', ')}`;
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

/** The whole pool (retired items too, with their state) as CSV text that importItems reads back. */
export function exportItemsCsv(study: Study): { fileName: string; text: string; items: number } {
  const names = new Map(listFacets(study, { includeRetired: true }).map((f) => [f.id, f.name]));
  const items = listItems(study);
  const data = items.map((it) => [
    it.code,
    it.text,
    it.facetId === null ? '' : (names.get(it.facetId) ?? ''),
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

export const itemsRules: PhaseRules = {
  id: 'items',
  purpose: 'Draft the item pool, map each item to a facet, and check its wording.',
  holds(study) {
    const all = listItems(study);
    const active = all.filter((it) => it.state !== 'retired');
    const reverse = active.filter((it) => it.keying === 'reverse').length;
    const retired = all.length - active.length;
    const flagged = active.filter((it) => checkItemWording(it.text).flags.length > 0).length;
    return [
      `${active.length} item${active.length === 1 ? '' : 's'}${retired > 0 ? ` (${retired} retired)` : ''}`,
      `${reverse} reverse-keyed`,
      `${flagged} with wording flags`,
    ];
  },
  checklist(study) {
    const facets = listFacets(study);
    const active = activeItems(study);
    const coverage = coverageOf(facets, active);
    const thin = coverage.filter((c) => c.items < MIN_ITEMS_PER_FACET);
    const facetIds = new Set(facets.map((f) => f.id));
    const unmapped = active.filter((it) => it.facetId === null || !facetIds.has(it.facetId));
    const drafts = active.filter((it) => it.state === 'draft');
    const list = (codes: readonly string[]) =>
      codes.length > 6 ? `${codes.slice(0, 6).join(', ')} and ${codes.length - 6} more` : codes.join(', ');
    const items: ChecklistItem[] = [
      {
        id: 'pool',
        label: 'The pool holds items',
        met: active.length > 0,
        detail: `${active.length} item${active.length === 1 ? '' : 's'}`,
      },
      {
        id: 'mapped',
        label: 'Every item is mapped to an active facet',
        met: active.length > 0 && unmapped.length === 0,
        detail: unmapped.length === 0 ? 'all mapped' : `not mapped: ${list(unmapped.map((it) => it.code))}`,
      },
      {
        id: 'coverage',
        label: `Every facet has at least ${MIN_ITEMS_PER_FACET} items (common practice: several times the final number)`,
        met: facets.length > 0 && thin.length === 0,
        detail:
          facets.length === 0
            ? 'no facets defined'
            : thin.length === 0
              ? `${Math.min(...coverage.map((c) => c.items))} or more per facet`
              : thin.map((c) => `${c.facetName}: ${c.items}`).join('; '),
      },
      {
        id: 'triaged',
        label: 'No item is left as a draft: each is kept for review or retired',
        met: active.length > 0 && drafts.length === 0,
        detail: drafts.length === 0 ? 'none left' : `drafts: ${list(drafts.map((it) => it.code))}`,
      },
    ];
    return items;
  },
};
