/**
 * The rules every reading of a delimited file shares: the header's checks, fitting a record to the
 * header, the delimiter and quote chosen, and the wording of row, column and quote messages. Apart from
 * parseTable (parse-table.ts, which reads a whole file with papaparse) so that a reader that splits
 * plain text itself does not load papaparse.
 */
import { delimiterName, detectDelimiter, detectQuote } from './detect-format.ts';
import { TableError } from './table-error.ts';

export { TableError } from './table-error.ts';

/**
 * A delimited file read into strings. Row numbers in every message are 1-based file records and count
 * the header as row 1 (as a spreadsheet numbers them; blank lines before the header shift it down), so
 * `rows[i]` is file row `rowNumbers[i]`: i + 2 unless blank rows were skipped.
 */
export interface ParsedTable {
  header: string[];
  rows: string[][];
  delimiter: string;
  encoding: string;
  warnings: string[];
  /** 1-based file row of each entry of `rows` (header = row 1). Absent means rows[i] is row i + 2. */
  rowNumbers?: number[];
  /** Quote character used; absent means the double quote. */
  quoteChar?: string;
}

export interface ParseTableOptions {
  /** Used in messages only. */
  fileName?: string;
  /** One character, or "tab"; overrides detection. */
  delimiter?: string;
  /** utf-8, utf-16le, utf-16be or windows-1252 (aliases accepted); overrides detection. */
  encoding?: string;
  /** Refuse larger files; default DEFAULT_MAX_BYTES (256 MiB). */
  maxBytes?: number;
}

/** Checks a user-given delimiter and turns "tab" or "\t" into the tab character. */
export function normalizeDelimiter(delimiter: string): string {
  const named: Record<string, string> = { tab: '\t', '\\t': '\t', comma: ',', semicolon: ';', pipe: '|' };
  const d = named[delimiter.toLowerCase()] ?? delimiter;
  if (d.length !== 1 || d === '"' || d === '\n' || d === '\r') {
    throw new TableError(
      `delimiter "${delimiter}" cannot be used: give one character other than a quote or line break, or "tab"`,
    );
  }
  return d;
}

/**
 * The delimiter (as given, or detected from the text) and the quote character, with a warning
 * where the choice is not certain. Shared by the whole-file and the streaming readers.
 */
export function chooseDelimiterAndQuote(
  text: string,
  requested: string | undefined,
  warnings: string[],
): { delimiter: string; quoteChar: string } {
  let delimiter: string;
  if (requested !== undefined) {
    delimiter = normalizeDelimiter(requested);
  } else {
    const guess = detectDelimiter(text);
    if (guess) {
      delimiter = guess.delimiter;
      if (guess.alsoPlausible.length > 0) {
        warnings.push(
          `the ${delimiterName(delimiter)} was taken as the delimiter; ${guess.alsoPlausible
            .map(delimiterName)
            .join(' and ')} would also fit: check the preview`,
        );
      }
    } else {
      delimiter = ',';
      warnings.push(
        'no comma, semicolon, tab or pipe splits the header row, so the file was read as a single column',
      );
    }
  }
  const quoteChar = detectQuote(text, delimiter);
  if (quoteChar !== '"') warnings.push('fields are quoted with single quotes');
  return { delimiter, quoteChar };
}

/** "column 3 ('q2')" or "column 3" when the header is not known. */
export function columnLabel(index: number, header?: readonly string[]): string {
  const name = header?.[index];
  return name ? `column ${index + 1} ('${name}')` : `column ${index + 1}`;
}

/**
 * Checks the header row and returns the trimmed names. Empty names at the end are dropped (a delimiter
 * at the end of every line); a row that has a value under such a column is then refused by fitRecord.
 * Throws TableError for an empty name inside the header and for a repeated name; names that differ
 * only in letter case get a warning, because item codes are matched without regard to case.
 */
export function checkHeader(rawHeader: readonly string[], warnings: string[], headerRow = 1): string[] {
  const header = rawHeader.map((h) => h.trim());
  let keep = header.length;
  while (keep > 1 && header[keep - 1] === '') keep--;
  if (keep < header.length) {
    warnings.push(`ignored ${header.length - keep} column(s) without a header at the end of the header row`);
  }
  const kept = header.slice(0, keep);
  const seen = new Map<string, number>();
  const seenFolded = new Map<string, number>();
  kept.forEach((name, i) => {
    if (name === '') {
      throw new TableError(
        `row ${headerRow}, ${columnLabel(i)}: the header is empty; every column needs a name`,
        headerRow,
        `column ${i + 1}`,
      );
    }
    const earlier = seen.get(name);
    if (earlier !== undefined) {
      throw new TableError(
        `row ${headerRow}, column ${i + 1}: the header '${name}' repeats column ${earlier + 1}; column names must be unique`,
        headerRow,
        name,
      );
    }
    seen.set(name, i);
    const folded = name.toLowerCase();
    const earlierFolded = seenFolded.get(folded);
    if (earlierFolded !== undefined) {
      warnings.push(
        `columns ${earlierFolded + 1} ('${kept[earlierFolded]}') and ${i + 1} ('${name}') differ only in letter case`,
      );
    } else {
      seenFolded.set(folded, i);
    }
  });
  return kept;
}

/**
 * Fits one data record to the header's width: empty fields beyond the last column are dropped; a value
 * beyond it or a missing field is a TableError naming the row and column (`suffix` is appended to the
 * message). Returns the record itself when it already fits. Cost O(fields).
 */
export function fitRecord(
  record: string[],
  header: readonly string[],
  rowNumber: number,
  suffix = '',
): string[] {
  const width = header.length;
  if (record.length === width) return record;
  if (record.length < width) {
    throw new TableError(
      `row ${rowNumber}: has ${record.length} field(s) but the header has ${width}; ` +
        `${columnLabel(record.length, header)} and after are missing${suffix}`,
      rowNumber,
      header[record.length],
    );
  }
  for (let c = width; c < record.length; c++) {
    if (record[c].trim() !== '') {
      throw new TableError(
        `row ${rowNumber}, column ${c + 1}: value '${record[c].trim()}' lies beyond the last named column ` +
          `(the row has ${record.length} fields, the header names ${width})${suffix}`,
        rowNumber,
        `column ${c + 1}`,
      );
    }
  }
  return record.slice(0, width);
}

/** Message for a quote error reported by papaparse, naming row, column and (when known) line. */
export function quoteErrorMessage(code: string, row: number, column: string, line?: number): string {
  const where = line === undefined ? `row ${row}, ${column}` : `row ${row}, ${column} (line ${line})`;
  const what =
    code === 'MissingQuotes'
      ? 'a quoted field is opened and never closed'
      : 'text follows the closing quote of a quoted field';
  return `${where}: ${what}`;
}
