/**
 * Reading numbers from text cells: decimal mark detection, strict number parsing and missing-value
 * codes. Strict means that only plain decimal notation is a number ("3", "-2.5", "+4", "1e3", "2,5"
 * with a decimal comma); "0x10", "Infinity", "1 000", "3 points" and thousands separators are not.
 */

import type { DecimalMark, MissingCodes } from '../engine/dataset.ts';

export type { DecimalMark, MissingCodes } from '../engine/dataset.ts';

/** Digit strings up to this length are read as whole numbers exactly (below 2⁵³) without a regex. */
const MAX_FAST_DIGITS = 15;

const DOT_DECIMAL = /^[+-]?\d+\.\d+$/;
const COMMA_DECIMAL = /^[+-]?\d+,\d+$/;
const PLAIN_NUMBER = /^[+-]?(?:\d+(?:\.\d*)?|\.\d+)(?:[eE][+-]?\d+)?$/;

export interface DecimalMarkGuess {
  mark: DecimalMark;
  /** Cells that used the decimal point and the decimal comma. */
  dotCells: number;
  commaCells: number;
  /** True when both marks occur; the majority was taken and the minority cells are reported. */
  mixed: boolean;
}

/**
 * Counts cells written with a decimal point ("2.5") and with a decimal comma ("2,5") and takes the
 * mark used more often; a tie with no decimals at all gives the point. A comma decimal can only occur
 * with a delimiter other than the comma (or inside quotes), so this is asked after delimiter detection.
 * Cost O(number of cells).
 */
export function detectDecimalMark(cells: Iterable<string>): DecimalMarkGuess {
  let dotCells = 0;
  let commaCells = 0;
  for (const raw of cells) {
    const cell = raw.trim();
    if (cell.length < 3) continue;
    if (DOT_DECIMAL.test(cell)) dotCells++;
    else if (COMMA_DECIMAL.test(cell)) commaCells++;
  }
  return {
    mark: commaCells > dotCells ? ',' : '.',
    dotCells,
    commaCells,
    mixed: dotCells > 0 && commaCells > 0,
  };
}

/**
 * Parses one trimmed cell as a number with the given decimal mark; returns undefined for anything that
 * is not plain decimal notation. The common case of a single digit is read without a regular
 * expression, which keeps a 6-million-cell Likert file fast. Cost O(length of the cell).
 */
export function parseNumber(cell: string, mark: DecimalMark): number | undefined {
  if (cell.length === 1) {
    const c = cell.charCodeAt(0) - 48;
    return c >= 0 && c <= 9 ? c : undefined;
  }
  if (cell.length <= MAX_FAST_DIGITS) {
    // Whole numbers (ids, durations, counts) without a regular expression.
    let i = cell.charCodeAt(0) === 45 ? 1 : 0;
    let value = 0;
    for (; i < cell.length; i++) {
      const d = cell.charCodeAt(i) - 48;
      if (d < 0 || d > 9) break;
      value = value * 10 + d;
    }
    if (i === cell.length && cell.length > (cell.charCodeAt(0) === 45 ? 1 : 0)) {
      return cell.charCodeAt(0) === 45 ? -value : value;
    }
  }
  let text = cell;
  if (mark === ',') {
    if (text.includes('.')) return undefined;
    text = text.replace(',', '.');
  }
  if (!PLAIN_NUMBER.test(text)) return undefined;
  return Number(text);
}

/**
 * Why a cell that reads as a number cannot be held as one: its value overflows a double ("1e999"
 * reads as Infinity). Undefined for a finite value. Cost O(1).
 */
export function outOfRangeMessage(text: string, value: number): string | undefined {
  return Number.isFinite(value)
    ? undefined
    : `'${text}' is beyond the largest number that can be held (about 1.8e308)`;
}

/**
 * True when `text`, a whole number, is not held exactly by the double `value` it was read as: whole
 * numbers above 2⁵³ (9007199254740992) are rounded to the nearest double. Decimals are not judged
 * here: nearly every decimal fraction is held to about 16 significant digits, which is expected.
 * Cost O(length of the text).
 */
export function losesPrecision(text: string, value: number): boolean {
  if (Number.isSafeInteger(value) || !Number.isFinite(value)) return false;
  const t = text.trim();
  return /^[+-]?\d+$/.test(t) && BigInt(t) !== BigInt(value);
}

/** The warning for a whole number that lost precision, naming its cell. */
export function precisionWarning(where: string, text: string, value: number, more: number): string {
  return `${where}: ${text.trim()} cannot be held exactly and is read as ${BigInt(value)} (whole numbers above 2^53 = 9007199254740992 are rounded)${more > 0 ? `; so are ${more} more cell(s)` : ''}`;
}

/** Blank cells are always missing; no other code is assumed unless declared for the dataset. */
export const NO_MISSING_CODES: MissingCodes = { text: [], numeric: [] };

/** What the last cell read by CellReader held. */
export const CELL_NUMBER = 0;
export const CELL_MISSING = 1;
export const CELL_TEXT = 2;
export type CellStatus = typeof CELL_NUMBER | typeof CELL_MISSING | typeof CELL_TEXT;

/**
 * Reads raw cells into numbers with the dataset's missing codes and decimal mark. `read` returns the
 * number, or NaN when the cell is missing or is text, and sets `status` to say which: a status field
 * instead of a result object keeps the inner loop free of allocations.
 */
export class CellReader {
  status: CellStatus = CELL_NUMBER;
  private readonly textCodes: Set<string>;
  private readonly numericCodes: Set<number>;

  constructor(
    codes: MissingCodes,
    readonly mark: DecimalMark,
  ) {
    this.textCodes = new Set(codes.text.map((t) => t.trim().toLowerCase()));
    this.numericCodes = new Set(codes.numeric);
  }

  /** Reads one raw cell. Cost O(length of the cell). */
  read(raw: string): number {
    const cell = raw.length === 1 ? raw : raw.trim();
    if (cell === '') {
      this.status = CELL_MISSING;
      return Number.NaN;
    }
    const value = parseNumber(cell, this.mark);
    if (value !== undefined) {
      if (this.numericCodes.size > 0 && this.numericCodes.has(value)) {
        this.status = CELL_MISSING;
        return Number.NaN;
      }
      this.status = CELL_NUMBER;
      return value;
    }
    this.status =
      this.textCodes.size > 0 && this.textCodes.has(cell.toLowerCase()) ? CELL_MISSING : CELL_TEXT;
    return Number.NaN;
  }

  /** True when the cell is missing: blank, or one of the declared text or numeric codes. */
  isMissing(raw: string): boolean {
    this.read(raw);
    return this.status === CELL_MISSING;
  }
}
