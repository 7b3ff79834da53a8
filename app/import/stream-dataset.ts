import { isAscii } from 'node:buffer';
import { createHash } from 'node:crypto';
import { Readable } from 'node:stream';
import type Papa from 'papaparse';
import { assertTextual, chooseEncoding, type Encoding, makeDecoder, undecodableMessage } from './decode.ts';
import {
  chooseDecimalMark,
  DatasetAssembler,
  type DatasetOptions,
  type EncodedDataset,
  type FieldRows,
  numericColumns,
} from './dataset.ts';
import { sniffRecords } from './detect-format.ts';
import { PlainRecords } from './plain-records.ts';
import { DEFAULT_MAX_BYTES, MAX_LISTED_ROWS, SNIFF_BYTES } from './limits.ts';
import type { ColumnMapping } from './mapping.ts';
import {
  checkHeader,
  chooseDelimiterAndQuote,
  columnLabel,
  fitRecord,
  quoteErrorMessage,
} from './table-rules.ts';
import { TableError } from './table-error.ts';

/**
 * Bytes handed to the streaming reader at a time: small enough to cancel and report progress often.
 * Also the fastest of 256 KiB, 1 MiB and 4 MiB on the import bench (test/bench/import-store.ts), and
 * the leanest: larger pieces raised the resident memory of a 13 MB import from 2× to 6× and 11× the file.
 */
export const READ_CHUNK_BYTES = 256 * 1024;

/**
 * A file's bytes, read whole, as the stream streamRecords takes: READ_CHUNK_BYTES pieces (views, not
 * copies), `beforeEach` called before each (it may throw to stop the reading). Cost O(1) per piece.
 */
export async function* bytePieces(bytes: Uint8Array, beforeEach?: () => void): AsyncGenerator<Uint8Array> {
  for (let at = 0; at < bytes.length; at += READ_CHUNK_BYTES) {
    beforeEach?.();
    yield bytes.subarray(at, at + READ_CHUNK_BYTES);
  }
}

/** How streamRecords reads a delimited file; anything left out is detected. */
export interface StreamRecordsOptions {
  fileName?: string;
  /** Overrides delimiter detection (one character or "tab"). */
  delimiter?: string;
  /** Overrides encoding detection. */
  encoding?: string;
  /** Refuse larger files; default DEFAULT_MAX_BYTES (256 MiB). */
  maxBytes?: number;
  /** Receives every chunk of the original bytes, in order: lets storage keep the file as it came. */
  onBytes?: (chunk: Uint8Array) => void;
  /** Called after each parsed chunk with the bytes read and data rows seen so far. */
  onProgress?: (progress: { bytes: number; rows: number }) => void;
  /** Expected number of respondents, to size the columns once (a guess is fine). */
  expectedRows?: number;
  /**
   * The caller has checked the whole file with isPlainText. Its records are then split from the
   * bytes directly instead of by papaparse, with the same records and the same outcome, when the
   * file is read as UTF-8 or Windows-1252 (every other encoding still goes through papaparse).
   */
  plainText?: boolean;
}

export interface StreamDatasetOptions extends DatasetOptions, StreamRecordsOptions {}

/**
 * What receives a delimited file's data records as streamRecords reads them, in file order: the
 * import's DatasetAssembler, or the command line's item columns (app/cli/stats/data.ts). A record is
 * given either as strings already fitted to the header's width, or, in a plain-text file, as field
 * offsets into the bytes with its single digits taken out (FieldRows); both say the same.
 */
export interface RecordSink {
  addRows(records: readonly (readonly string[])[], rowNumbers: readonly number[]): void;
  addFieldRows(rows: FieldRows): void;
  /** Data records received so far (reported as progress). */
  readonly n: number;
}

/**
 * Starts the sink once the header is read: `header` is checked (checkHeader); `sniffed` holds the
 * records of the file's first SNIFF_BYTES characters, header first, for choices made from the start
 * of the file (the decimal mark); a warning pushed to `warnings` is reported with the reader's own.
 */
export type StartSink<S extends RecordSink> = (
  header: string[],
  sniffed: string[][],
  warnings: string[],
) => S;

/** How a delimited file was read: its header, format and bytes. */
export interface ReadFormat {
  header: string[];
  delimiter: string;
  quoteChar: string;
  encoding: Encoding;
  byteLength: number;
  /** SHA-256 of the original bytes, lowercase hex. */
  sha256: string;
}

/** A delimited file read through a sink, with what the reader found on the way. */
export interface StreamedRecords<S extends RecordSink> extends ReadFormat {
  sink: S;
  /** Decoding, delimiter, header and blank-row notes, and the sink's own from `start`, in that order. */
  warnings: string[];
}

/** A dataset read from a stream, with what storage needs to keep beside it. */
export interface StreamedDataset extends EncodedDataset, ReadFormat {}

interface Format {
  encoding: Encoding;
  bomLength: number;
  delimiter: string;
  quoteChar: string;
  warnings: string[];
  sniffText: string;
}

function detectFormat(prefix: Uint8Array, complete: boolean, options: StreamRecordsOptions): Format {
  const label = options.fileName ? `file "${options.fileName}"` : 'the file';
  const choice = chooseEncoding(prefix, complete, options.encoding, options.fileName);
  const warnings = [...choice.warnings];
  let sniffText: string;
  try {
    sniffText = makeDecoder(choice.encoding).decode(prefix.subarray(choice.bomLength), !complete);
  } catch {
    throw new TableError(
      undecodableMessage(choice.encoding, options.encoding !== undefined, options.fileName),
    );
  }
  assertTextual(sniffText, label);
  if (sniffText.trim() === '' && complete)
    throw new TableError(`${label} holds only blank space, no header row`);
  const { delimiter, quoteChar } = chooseDelimiterAndQuote(sniffText, options.delimiter, warnings);
  return {
    encoding: choice.encoding,
    bomLength: choice.bomLength,
    delimiter,
    quoteChar,
    warnings,
    sniffText,
  };
}

const LINE_FEED = 0x0a;
const CARRIAGE_RETURN = 0x0d;
const DOUBLE_QUOTE = 0x22;
const SINGLE_QUOTE = 0x27;
const UTF8_BOM = [0xef, 0xbb, 0xbf];
/** First byte that is not ASCII. */
const NON_ASCII = 0x80;

function asBuffer(bytes: Uint8Array): Buffer {
  return Buffer.from(bytes.buffer, bytes.byteOffset, bytes.byteLength);
}

function plainBytes(bytes: Uint8Array): boolean {
  const view = asBuffer(bytes);
  return (
    isAscii(view) &&
    view.indexOf(DOUBLE_QUOTE) < 0 &&
    view.indexOf(SINGLE_QUOTE) < 0 &&
    view.indexOf(CARRIAGE_RETURN) < 0
  );
}

/**
 * Whether a file is plain text for the reader: after an optional UTF-8 byte-order mark, only ASCII
 * bytes, no quote character (double or single) and no carriage return. Papaparse splits such a file at
 * every line feed and delimiter and nowhere else, so streamDataset (option plainText) can split it
 * from the bytes. Cost O(file size), with native scans.
 */
export function isPlainText(bytes: Uint8Array): boolean {
  const bom = UTF8_BOM.every((b, i) => bytes[i] === b);
  return plainBytes(bom ? bytes.subarray(UTF8_BOM.length) : bytes);
}

/** `tail` followed by `chunk`: a view when they lie next to each other in one buffer, else a copy. */
function joinBytes(tail: Uint8Array, chunk: Uint8Array): Uint8Array {
  if (tail.length === 0) return chunk;
  if (tail.buffer === chunk.buffer && tail.byteOffset + tail.length === chunk.byteOffset) {
    return new Uint8Array(chunk.buffer, tail.byteOffset, tail.length + chunk.length);
  }
  return Buffer.concat([tail, chunk]);
}

/**
 * Data records handed to the assembler at a time by the plain-text reading: few enough that their
 * field table and the assembler's column block stay in the processor's cache (256 read a 13 MB file's
 * cells in about half the time that a whole 256 KiB piece, some 2,000 records, took).
 */
const FIELD_ROWS_BATCH = 256;

function isBlankFields(fields: readonly string[]): boolean {
  return fields.length === 1 ? fields[0].trim() === '' : fields.every((f) => f.trim() === '');
}

function listRows(rows: number[]): string {
  const shown = rows.slice(0, MAX_LISTED_ROWS).join(', ');
  return rows.length > MAX_LISTED_ROWS ? `${shown} and ${rows.length - MAX_LISTED_ROWS} more` : shown;
}

/**
 * Reads a delimited file from a stream of byte chunks into a sink, without holding the file's rows as
 * strings: the first chunk(s), at least SNIFF_BYTES, decide encoding, delimiter and quote; then
 * papaparse parses chunk by chunk and the data records go to the sink, fitted to the header (blank rows
 * skipped and noted). With the option plainText (a file isPlainText accepts, read as UTF-8 or
 * Windows-1252) the records are split from the bytes without papaparse, and only cells that are not a
 * single digit become strings; the records are the same. Also computes the SHA-256 and byte length,
 * and hands each raw chunk to `onBytes`. Same rules and messages as parseTable, except that the first
 * ragged row stops the reading (later ones are not counted).
 * Cost O(file size) time; memory that of the sink plus one chunk.
 * Throws TableError for the same bad files as parseTable, and whatever the sink throws.
 */
export async function streamRecords<S extends RecordSink>(
  source: AsyncIterable<Uint8Array>,
  start: StartSink<S>,
  options: StreamRecordsOptions = {},
): Promise<StreamedRecords<S>> {
  const label = options.fileName ? `file "${options.fileName}"` : 'the file';
  const maxBytes = options.maxBytes ?? DEFAULT_MAX_BYTES;
  const hash = createHash('sha256');
  const iterator = source[Symbol.asyncIterator]();
  let byteLength = 0;
  const take = async (): Promise<Uint8Array | undefined> => {
    const next = await iterator.next();
    if (next.done) return undefined;
    const chunk = next.value;
    byteLength += chunk.length;
    if (byteLength > maxBytes) {
      throw new TableError(`${label} is larger than the limit of ${maxBytes} bytes for one import`);
    }
    hash.update(chunk);
    options.onBytes?.(chunk);
    return chunk;
  };

  const prefixChunks: Uint8Array[] = [];
  let prefixLength = 0;
  let ended = false;
  while (prefixLength < SNIFF_BYTES) {
    const chunk = await take();
    if (!chunk) {
      ended = true;
      break;
    }
    prefixChunks.push(chunk);
    prefixLength += chunk.length;
  }
  if (byteLength === 0) throw new TableError(`${label} is empty (0 bytes)`);
  // One chunk is used as it is, so that the pieces after it can stay views of the caller's bytes.
  const prefix = prefixChunks.length === 1 ? prefixChunks[0] : Buffer.concat(prefixChunks);
  const format = detectFormat(prefix, ended, options);
  const decoder = makeDecoder(format.encoding);
  const decode = (bytes: Uint8Array, stream: boolean): string => {
    try {
      return decoder.decode(bytes, stream);
    } catch {
      throw new TableError(
        undecodableMessage(format.encoding, options.encoding !== undefined, options.fileName),
      );
    }
  };
  async function* text(): AsyncGenerator<string> {
    const first = decode(prefix.subarray(format.bomLength), !ended);
    if (first) yield first;
    if (ended) return;
    for (;;) {
      const chunk = await take();
      if (!chunk) break;
      const part = decode(chunk, true);
      if (part) yield part;
    }
    const rest = decode(new Uint8Array(0), false);
    if (rest) yield rest;
  }

  const warnings = [...format.warnings];
  let header: string[] | undefined;
  let rawWidth = 0;
  let assembler: S | undefined;
  let record = 0;
  let pendingBlank: number[] = [];
  const blankInside: number[] = [];
  let leadingBlank = 0;
  let trimmed = 0;
  let failure: unknown;

  const startTable = (rawHeader: string[], headerRow: number) => {
    const checked = checkHeader(rawHeader, warnings, headerRow);
    header = checked;
    rawWidth = rawHeader.length;
    const sniffed = sniffRecords(
      format.sniffText.slice(0, SNIFF_BYTES),
      format.delimiter,
      format.quoteChar,
      Number.POSITIVE_INFINITY,
    );
    assembler = start(checked, sniffed, warnings);
  };

  const onRows = (rows: string[][], errors: Papa.ParseError[]) => {
    for (const err of errors) {
      // A quote error in a record that papaparse holds back for the next chunk (the last, incomplete
      // record) is reported again once that record is complete, with its fields; wait for that.
      if (err.type !== 'Quotes' || err.row === undefined || err.row >= rows.length) continue;
      const row = record + err.row + 1;
      const fieldIndex = Math.max(0, (rows[err.row]?.length ?? 1) - 1);
      const column = columnLabel(fieldIndex, header);
      throw new TableError(
        quoteErrorMessage(err.code, row, column),
        row,
        header?.[fieldIndex] ?? `column ${fieldIndex + 1}`,
      );
    }
    const batch: string[][] = [];
    const batchRows: number[] = [];
    for (const fields of rows) {
      record++;
      const blank = isBlankFields(fields);
      if (!header) {
        if (blank) leadingBlank++;
        else startTable(fields, record);
        continue;
      }
      if (blank) {
        pendingBlank.push(record);
        continue;
      }
      if (pendingBlank.length > 0) {
        blankInside.push(...pendingBlank);
        pendingBlank = [];
      }
      batch.push(fitRecord(fields, header, record));
      batchRows.push(record);
      if (fields.length > rawWidth) trimmed++;
    }
    if (batch.length > 0) assembler?.addRows(batch, batchRows);
  };

  const readWithPapaparse = async () => {
    // Loaded only for a file that is not plain text: a plain one never needs it.
    const { default: papa } = await import('papaparse');
    return new Promise<void>((resolve, reject) => {
      const readable = Readable.from(text(), { objectMode: true });
      papa.parse(readable, {
        delimiter: format.delimiter,
        quoteChar: format.quoteChar,
        header: false,
        skipEmptyLines: false,
        chunk(results: Papa.ParseResult<string[]>, parser: Papa.Parser) {
          if (failure) return;
          try {
            onRows(results.data, results.errors);
            options.onProgress?.({ bytes: byteLength, rows: assembler?.n ?? 0 });
          } catch (e) {
            failure = e;
            parser.abort();
            readable.destroy();
            reject(e);
          }
        },
        complete() {
          if (!failure) resolve();
        },
        error(e: Error) {
          if (!failure) {
            failure = e;
            reject(e);
          }
        },
      });
    });
  };

  /** The field table of up to FIELD_ROWS_BATCH records (see FieldRows), made when the header is read. */
  let table: PlainRecords | undefined;
  /**
   * Splits the lines of a piece of plain text (see isPlainText) as papaparse would: each line feed
   * ends a record, each delimiter a field. The unfinished last line counts only when `final`. Data
   * records go to the assembler FIELD_ROWS_BATCH at a time. Returns where the part not yet read starts.
   */
  const splitPlain = (bytes: Buffer, final: boolean): number => {
    const delimiter = format.delimiter.charCodeAt(0);
    // File rows of the batch's records (reused: a sink copies what it keeps).
    const rowNumbers = new Int32Array(FIELD_ROWS_BATCH);
    let n = 0;
    const flush = () => {
      const records = table;
      if (n === 0 || !records) return;
      assembler?.addFieldRows({
        n,
        rowNumbers: rowNumbers.subarray(0, n),
        // Views of the kernels' memory: read afresh, since a gather may make room and move them.
        get starts() {
          return records.starts;
        },
        get digits() {
          return records.digits;
        },
        text: (from, to) => bytes.toString('latin1', from, to),
        gather: records.gather.bind(records, n),
      });
      n = 0;
    };
    let at = 0;
    while (at < bytes.length && !header) {
      let end = bytes.indexOf(LINE_FEED, at);
      if (end < 0) {
        if (!final) break;
        end = bytes.length;
      }
      record++;
      const fields = bytes.toString('latin1', at, end).split(format.delimiter);
      if (isBlankFields(fields)) leadingBlank++;
      else startTable(fields, record);
      at = end + 1;
    }
    if (!header || at >= bytes.length) return Math.min(at, bytes.length);
    const width = header.length;
    table ??= new PlainRecords(width, FIELD_ROWS_BATCH);
    table.load(bytes);
    for (;;) {
      const split = table.split(at, final, delimiter, n);
      if (split.count > 0 && pendingBlank.length > 0) {
        blankInside.push(...pendingBlank);
        pendingBlank = [];
      }
      for (let r = 0; r < split.count; r++) rowNumbers[n + r] = ++record;
      n += split.count;
      at = split.at;
      if (n === FIELD_ROWS_BATCH) {
        flush();
        continue;
      }
      if (!split.stopped) break;
      // A line that is not a plain data record: blank, or with more or fewer fields than the header.
      record++;
      const { fields, next } = split.stopped;
      if (fields < 0) {
        pendingBlank.push(record);
      } else {
        if (pendingBlank.length > 0) {
          blankInside.push(...pendingBlank);
          pendingBlank = [];
        }
        // Throws unless the fields beyond the header are empty; those are then left out.
        fitRecord(bytes.toString('latin1', at, next - 1).split(format.delimiter), header, record);
        if (fields > rawWidth) trimmed++;
        rowNumbers[n] = record;
        n++;
        if (n === FIELD_ROWS_BATCH) flush();
      }
      at = next;
    }
    flush();
    return Math.min(at, bytes.length);
  };

  const readPlain = async () => {
    let piece: Uint8Array = prefix.subarray(format.bomLength);
    let final = ended;
    let checked = plainBytes(piece);
    for (;;) {
      if (!checked) throw new Error('streamDataset was told the file is plain text, but it is not');
      const rest = piece.subarray(splitPlain(asBuffer(piece), final));
      options.onProgress?.({ bytes: byteLength, rows: assembler?.n ?? 0 });
      if (final) return;
      const chunk = await take();
      if (chunk) {
        checked = plainBytes(chunk);
        piece = joinBytes(rest, chunk);
      } else {
        piece = rest;
        final = true;
      }
    }
  };

  const plain =
    options.plainText === true &&
    (format.encoding === 'utf-8' || format.encoding === 'windows-1252') &&
    format.delimiter.charCodeAt(0) < NON_ASCII;
  if (plain) await readPlain();
  else await readWithPapaparse();

  if (!header || !assembler) throw new TableError(`${label} has no header row`);
  if (leadingBlank > 0) warnings.push(`skipped ${leadingBlank} blank line(s) before the header`);
  if (blankInside.length > 0) warnings.push(`skipped blank row(s) ${listRows(blankInside)}`);
  if (trimmed > 0) warnings.push(`ignored empty trailing fields in ${trimmed} row(s)`);
  return {
    sink: assembler,
    header,
    delimiter: format.delimiter,
    quoteChar: format.quoteChar,
    encoding: format.encoding,
    byteLength,
    sha256: hash.digest('hex'),
    warnings,
  };
}

/**
 * Reads a delimited file from a stream of byte chunks straight into a dataset in the compact column
 * layout (streamRecords into a DatasetAssembler): the numeric columns of the first SNIFF_BYTES
 * characters decide the decimal mark (a file whose decimals all come later is read with the point, and
 * its decimal commas are then listed as problems). Same rules and messages as parseTable +
 * buildDataset, except that the first ragged row stops the import (later ones are not counted).
 * `mapping` may be a function of the checked header (for instance proposeMapping's result).
 * Cost O(file size) time; memory O(columns × rows) in the compact layout plus one chunk.
 * Throws TableError for the same bad files as parseTable, and for a bad mapping (see resolveMapping).
 */
export async function streamDataset(
  source: AsyncIterable<Uint8Array>,
  mapping: ColumnMapping | ((header: string[]) => ColumnMapping),
  options: StreamDatasetOptions = {},
): Promise<StreamedDataset> {
  const read = await streamRecords(
    source,
    (header, sniffed, warnings) => {
      const columnMapping = typeof mapping === 'function' ? mapping(header) : mapping;
      const columns = numericColumns(header, columnMapping);
      const mark = chooseDecimalMark(sniffed.slice(1), columns, options.decimalMark, warnings);
      return new DatasetAssembler(header, columnMapping, mark, options, options.expectedRows);
    },
    options,
  );
  const { sink, warnings, ...format } = read;
  const dataset = sink.finish();
  dataset.warnings.unshift(...warnings);
  return { ...dataset, ...format };
}
