import { type DatasetRole, listDatasets } from '../../../db/repos/datasets.ts';
import { listItems } from '../../../db/repos/items.ts';
import type { Study } from '../../../db/study.ts';
import { chooseDecimalMark } from '../../import/dataset.ts';
import { delimiterName } from '../../import/detect-format.ts';
import { type ColumnMapping, type ProposedMapping, proposeMapping } from '../../import/mapping.ts';
import { type DecimalMark, parseNumber } from '../../import/numbers.ts';
import type { ParsedTable } from '../../import/parse-table.ts';
import { previewTable } from '../../import/preview.ts';
import { TableError } from '../../import/table-error.ts';
import { readWorkbook } from '../../import/workbook.ts';
import { declaredBounds } from '../analysis-data.ts';
import { type DataFileKind, dataFileKind, type ReadSettings } from '../../import/read-data-file.ts';
import { MAX_SUGGESTIONS, PREVIEW_SHOWN_ROWS, SUGGESTION_ROWS, fileError } from './common.ts';

export interface MissingSuggestion {
  /** The code as written in the file. */
  code: string;
  numeric: boolean;
  cells: number;
}

/** The start of a data file, read with nothing stored, and a proposed mapping to confirm. */
export interface DataFilePreview {
  fileName: string;
  fileSize: number;
  kind: DataFileKind;
  sheet?: string;
  sheets?: string[];
  encoding: string;
  /** The delimiter character ('' for a workbook) and its name ("comma", "tab"…). */
  delimiter: string;
  delimiterName: string;
  quoteChar: string;
  decimalMark: DecimalMark;
  header: string[];
  /** The first PREVIEW_SHOWN_ROWS data rows, with their file row numbers (header = row 1). */
  rows: string[][];
  rowNumbers: number[];
  /** True when the file holds more rows than shown. */
  truncated: boolean;
  warnings: string[];
  /** Proposed roles by header (item columns matched to the pool by code, id and duration by name). */
  proposal: ProposedMapping;
  /** Values in the proposed item columns of the first rows that look like missing-value codes. */
  suggestedMissing: MissingSuggestion[];
  bounds: { min: number; max: number };
  /** Earlier imports from a file of the same name (the check step also compares SHA-256). */
  sameName: { id: number; name: string; role: DatasetRole }[];
}

function suggestMissing(
  table: ParsedTable,
  mapping: ColumnMapping,
  mark: DecimalMark,
  bounds: { min: number; max: number },
): MissingSuggestion[] {
  const columns = table.header.flatMap((h, i) => (mapping[h]?.role === 'item' ? [i] : []));
  const counts = new Map<string, MissingSuggestion>();
  for (const row of table.rows) {
    for (const c of columns) {
      const cell = (row[c] ?? '').trim();
      if (cell === '') continue;
      const value = parseNumber(cell, mark);
      if (value !== undefined && value >= bounds.min && value <= bounds.max) continue;
      const key = value === undefined ? cell : String(value);
      const entry = counts.get(key) ?? { code: key, numeric: value !== undefined, cells: 0 };
      entry.cells++;
      counts.set(key, entry);
    }
  }
  return [...counts.values()].sort((a, b) => b.cells - a.cells).slice(0, MAX_SUGGESTIONS);
}

async function readStart(
  bytes: Uint8Array,
  fileName: string,
  reading: ReadSettings,
): Promise<{
  table: ParsedTable;
  kind: DataFileKind;
  sheet?: string;
  sheets?: string[];
  truncated: boolean;
}> {
  const kind = dataFileKind(fileName, bytes);
  if (kind === 'workbook') {
    const book = await readWorkbook(bytes, { fileName, sheet: reading.sheet });
    return {
      table: { ...book, rows: book.rows.slice(0, SUGGESTION_ROWS) },
      kind,
      sheet: book.sheet,
      sheets: book.sheets,
      truncated: book.rows.length > PREVIEW_SHOWN_ROWS,
    };
  }
  const preview = previewTable(bytes, {
    fileName,
    delimiter: reading.delimiter,
    encoding: reading.encoding,
    rows: SUGGESTION_ROWS,
  });
  return { table: preview, kind, truncated: preview.truncated || preview.rows.length > PREVIEW_SHOWN_ROWS };
}

/**
 * Reads the start of a data file (delimited text up to the preview limit, or one sheet of a workbook)
 * and proposes how to read it: encoding, delimiter and decimal mark detected (or as given), item
 * columns matched to the pool's codes (letter case ignored; retired items too), id and duration
 * columns by their usual names, and likely missing-value codes. Writes nothing. Cost O(preview size).
 * Throws RuleError (code "file") naming row and column for a file that cannot be read as a table.
 */
export async function previewDataFile(
  study: Study,
  bytes: Uint8Array,
  fileName: string,
  reading: ReadSettings = {},
): Promise<DataFilePreview> {
  let start: Awaited<ReturnType<typeof readStart>>;
  try {
    start = await readStart(bytes, fileName, reading);
  } catch (error) {
    if (error instanceof TableError) throw fileError(fileName, error);
    throw error;
  }
  const { table } = start;
  const codes = listItems(study).map((it) => it.code);
  const proposal = proposeMapping(table.header, codes);
  const numeric = table.header.flatMap((h, i) =>
    ['item', 'criterion', 'duration'].includes(proposal.mapping[h]?.role ?? '') ? [i] : [],
  );
  const columns = numeric.length > 0 ? numeric : table.header.map((_, i) => i);
  // The same rule, over the same rows, as the read of the whole file (chooseDecimalMark); the check
  // step and the command line then read with the mark shown here.
  const warnings = [...table.warnings];
  const mark = chooseDecimalMark(table.rows, columns, reading.decimalMark, warnings);
  const bounds = declaredBounds(study);
  const quoteChar = start.kind === 'workbook' ? '' : (table.quoteChar ?? '"');
  return {
    fileName,
    fileSize: bytes.length,
    kind: start.kind,
    ...(start.sheet === undefined ? {} : { sheet: start.sheet, sheets: start.sheets }),
    encoding: table.encoding,
    delimiter: table.delimiter,
    delimiterName: table.delimiter === '' ? '' : delimiterName(table.delimiter),
    quoteChar,
    decimalMark: mark,
    header: table.header,
    rows: table.rows.slice(0, PREVIEW_SHOWN_ROWS),
    rowNumbers: (table.rowNumbers ?? table.rows.map((_, i) => i + 2)).slice(0, PREVIEW_SHOWN_ROWS),
    truncated: start.truncated,
    warnings,
    proposal,
    suggestedMissing: suggestMissing(table, proposal.mapping, mark, bounds),
    bounds,
    sameName: listDatasets(study)
      .filter((d) => d.fileName === fileName)
      .map((d) => ({ id: d.id, name: d.name, role: d.role })),
  };
}

// ── Import: plan, read, check, store ──────────────────────────────────────────────────────────
