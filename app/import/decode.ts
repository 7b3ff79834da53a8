import { BINARY_CONTROL_SHARE, SNIFF_BYTES, UTF16_NUL_SHARE, UTF16_OTHER_NUL_SHARE } from './limits.ts';
import { TableError } from './table-error.ts';

/** Encodings the reader understands, by the WHATWG label TextDecoder uses. */
export const SUPPORTED_ENCODINGS = ['utf-8', 'utf-16le', 'utf-16be', 'windows-1252'] as const;
export type Encoding = (typeof SUPPORTED_ENCODINGS)[number];

export interface DecodedText {
  text: string;
  encoding: Encoding;
  /** True when the file began with a byte-order mark (removed from `text`). */
  bom: boolean;
  warnings: string[];
}

const ENCODING_ALIASES: Record<string, Encoding> = {
  'utf-8': 'utf-8',
  utf8: 'utf-8',
  'utf-16le': 'utf-16le',
  'utf-16be': 'utf-16be',
  'utf-16': 'utf-16le',
  'windows-1252': 'windows-1252',
  cp1252: 'windows-1252',
  'latin-1': 'windows-1252',
  latin1: 'windows-1252',
  'iso-8859-1': 'windows-1252',
};

/** Resolves a user-given encoding name; throws a TableError naming the accepted ones. */
export function normalizeEncoding(name: string): Encoding {
  const found = ENCODING_ALIASES[name.trim().toLowerCase()];
  if (!found) {
    throw new TableError(`unknown encoding "${name}": use one of ${SUPPORTED_ENCODINGS.join(', ')}`);
  }
  return found;
}

/** Byte-order mark at the start of `bytes`, if any, with its length. */
export function detectBom(bytes: Uint8Array): { encoding: Encoding; length: number } | undefined {
  if (bytes.length >= 3 && bytes[0] === 0xef && bytes[1] === 0xbb && bytes[2] === 0xbf) {
    return { encoding: 'utf-8', length: 3 };
  }
  if (bytes.length >= 2 && bytes[0] === 0xff && bytes[1] === 0xfe) return { encoding: 'utf-16le', length: 2 };
  if (bytes.length >= 2 && bytes[0] === 0xfe && bytes[1] === 0xff) return { encoding: 'utf-16be', length: 2 };
  return undefined;
}

/**
 * Guesses UTF-16 without a BOM from where the NUL bytes sit: ASCII text in UTF-16LE reads
 * "x 00 x 00", in UTF-16BE "00 x 00 x". Looks at the first SNIFF_BYTES bytes only.
 */
export function detectUtf16ByNuls(bytes: Uint8Array): Encoding | undefined {
  const n = Math.min(bytes.length, SNIFF_BYTES) & ~1;
  if (n < 4) return undefined;
  const nul = bytes.indexOf(0);
  if (nul < 0 || nul >= n) return undefined;
  let evenNuls = 0;
  let oddNuls = 0;
  for (let i = 0; i < n; i += 2) {
    if (bytes[i] === 0) evenNuls++;
    if (bytes[i + 1] === 0) oddNuls++;
  }
  const pairs = n / 2;
  if (oddNuls / pairs >= UTF16_NUL_SHARE && evenNuls / pairs <= UTF16_OTHER_NUL_SHARE) return 'utf-16le';
  if (evenNuls / pairs >= UTF16_NUL_SHARE && oddNuls / pairs <= UTF16_OTHER_NUL_SHARE) return 'utf-16be';
  return undefined;
}

function looksLikeZip(bytes: Uint8Array): boolean {
  return (
    bytes.length >= 4 && bytes[0] === 0x50 && bytes[1] === 0x4b && bytes[2] === 0x03 && bytes[3] === 0x04
  );
}

/** A NUL or a control character that text tables do not hold (tab, line feed and return they do). */
// biome-ignore lint/suspicious/noControlCharactersInRegex: control characters are what it looks for
const CONTROL = /[\u0000-\u0008\u000b\u000c\u000e-\u001f\u007f-\u009f]/;

/**
 * Refuses text that is really binary content: any NUL character, or more than BINARY_CONTROL_SHARE
 * control characters (tab, CR and LF excepted) in the first SNIFF_BYTES characters.
 */
export function assertTextual(text: string, fileLabel: string): void {
  const n = Math.min(text.length, SNIFF_BYTES);
  if (!CONTROL.test(text.slice(0, n))) return;
  let controls = 0;
  for (let i = 0; i < n; i++) {
    const c = text.charCodeAt(i);
    if (c === 0) {
      throw new TableError(
        `${fileLabel} does not look like a text table: it contains a NUL character at position ${i + 1}`,
      );
    }
    if ((c < 32 && c !== 9 && c !== 10 && c !== 13) || c === 0x7f || (c >= 0x80 && c < 0xa0)) controls++;
  }
  if (n > 0 && controls / n > BINARY_CONTROL_SHARE) {
    throw new TableError(
      `${fileLabel} does not look like a text table: ${controls} control characters in its first ${n} characters`,
    );
  }
}

export interface EncodingChoice {
  encoding: Encoding;
  /** Bytes of byte-order mark to skip. */
  bomLength: number;
  warnings: string[];
}

/**
 * Chooses the encoding of a file from its first bytes (or all of them when `complete`). Order: a given
 * `encoding` wins (a matching BOM is still skipped); else a byte-order mark; else the NUL pattern of
 * UTF-16; else UTF-8 when the bytes are valid UTF-8 (a sequence cut at the end of an incomplete prefix
 * is allowed); else Windows-1252, with a warning because that guess cannot be proven.
 * Throws TableError for a ZIP archive (an .xlsx workbook given as text) and an unknown encoding name.
 */
export function chooseEncoding(
  bytes: Uint8Array,
  complete: boolean,
  encoding?: string,
  fileName?: string,
): EncodingChoice {
  const label = fileName ? `file "${fileName}"` : 'the file';
  if (looksLikeZip(bytes)) {
    throw new TableError(
      `${label} is a ZIP archive (an .xlsx workbook?), not delimited text: read it with readWorkbook`,
    );
  }
  const warnings: string[] = [];
  const bom = detectBom(bytes);
  if (encoding !== undefined) {
    const chosen = normalizeEncoding(encoding);
    if (bom && bom.encoding !== chosen) {
      warnings.push(
        `the file starts with a ${bom.encoding} byte-order mark but was read as ${chosen} as requested`,
      );
    }
    return { encoding: chosen, bomLength: bom && bom.encoding === chosen ? bom.length : 0, warnings };
  }
  if (bom) return { encoding: bom.encoding, bomLength: bom.length, warnings };
  const utf16 = detectUtf16ByNuls(bytes);
  if (utf16) {
    warnings.push(`no byte-order mark; read as ${utf16} from the pattern of zero bytes`);
    return { encoding: utf16, bomLength: 0, warnings };
  }
  try {
    new TextDecoder('utf-8', { fatal: true, ignoreBOM: true }).decode(bytes, { stream: !complete });
    return { encoding: 'utf-8', bomLength: 0, warnings };
  } catch {
    warnings.push(
      'the file is not valid UTF-8; read as Windows-1252 (check accented characters in the preview)',
    );
    return { encoding: 'windows-1252', bomLength: 0, warnings };
  }
}

/** Message for bytes that the chosen encoding cannot decode. */
export function undecodableMessage(encoding: Encoding, requested: boolean, fileName?: string): string {
  const label = fileName ? `file "${fileName}"` : 'the file';
  if (encoding === 'utf-8') {
    return requested
      ? `${label} is not valid UTF-8 as requested: leave the encoding out to let the reader detect it`
      : `${label} is not valid UTF-8 throughout: read it again with the encoding set to windows-1252`;
  }
  return `${label} is not valid ${encoding}: it has an odd number of bytes or an unpaired surrogate`;
}

/**
 * Characters of Windows-1252 bytes 0x80–0x9F (WHATWG Encoding Standard, index-windows-1252); the five
 * unassigned bytes map to the C1 control of the same value, as the standard says. Node's TextDecoder
 * reads the label "windows-1252" as ISO-8859-1, which gets this range wrong, hence our own table.
 */
const WINDOWS_1252_HIGH =
  '\u20ac\u0081\u201a\u0192\u201e\u2026\u2020\u2021\u02c6\u2030\u0160\u2039\u0152\u008d\u017d\u008f' +
  '\u0090\u2018\u2019\u201c\u201d\u2022\u2013\u2014\u02dc\u2122\u0161\u203a\u0153\u009d\u017e\u0178';

/** Decodes Windows-1252 bytes (single-byte, so chunks decode independently). Cost O(n). */
export function decodeWindows1252(bytes: Uint8Array): string {
  const latin1 = Buffer.from(bytes.buffer, bytes.byteOffset, bytes.byteLength).toString('latin1');
  return latin1.replace(/[\u0080-\u009f]/g, (c) => WINDOWS_1252_HIGH[c.charCodeAt(0) - 0x80]);
}

/** An incremental decoder: `stream` true keeps an incomplete trailing sequence for the next call. */
export interface ChunkDecoder {
  decode(bytes: Uint8Array, stream: boolean): string;
}

/** A decoder for the chosen encoding; fatal on malformed input except for Windows-1252. */
export function makeDecoder(encoding: Encoding): ChunkDecoder {
  if (encoding === 'windows-1252') return { decode: (bytes) => decodeWindows1252(bytes) };
  const decoder = new TextDecoder(encoding, { fatal: true, ignoreBOM: true });
  return { decode: (bytes, stream) => decoder.decode(bytes, { stream }) };
}

/**
 * Decodes the bytes of a delimited text file with the encoding chooseEncoding picks, and refuses
 * binary content. Cost O(file size). Throws TableError for a workbook passed as text, binary content,
 * and bytes the chosen encoding cannot decode.
 */
export function decodeBytes(bytes: Uint8Array, encoding?: string, fileName?: string): DecodedText {
  const label = fileName ? `file "${fileName}"` : 'the file';
  const choice = chooseEncoding(bytes, true, encoding, fileName);
  const body = bytes.subarray(choice.bomLength);
  let text: string;
  try {
    text = makeDecoder(choice.encoding).decode(body, false);
  } catch {
    throw new TableError(undecodableMessage(choice.encoding, encoding !== undefined, fileName));
  }
  assertTextual(text, label);
  return { text, encoding: choice.encoding, bom: choice.bomLength > 0, warnings: choice.warnings };
}
