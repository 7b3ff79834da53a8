import { sha256Hex } from './sha256.ts';
import { EngineError } from '../engine/errors.ts';
import {
  chooseDecimalMark,
  DatasetAssembler,
  type DatasetOptions,
  type EncodedDataset,
  numericColumns,
} from './dataset.ts';
import type { ColumnMapping } from './mapping.ts';
import type { DecimalMark, MissingCodes } from './numbers.ts';
import { type ParsedTable, parseTable } from './parse-table.ts';
import { bytePieces, isPlainText, streamDataset } from './stream-dataset.ts';
import { TableError } from './table-error.ts';
import { readWorkbook } from './workbook.ts';
import type { JobContext } from '../workers/job-context.ts';

/**
 * Reading a data file for import, without touching any study: the part of an import that runs in a
 * worker thread (or directly in the command line). The result is stored only after the researcher
 * (or the command line) confirms it; see storeImport in app/phases/pilot/import-actions.ts.
 */

export { READ_CHUNK_BYTES } from './stream-dataset.ts';

/** Delimited text (CSV, TSV, semicolons, pipes) or an .xlsx workbook. */
export type DataFileKind = 'delimited' | 'workbook';

/** How to read the file; anything left out is detected. */
export interface ReadSettings {
  /** One character, or "tab". */
  delimiter?: string;
  encoding?: string;
  decimalMark?: DecimalMark;
  /** Workbook sheet by name; the first sheet when absent. */
  sheet?: string;
}

export interface ReadRequest {
  fileName: string;
  bytes: Uint8Array;
  /** The confirmed mapping, or (command line) a function of the file's checked header. */
  mapping: ColumnMapping | ((header: string[]) => ColumnMapping);
  missingCodes: MissingCodes;
  /** Declared bounds of the response format; answers outside are listed, never clipped. */
  bounds: { min: number; max: number };
  reading: ReadSettings;
  /** Refuse larger files (default: the reader's own limit). */
  maxBytes?: number;
}

/** What the worker sends back: a plain, structured-clonable request (no mapping function). */
export type ReadJobInput = Omit<ReadRequest, 'mapping'> & { mapping: ColumnMapping };

/** A file read and checked, not yet stored. */
export interface ImportRead {
  kind: DataFileKind;
  dataset: EncodedDataset;
  header: string[];
  /** The mapping as applied (the function's result on the command line). */
  mapping: ColumnMapping;
  encoding: string;
  /** The delimiter character ('' for a workbook). */
  delimiter: string;
  quoteChar: string;
  sheet?: string;
  byteLength: number;
  /** SHA-256 of the file's bytes, lowercase hex. */
  sha256: string;
}

const ZIP_MAGIC = [0x50, 0x4b, 0x03, 0x04];
const OLE_MAGIC = [0xd0, 0xcf, 0x11, 0xe0];
const WORKBOOK_EXTENSIONS = /\.(xlsx|xlsm|xls)$/i;
const TEXT_EXTENSIONS = /\.(csv|tsv|tab|txt|dat)$/i;

function startsWith(bytes: Uint8Array, magic: readonly number[]): boolean {
  return magic.every((b, i) => bytes[i] === b);
}

/**
 * Whether a file is read as a workbook or as delimited text: by its extension when it has a known one,
 * otherwise by its first bytes (a ZIP archive or an old OLE compound file is taken for a workbook, so
 * that the workbook reader gives the message). Cost O(1).
 */
export function dataFileKind(fileName: string, bytes: Uint8Array): DataFileKind {
  if (WORKBOOK_EXTENSIONS.test(fileName)) return 'workbook';
  if (TEXT_EXTENSIONS.test(fileName)) return 'delimited';
  return startsWith(bytes, ZIP_MAGIC) || startsWith(bytes, OLE_MAGIC) ? 'workbook' : 'delimited';
}

function datasetOptions(request: ReadRequest): DatasetOptions {
  return {
    missingCodes: request.missingCodes,
    scaleMin: request.bounds.min,
    scaleMax: request.bounds.max,
    // The study's response format is a scale of whole-number points (see declaredBounds).
    wholePoints: true,
    decimalMark: request.reading.decimalMark,
  };
}

/** A table read whole (a workbook sheet, or delimited text read at once) turned into a dataset. */
function assembleTable(table: ParsedTable, mapping: ColumnMapping, options: DatasetOptions): EncodedDataset {
  const warnings = [...table.warnings];
  const mark = chooseDecimalMark(
    table.rows,
    numericColumns(table.header, mapping),
    options.decimalMark,
    warnings,
  );
  const assembler = new DatasetAssembler(table.header, mapping, mark, options, table.rows.length);
  assembler.addRows(table.rows, table.rowNumbers ?? table.rows.map((_, i) => i + 2));
  const dataset = assembler.finish();
  dataset.warnings.unshift(...warnings);
  return dataset;
}

function mappingFor(request: ReadRequest, header: string[]): ColumnMapping {
  return typeof request.mapping === 'function' ? request.mapping(header) : request.mapping;
}

function cancelled(fileName: string): EngineError {
  return new EngineError(`reading "${fileName}" was cancelled; nothing was stored`, 'cancelled');
}

/** The file's bytes in READ_CHUNK_BYTES pieces (views, not copies), stopping when asked to. */
function chunksOf(
  bytes: Uint8Array,
  fileName: string,
  control?: Pick<JobContext, 'shouldStop'>,
): AsyncGenerator<Uint8Array> {
  return bytePieces(bytes, () => {
    if (control?.shouldStop()) throw cancelled(fileName);
  });
}

async function readWorkbookFile(request: ReadRequest, control?: JobContext): Promise<ImportRead> {
  const table = await readWorkbook(request.bytes, {
    fileName: request.fileName,
    sheet: request.reading.sheet,
    maxBytes: request.maxBytes,
  });
  if (control?.shouldStop()) throw cancelled(request.fileName);
  const mapping = mappingFor(request, table.header);
  const dataset = assembleTable(table, mapping, datasetOptions(request));
  control?.progress(request.bytes.length, request.bytes.length);
  return {
    kind: 'workbook',
    dataset,
    header: table.header,
    mapping,
    encoding: 'xlsx',
    delimiter: '',
    quoteChar: '',
    sheet: table.sheet,
    byteLength: request.bytes.length,
    sha256: sha256Hex(request.bytes),
  };
}

/**
 * Reads a data file into a dataset in the compact column layout, with every problem listed by row and
 * column, and writes nothing anywhere. Delimited text is streamed (streamDataset: the file's rows are
 * never held as strings) in READ_CHUNK_BYTES pieces, checking `control.shouldStop()` before each piece
 * and reporting bytes read through `control.progress`; a workbook is read whole (readWorkbook). Cost
 * O(file size). Throws TableError for a file that cannot be read as a table or a mapping that does not
 * fit its header, and EngineError with code "cancelled" when stopped.
 */
export async function readDataFile(request: ReadRequest, control?: JobContext): Promise<ImportRead> {
  if (dataFileKind(request.fileName, request.bytes) === 'workbook') return readWorkbookFile(request, control);
  let applied: ColumnMapping | undefined;
  const total = request.bytes.length;
  const streamed = await streamDataset(
    chunksOf(request.bytes, request.fileName, control),
    (header) => {
      applied = mappingFor(request, header);
      return applied;
    },
    {
      ...datasetOptions(request),
      fileName: request.fileName,
      delimiter: request.reading.delimiter,
      encoding: request.reading.encoding,
      maxBytes: request.maxBytes,
      plainText: isPlainText(request.bytes),
      onProgress: (p) => control?.progress(p.bytes, total),
    },
  );
  if (control?.shouldStop()) throw cancelled(request.fileName);
  const { header, delimiter, quoteChar, encoding, byteLength, sha256, ...dataset } = streamed;
  return {
    kind: 'delimited',
    dataset,
    header,
    mapping: applied ?? {},
    encoding,
    delimiter,
    quoteChar,
    byteLength,
    sha256,
  };
}

/**
 * The same reading of a delimited file done synchronously, for callers that cannot wait (the demo
 * study is filled inside a synchronous transaction sequence): parseTable, then the same dataset
 * assembly. Same rules and messages as readDataFile for delimited text (the streaming reader is
 * tested against parseTable on the broken-file corpus). Cost O(file size) time and O(cells) memory
 * for the rows as strings. Throws TableError as readDataFile does, and for a workbook.
 */
export function readDelimitedFileNow(request: ReadRequest): ImportRead {
  if (dataFileKind(request.fileName, request.bytes) === 'workbook') {
    throw new TableError(
      `"${request.fileName}" is a workbook; it can only be read by the asynchronous reader`,
    );
  }
  const table = parseTable(request.bytes, {
    fileName: request.fileName,
    delimiter: request.reading.delimiter,
    encoding: request.reading.encoding,
    maxBytes: request.maxBytes,
  });
  const mapping = mappingFor(request, table.header);
  return {
    kind: 'delimited',
    dataset: assembleTable(table, mapping, datasetOptions(request)),
    header: table.header,
    mapping,
    encoding: table.encoding,
    delimiter: table.delimiter,
    quoteChar: table.quoteChar ?? '"',
    byteLength: request.bytes.length,
    sha256: sha256Hex(request.bytes),
  };
}

/**
 * The worker job "import.read": readDataFile with a file that cannot be read reported as an
 * EngineError with code "file" (the worker passes on only the engine's error codes), so the caller can
 * tell a bad file from a fault. Same cost as readDataFile.
 */
export async function readDataFileJob(input: ReadJobInput, ctx: JobContext): Promise<ImportRead> {
  try {
    return await readDataFile(input, ctx);
  } catch (error) {
    if (error instanceof TableError) throw new EngineError(error.message, 'file');
    throw error;
  }
}
