/**
 * Limits and thresholds of the file reader, named so that tests and messages use the same numbers.
 */

/**
 * Largest file `parseTable` reads in one piece: 256 MiB. A 100,000 × 200 Likert file is about 40–60 MB,
 * so this leaves room while refusing files that would not fit comfortably in memory as strings.
 * `streamTableColumns` reads the same files chunk by chunk and has the same default limit.
 */
export const DEFAULT_MAX_BYTES = 256 * 1024 * 1024;

/** Bytes looked at to guess UTF-16 without a byte-order mark and to spot binary content. */
export const SNIFF_BYTES = 64 * 1024;

/**
 * UTF-16 without a BOM is assumed when at least this share of the byte pairs in the sniffed part have
 * a NUL in one position (odd for little-endian, even for big-endian) and almost none in the other.
 * Text tables are mostly ASCII, so real UTF-16 shows a NUL in nearly every pair.
 */
export const UTF16_NUL_SHARE = 0.3;

/** Share of NULs in the other byte position above which the NUL pattern is not read as UTF-16. */
export const UTF16_OTHER_NUL_SHARE = 0.05;

/**
 * Share of control characters (other than tab, CR, LF) in the decoded text above which the file is
 * treated as binary rather than a text table. Any NUL at all also counts as binary.
 */
export const BINARY_CONTROL_SHARE = 0.01;

/** Records looked at when guessing the delimiter and the quote character. */
export const SNIFF_RECORDS = 50;

/**
 * Data rows whose numeric cells decide the decimal mark of a file (chooseDecimalMark). Every reading
 * of a file (the import preview, the check of the whole file, the command line's import and its
 * `stats` analyses) looks at the same rows, so they all read the file the same way.
 */
export const DECIMAL_MARK_ROWS = 500;

/** Row numbers listed in one warning before the rest are summarised as a count. */
export const MAX_LISTED_ROWS = 10;
