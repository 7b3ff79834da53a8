import { detectBom, detectUtf16ByNuls } from './decode.ts';
import { DEFAULT_MAX_BYTES } from './limits.ts';
import { type ParsedTable, type ParseTableOptions, parseTable } from './parse-table.ts';

/** Bytes read for a preview: enough for the first rows of any realistic questionnaire export. */
export const PREVIEW_BYTES = 1024 * 1024;

/** Rows shown in a preview unless asked otherwise. */
export const PREVIEW_ROWS = 20;

export interface TablePreview extends ParsedTable {
  /** True when the preview read only the start of the file. */
  truncated: boolean;
  totalBytes: number;
}

/** Offset just after the last line break in `bytes[0, limit)`, in the encoding's code units. */
function lastLineEnd(bytes: Uint8Array, limit: number): number {
  const bom = detectBom(bytes);
  const encoding = bom?.encoding ?? detectUtf16ByNuls(bytes) ?? 'utf-8';
  if (encoding === 'utf-16le') {
    for (let i = (limit & ~1) - 2; i >= 0; i -= 2) if (bytes[i] === 0x0a && bytes[i + 1] === 0) return i + 2;
  } else if (encoding === 'utf-16be') {
    for (let i = (limit & ~1) - 2; i >= 0; i -= 2) if (bytes[i] === 0 && bytes[i + 1] === 0x0a) return i + 2;
  } else {
    for (let i = limit - 1; i >= 0; i--) if (bytes[i] === 0x0a) return i + 1;
  }
  return limit;
}

/**
 * The first rows of a delimited file for the researcher to check before anything is stored: the file's
 * start (up to PREVIEW_BYTES, cut after a line break) read with parseTable's detection and checks.
 * Nothing is written anywhere. Cost O(PREVIEW_BYTES). Throws TableError as parseTable does for the
 * part it reads; a quoted field that spans the cut can be reported as unterminated.
 */
export function previewTable(
  bytes: Uint8Array,
  options: ParseTableOptions & { rows?: number } = {},
): TablePreview {
  const rows = options.rows ?? PREVIEW_ROWS;
  const truncated = bytes.length > PREVIEW_BYTES;
  const part = truncated ? bytes.subarray(0, lastLineEnd(bytes, PREVIEW_BYTES)) : bytes;
  const table = parseTable(part, { ...options, maxBytes: Number.POSITIVE_INFINITY });
  const warnings = [...table.warnings];
  const maxBytes = options.maxBytes ?? DEFAULT_MAX_BYTES;
  if (bytes.length > maxBytes) {
    warnings.push(`the file is ${bytes.length} bytes, above the import limit of ${maxBytes} bytes`);
  }
  return {
    ...table,
    rows: table.rows.slice(0, rows),
    rowNumbers: table.rowNumbers?.slice(0, rows),
    warnings,
    truncated: truncated || table.rows.length > rows,
    totalBytes: bytes.length,
  };
}
