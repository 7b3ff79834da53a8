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

/**
 * Refuses text that is really binary content: any NUL character, or more than BINARY_CONTROL_SHARE
 * control characters (tab, CR and LF excepted) in the first SNIFF_BYTES characters.
 */
function assertTextual(text: string, fileLabel: string): void {
  const n = Math.min(text.length, SNIFF_BYTES);
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

/**
 * Decodes the bytes of a delimited text file. Order: a byte-order mark decides; otherwise the NUL
 * pattern of UTF-16; otherwise strict UTF-8; otherwise Windows-1252 (with a warning, because that
 * guess cannot be proven). A given `encoding` overrides detection (a matching BOM is still removed).
 * Throws TableError for a workbook passed as text, for binary content, and for undecodable UTF-16.
 */
export function decodeBytes(bytes: Uint8Array, encoding?: string, fileName?: string): DecodedText {
  const label = fileName ? `file "${fileName}"` : 'the file';
  if (looksLikeZip(bytes)) {
    throw new TableError(
      `${label} is a ZIP archive (an .xlsx workbook?), not delimited text: read it with readWorkbook`,
    );
  }
  const warnings: string[] = [];
  const bom = detectBom(bytes);
  let chosen: Encoding;
  if (encoding !== undefined) {
    chosen = normalizeEncoding(encoding);
    if (bom && bom.encoding !== chosen) {
      warnings.push(
        `the file starts with a ${bom.encoding} byte-order mark but was read as ${chosen} as requested`,
      );
    }
  } else if (bom) {
    chosen = bom.encoding;
  } else {
    const utf16 = detectUtf16ByNuls(bytes);
    if (utf16) {
      chosen = utf16;
      warnings.push(`no byte-order mark; read as ${utf16} from the pattern of zero bytes`);
    } else {
      chosen = 'utf-8';
    }
  }
  const skip = bom && bom.encoding === chosen ? bom.length : 0;
  const body = bytes.subarray(skip);
  let text: string;
  if (chosen === 'utf-8' && encoding === undefined) {
    try {
      text = new TextDecoder('utf-8', { fatal: true, ignoreBOM: true }).decode(body);
    } catch {
      chosen = 'windows-1252';
      text = new TextDecoder('windows-1252').decode(body);
      warnings.push(
        'the file is not valid UTF-8; read as Windows-1252 (check accented characters in the preview)',
      );
    }
  } else if (chosen === 'utf-8') {
    try {
      text = new TextDecoder('utf-8', { fatal: true, ignoreBOM: true }).decode(body);
    } catch {
      throw new TableError(
        `${label} is not valid UTF-8 as requested: leave the encoding out to let the reader detect it`,
      );
    }
  } else if (chosen === 'utf-16le' || chosen === 'utf-16be') {
    if (body.length % 2 !== 0) {
      throw new TableError(`${label} cannot be ${chosen}: it has an odd number of bytes (${bytes.length})`);
    }
    try {
      text = new TextDecoder(chosen, { fatal: true, ignoreBOM: true }).decode(body);
    } catch {
      throw new TableError(`${label} is not valid ${chosen}: it contains an unpaired surrogate`);
    }
  } else {
    text = new TextDecoder(chosen, { ignoreBOM: true }).decode(body);
  }
  assertTextual(text, label);
  return { text, encoding: chosen, bom: skip > 0, warnings };
}
