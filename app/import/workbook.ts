import readXlsxFile, { InvalidInputError } from 'read-excel-file/universal';
import { DEFAULT_MAX_BYTES, MAX_LISTED_ROWS } from './limits.ts';
import { checkHeader, fitRecord, type ParsedTable } from './parse-table.ts';
import { TableError } from './table-error.ts';

export interface ReadWorkbookOptions {
  fileName?: string;
  /** Sheet name or 1-based number; default the first sheet. */
  sheet?: string | number;
  /** Refuse larger files; default DEFAULT_MAX_BYTES (256 MiB). */
  maxBytes?: number;
}

/** Sheet names of a workbook, with the table of the one chosen. */
export interface WorkbookTable extends ParsedTable {
  sheet: string;
  sheets: string[];
}

type Cell = string | boolean | Date | null | undefined;

/**
 * Cell text as a delimited file would hold it. Numbers arrive as the text stored in the workbook
 * (read-excel-file's parseNumber hook), so 0.1 stays "0.1" and never becomes a rounded display form;
 * dates become ISO 8601 text; TRUE/FALSE stay as words.
 */
function cellText(cell: Cell): string {
  if (cell === null || cell === undefined) return '';
  if (typeof cell === 'string') return cell;
  if (typeof cell === 'boolean') return cell ? 'TRUE' : 'FALSE';
  return cell.toISOString();
}

function inputMessage(code: string, label: string): string {
  switch (code) {
    case 'XLS_FILE_NOT_SUPPORTED':
      return `${label} is an old binary .xls workbook: save it as .xlsx or as CSV and import that`;
    case 'INVALID_ZIP':
      return `${label} is damaged: an .xlsx workbook must be a valid ZIP archive`;
    case 'NO_DATA':
      return `${label} is empty`;
    default:
      return `${label} is not an .xlsx workbook`;
  }
}

function listRows(rows: number[]): string {
  const shown = rows.slice(0, MAX_LISTED_ROWS).join(', ');
  return rows.length > MAX_LISTED_ROWS ? `${shown} and ${rows.length - MAX_LISTED_ROWS} more` : shown;
}

/**
 * Reads one sheet of an .xlsx workbook into the same shape as parseTable: first non-blank row is the
 * header, rows are numbered as the spreadsheet numbers them, blank rows are skipped, short rows are
 * padded (a spreadsheet does not store trailing empty cells) and a value right of the last named
 * column is refused. Uses read-excel-file. Cost O(cells).
 * Throws TableError for an empty, oversized, damaged or .xls file, an unknown sheet, a sheet without
 * a header or data rows, and an empty or repeated header.
 */
export async function readWorkbook(
  bytes: Uint8Array,
  options: ReadWorkbookOptions = {},
): Promise<WorkbookTable> {
  const label = options.fileName ? `workbook "${options.fileName}"` : 'the workbook';
  const maxBytes = options.maxBytes ?? DEFAULT_MAX_BYTES;
  if (bytes.length === 0) throw new TableError(`${label} is empty (0 bytes)`);
  if (bytes.length > maxBytes) {
    throw new TableError(
      `${label} is ${bytes.length} bytes, above the limit of ${maxBytes} bytes for one import`,
    );
  }
  const buffer = bytes.buffer.slice(bytes.byteOffset, bytes.byteOffset + bytes.byteLength) as ArrayBuffer;
  let sheets: { sheet: string; data: Cell[][] }[];
  try {
    sheets = (await readXlsxFile<string>(buffer, { parseNumber: (s: string) => s })) as unknown as {
      sheet: string;
      data: Cell[][];
    }[];
  } catch (e) {
    if (e instanceof InvalidInputError) throw new TableError(inputMessage(e.code, label));
    throw new TableError(`${label} could not be read as .xlsx: ${(e as Error).message}`);
  }
  const names = sheets.map((s) => s.sheet);
  const wanted = options.sheet ?? 1;
  const chosen = typeof wanted === 'number' ? sheets[wanted - 1] : sheets.find((s) => s.sheet === wanted);
  if (!chosen) {
    throw new TableError(
      `${label} has no sheet ${typeof wanted === 'number' ? wanted : `"${wanted}"`}; its sheets are ${names
        .map((n) => `"${n}"`)
        .join(', ')}`,
    );
  }
  const where = `sheet "${chosen.sheet}" of ${label}`;
  const records = chosen.data.map((row) => row.map(cellText));
  const blank = (r: string[]) => r.every((c) => c.trim() === '');
  let first = 0;
  while (first < records.length && blank(records[first])) first++;
  if (first === records.length) throw new TableError(`${where} has no header row`);
  const warnings: string[] = [];
  if (first > 0) warnings.push(`skipped ${first} blank row(s) before the header`);
  const headerRow = first + 1;
  const header = checkHeader(records[first], warnings, headerRow);
  const rows: string[][] = [];
  const rowNumbers: number[] = [];
  const blankInside: number[] = [];
  let last = records.length;
  while (last > first + 1 && blank(records[last - 1])) last--;
  for (let r = first + 1; r < last; r++) {
    const record = records[r];
    if (blank(record)) {
      blankInside.push(r + 1);
      continue;
    }
    const padded =
      record.length < header.length ? [...record, ...Array(header.length - record.length).fill('')] : record;
    rows.push(fitRecord(padded, header, r + 1));
    rowNumbers.push(r + 1);
  }
  if (rows.length === 0)
    throw new TableError(`${where} has a header row but no data rows after row ${headerRow}`, headerRow);
  if (blankInside.length > 0) warnings.push(`skipped blank row(s) ${listRows(blankInside)}`);
  return {
    header,
    rows,
    delimiter: '',
    encoding: 'xlsx',
    warnings,
    rowNumbers,
    sheet: chosen.sheet,
    sheets: names,
  };
}
