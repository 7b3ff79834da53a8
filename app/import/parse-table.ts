import Papa from 'papaparse';
import { decodeBytes } from './decode.ts';
import { DEFAULT_MAX_BYTES, MAX_LISTED_ROWS } from './limits.ts';
import {
  checkHeader,
  chooseDelimiterAndQuote,
  columnLabel,
  fitRecord,
  type ParsedTable,
  type ParseTableOptions,
  quoteErrorMessage,
} from './table-rules.ts';
import { TableError } from './table-error.ts';

export * from './table-rules.ts';

function listRows(rows: number[]): string {
  const shown = rows.slice(0, MAX_LISTED_ROWS).join(', ');
  return rows.length > MAX_LISTED_ROWS ? `${shown} and ${rows.length - MAX_LISTED_ROWS} more` : shown;
}

function lineAt(text: string, index: number): number {
  let line = 1;
  const end = Math.min(index, text.length);
  for (let i = 0; i < end; i++) if (text.charCodeAt(i) === 10) line++;
  return line;
}

function isBlankRecord(record: string[]): boolean {
  return record.every((f) => f.trim() === '');
}

/**
 * Reads a delimited text file (CSV, TSV, semicolon or pipe separated) into a header and string rows.
 * Decoding: BOM, then UTF-16 by NUL pattern, then strict UTF-8, then Windows-1252 (see decodeBytes).
 * Delimiter: detected from the header and the first records (see detectDelimiter) unless given.
 * A header row is required. Blank rows are skipped (with a warning when inside the data); a delimiter
 * at the end of every line is tolerated. Cost O(file size).
 * Throws TableError, naming row and column, for: an empty or oversized file, binary content, an empty or
 * repeated header, no data rows, an unterminated or malformed quoted field, and rows whose field count
 * differs from the header's.
 */
export function parseTable(bytes: Uint8Array, options: ParseTableOptions = {}): ParsedTable {
  const label = options.fileName ? `file "${options.fileName}"` : 'the file';
  const maxBytes = options.maxBytes ?? DEFAULT_MAX_BYTES;
  if (bytes.length === 0) throw new TableError(`${label} is empty (0 bytes)`);
  if (bytes.length > maxBytes) {
    throw new TableError(
      `${label} is ${bytes.length} bytes, above the limit of ${maxBytes} bytes for one import`,
    );
  }
  const decoded = decodeBytes(bytes, options.encoding, options.fileName);
  const warnings = [...decoded.warnings];
  const text = decoded.text;
  if (text.trim() === '') throw new TableError(`${label} holds only blank space, no header row`);

  const { delimiter, quoteChar } = chooseDelimiterAndQuote(text, options.delimiter, warnings);

  const result = Papa.parse<string[]>(text, { delimiter, quoteChar, header: false, skipEmptyLines: false });
  const records = result.data;
  for (const err of result.errors) {
    if (err.type !== 'Quotes' || err.row === undefined) continue;
    const row = err.row + 1;
    const fieldIndex = Math.max(0, (records[err.row]?.length ?? 1) - 1);
    const header = records[0]?.map((h) => h.trim());
    const column = columnLabel(fieldIndex, row === 1 ? undefined : header);
    throw new TableError(
      quoteErrorMessage(err.code, row, column, lineAt(text, err.index ?? 0)),
      row,
      header?.[fieldIndex] ?? `column ${fieldIndex + 1}`,
    );
  }

  let first = 0;
  while (first < records.length && isBlankRecord(records[first])) first++;
  if (first === records.length) throw new TableError(`${label} has no header row`);
  if (first > 0) warnings.push(`skipped ${first} blank line(s) before the header`);
  const rawHeader = records[first];
  const headerRow = first + 1;

  let last = records.length;
  while (last > first + 1 && isBlankRecord(records[last - 1])) last--;
  const blankInside: number[] = [];
  const rows: string[][] = [];
  const rowNumbers: number[] = [];
  for (let r = first + 1; r < last; r++) {
    if (isBlankRecord(records[r])) {
      blankInside.push(r + 1);
      continue;
    }
    rows.push(records[r]);
    rowNumbers.push(r + 1);
  }
  if (rows.length === 0) {
    throw new TableError(`${label} has a header row but no data rows after row ${headerRow}`, headerRow);
  }
  if (blankInside.length > 0) warnings.push(`skipped blank row(s) ${listRows(blankInside)}`);

  const header = checkHeader(rawHeader, warnings, headerRow);
  const ragged: number[] = [];
  let firstRagged = -1;
  let trimmed = 0;
  for (let i = 0; i < rows.length; i++) {
    const row = rows[i];
    if (row.length === header.length) continue;
    try {
      rows[i] = fitRecord(row, header, rowNumbers[i]);
      if (row.length > rawHeader.length) trimmed++;
    } catch {
      ragged.push(rowNumbers[i]);
      if (firstRagged < 0) firstRagged = i;
    }
  }
  if (firstRagged >= 0) {
    const more = ragged.length > 1 ? `; rows ${listRows(ragged.slice(1))} also differ` : '';
    fitRecord(rows[firstRagged], header, rowNumbers[firstRagged], more);
  }
  if (trimmed > 0) warnings.push(`ignored empty trailing fields in ${trimmed} row(s)`);
  return {
    header,
    rows,
    delimiter,
    encoding: decoded.encoding,
    warnings,
    rowNumbers,
    quoteChar,
  };
}
