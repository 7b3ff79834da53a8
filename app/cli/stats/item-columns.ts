import { FIELD_EMPTY, type FieldRows } from '../../import/dataset.ts';
import {
  type DecimalMark,
  losesPrecision,
  outOfRangeMessage,
  parseNumber,
  precisionWarning,
} from '../../import/numbers.ts';
import { columnLabel } from '../../import/table-rules.ts';
import type { RecordSink } from '../../import/stream-dataset.ts';
import type { ScaleBounds } from '../../engine/scoring.ts';
import { DataError } from '../types.ts';

const DIGIT_ZERO = 0x30;

/** Distinct cell texts whose reading is remembered (bounds the memory on a file of measurements). */
const DISTINCT_CELLS_KEPT = 10_000;

const DECIMAL_COMMA = /^[+-]?\d+,\d+$/;
const DECIMAL_POINT = /^[+-]?\d+\.\d+$/;

/** What a cell's text reads as: its value (null = missing), and whether the double rounds the text. */
interface Reading {
  value: number | null;
  rounded: boolean;
}

/** How the cells of the item columns are read. */
export interface CellRules {
  /** The file as the user named it (messages name it). */
  file: string;
  header: readonly string[];
  /** Header index of each item column, in the order of the items. */
  columns: readonly number[];
  mark: DecimalMark;
  /** Cell texts that mean "no answer" (an empty cell always does). */
  missingCodes: readonly string[];
  /** The numeric missing codes as numbers: a value equal to one is missing too. */
  numericCodes: readonly number[];
  bounds: ScaleBounds | null;
}

/**
 * The command line's sink for streamRecords: the item columns of a data file read straight into one
 * Float64Array per item (NaN for a missing answer), without a string per cell or a row per respondent.
 * A cell is read by its text alone, so each distinct text is read once (a Likert file holds a
 * handful), at its first occurrence in file order, which is the one a message or warning names; a
 * single digit the reader took out of a plain-text file is looked up without becoming a string.
 * Cost O(cells). Throws DataError naming file, row and column for a value that is not a number, uses
 * the other decimal mark, or lies outside the declared bounds.
 */
export class ItemColumnsSink implements RecordSink {
  private values: Float64Array[];
  private rows: Int32Array;
  private count = 0;
  /** One-character cells (a Likert answer) by character code; longer ones by text. */
  private readonly byCode: (Reading | undefined)[] = new Array(128);
  private readonly known = new Map<string, Reading>();
  /** The readings of the ten digits handed to the field table's kernel: value, and whether known. */
  private readonly table = new Float64Array(10);
  private readonly knownDigits = new Uint8Array(10);
  private rounded: { where: string; cell: string; value: number } | undefined;
  private roundedCount = 0;

  /** `expectedRows` sizes the columns once (a guess is fine: they grow when it is short). */
  constructor(
    private readonly rules: CellRules,
    expectedRows = 1024,
  ) {
    const size = Math.max(16, Math.ceil(expectedRows));
    this.values = rules.columns.map(() => new Float64Array(size));
    this.rows = new Int32Array(size);
  }

  get n(): number {
    return this.count;
  }

  /** The decimal mark the cells are read with. */
  get mark(): DecimalMark {
    return this.rules.mark;
  }

  addRows(records: readonly (readonly string[])[], rowNumbers: readonly number[]): void {
    const { columns } = this.rules;
    for (let i = 0; i < records.length; i++) {
      const at = this.nextRow(rowNumbers[i]);
      const record = records[i];
      for (let j = 0; j < columns.length; j++) {
        this.values[j][at] = this.readText(record[columns[j]] ?? '', rowNumbers[i], columns[j]);
      }
    }
  }

  addFieldRows(rows: FieldRows): void {
    const { columns, header } = this.rules;
    if (rows.gather === undefined || columns.length > header.length) {
      for (let i = 0; i < rows.n; i++) {
        const at = this.nextRow(rows.rowNumbers[i]);
        for (let j = 0; j < columns.length; j++) this.values[j][at] = this.fieldValue(rows, i, columns[j]);
      }
      return;
    }
    // The single digits whose reading is known go through the kernel; the rest, in file order, here.
    for (let d = 0; d < 10; d++) {
      const got = this.byCode[DIGIT_ZERO + d];
      this.knownDigits[d] = got !== undefined && !got.rounded ? 1 : 0;
      this.table[d] = got?.value ?? Number.NaN;
    }
    const { values, capacity, slow, listed } = rows.gather(columns, this.table, this.knownDigits);
    const first = this.reserve(rows.n);
    this.rows.set(rows.rowNumbers, first);
    for (let j = 0; j < columns.length; j++) {
      this.values[j].set(values.subarray(j * capacity, j * capacity + rows.n), first);
    }
    for (let s = 0; s < listed; s++) {
      const i = slow[2 * s];
      const j = slow[2 * s + 1];
      this.values[j][first + i] = this.fieldValue(rows, i, columns[j]);
    }
  }

  /** The value of record i's field in header column c (NaN = missing), read from the field table. */
  private fieldValue(rows: FieldRows, i: number, c: number): number {
    const width = this.rules.header.length;
    const row = rows.rowNumbers[i];
    const digit = rows.digits[i * width + c];
    if (digit >= 0) {
      const code = DIGIT_ZERO + digit;
      const got = this.byCode[code] ?? this.first(String.fromCharCode(code), row, c, code);
      if (got.rounded) this.roundedCount++;
      return got.value ?? Number.NaN;
    }
    if (digit === FIELD_EMPTY) return this.readText('', row, c);
    const base = i * (width + 1);
    return this.readText(rows.text(rows.starts[base + c], rows.starts[base + c + 1] - 1), row, c);
  }

  /** The columns, one per item, and the file row of each respondent, once every record is in. */
  finish(): { columns: Float64Array[]; rowNumbers: number[]; warnings: string[] } {
    const warnings: string[] = [];
    if (this.rounded !== undefined) {
      const { where, cell, value } = this.rounded;
      warnings.push(precisionWarning(where, cell, value, this.roundedCount - 1));
    }
    return {
      columns: this.values.map((v) => v.subarray(0, this.count)),
      rowNumbers: Array.from(this.rows.subarray(0, this.count)),
      warnings,
    };
  }

  /** Makes room for one more respondent, numbered `rowNumber` in the file, and returns its index. */
  private nextRow(rowNumber: number): number {
    const at = this.reserve(1);
    this.rows[at] = rowNumber;
    return at;
  }

  /** Makes room for `n` more respondents (their rows to be filled in) and returns the first's index. */
  private reserve(n: number): number {
    const first = this.count;
    if (first + n > this.rows.length) {
      const size = Math.max(2 * this.rows.length, first + n);
      const grow = <T extends Float64Array | Int32Array>(a: T, make: (n: number) => T): T => {
        const bigger = make(size);
        bigger.set(a);
        return bigger;
      };
      this.rows = grow(this.rows, (k) => new Int32Array(k));
      this.values = this.values.map((v) => grow(v, (k) => new Float64Array(k)));
    }
    this.count += n;
    return first;
  }

  /** The value of a cell given as text (NaN = missing), read once per distinct text. */
  private readText(text: string, row: number, column: number): number {
    const code = text.length === 1 ? text.charCodeAt(0) : 128;
    const got =
      (code < 128 ? this.byCode[code] : this.known.get(text)) ?? this.first(text, row, column, code);
    if (got.rounded) this.roundedCount++;
    return got.value ?? Number.NaN;
  }

  /** Reads a text met for the first time, at file row `row`, header column `column`, and remembers it. */
  private first(text: string, row: number, column: number, code: number): Reading {
    const got = this.read(text, row, column);
    if (code < 128) this.byCode[code] = got;
    else if (this.known.size < DISTINCT_CELLS_KEPT) this.known.set(text, got);
    return got;
  }

  private read(text: string, row: number, column: number): Reading {
    const { file, header, mark, missingCodes, numericCodes, bounds } = this.rules;
    const cell = text.trim();
    if (cell === '' || missingCodes.includes(cell)) return { value: null, rounded: false };
    const value = parseNumber(cell, mark);
    const where = () => `${file}, row ${row}, ${columnLabel(column, header)}`;
    if (value === undefined) {
      const other = mark === '.' ? DECIMAL_COMMA : DECIMAL_POINT;
      if (other.test(cell)) {
        throw new DataError(
          `${where()}: value "${cell}" uses the other decimal mark; this file is read with the decimal ` +
            `${mark === '.' ? 'point' : 'comma'} (give --decimal-mark ${mark === '.' ? 'comma' : 'point'} if that is wrong)`,
        );
      }
      throw new DataError(
        `${where()}: value "${cell}" is not a number ` +
          '(leave the cell empty or list it in --missing-codes if it marks a missing answer)',
      );
    }
    const range = outOfRangeMessage(cell, value);
    if (range !== undefined) throw new DataError(`${where()}: ${range}`);
    const rounded = losesPrecision(cell, value);
    if (rounded && this.rounded === undefined) this.rounded = { where: where(), cell, value };
    if (numericCodes.includes(value)) return { value: null, rounded };
    if (bounds && (value < bounds.min || value > bounds.max)) {
      throw new DataError(
        `${where()}: value ${cell} lies outside the declared bounds ${bounds.min}–${bounds.max} ` +
          '(--min/--max); list it in --missing-codes if it marks a missing answer',
      );
    }
    return { value, rounded };
  }
}
