import { ColumnBuilder, decodeColumn, INT8_MISSING } from '../engine/columnar.ts';
import { type ColumnMapping, type ResolvedMapping, resolveMapping } from './mapping.ts';
import {
  CELL_MISSING,
  CELL_TEXT,
  CellReader,
  type DecimalMark,
  detectDecimalMark,
  losesPrecision,
  type MissingCodes,
  NO_MISSING_CODES,
  outOfRangeMessage,
  precisionWarning,
} from './numbers.ts';
import { DECIMAL_MARK_ROWS } from './limits.ts';
import type { ParsedTable } from './table-rules.ts';
import type { GatheredDigits } from './plain-records.ts';
import { TableError } from './table-error.ts';

export type {
  AttentionColumn,
  AttentionOutcome,
  Dataset,
  EncodedDataset,
  EncodedNumericColumn,
  ImportProblem,
  NumericColumn,
  NumericRole,
  TextColumn,
} from '../engine/dataset.ts';
import type {
  AttentionColumn,
  AttentionOutcome,
  Dataset,
  EncodedDataset,
  ImportProblem,
  NumericRole,
  TextColumn,
} from '../engine/dataset.ts';

/** Problems listed one by one before the rest are only counted (`problemCount` has them all). */
export const DEFAULT_MAX_PROBLEMS = 1000;

export interface DatasetOptions {
  /** Missing-value codes of this dataset; blank cells are always missing. */
  missingCodes?: MissingCodes;
  /** Declared bounds of the item response format; values outside are listed, never clipped. */
  scaleMin?: number;
  scaleMax?: number;
  /**
   * The response format's values are the whole numbers from scaleMin to scaleMax (a rating scale of
   * points): an item answer between them (4.5 on a 1–5 format) is listed as a problem, kept as is.
   */
  wholePoints?: boolean;
  /** Decimal mark; detected from the numeric columns when absent. */
  decimalMark?: DecimalMark;
  /** Problems listed one by one (default DEFAULT_MAX_PROBLEMS). */
  maxProblems?: number;
}

/** Checks declared scale bounds; throws TableError when only one is given or min is not below max. */
export function checkScaleBounds(min?: number, max?: number): { min: number; max: number } | undefined {
  if (min === undefined && max === undefined) return undefined;
  if (min === undefined || max === undefined || !Number.isFinite(min) || !Number.isFinite(max)) {
    throw new TableError('declared scale bounds need both a finite minimum and a finite maximum');
  }
  if (min >= max) {
    throw new TableError(`declared scale bounds: the minimum ${min} must be below the maximum ${max}`);
  }
  return { min, max };
}

interface NumericSlot {
  column: number;
  name: string;
  role: NumericRole;
  itemCode?: string;
  builder: ColumnBuilder;
  missing: number;
  bounded: boolean;
}

/**
 * Data records of one batch as field offsets into ASCII bytes, so that a reader that splits the bytes
 * itself need not make a string of every cell (see DatasetAssembler.addFieldRows). With w the header's
 * width, record i has w + 1 offsets from starts[i · (w + 1)]: field f spans the bytes from offset f up
 * to one before offset f + 1 (the byte there is the delimiter or line end that closes the field); and
 * w entries from digits[i · w]: the field's value when it is a single digit, FIELD_EMPTY when it has
 * no bytes at all, else FIELD_OTHER.
 */
/** FieldRows.digits of a field that has no bytes at all (a missing value); the splitLines kernel's value. */
export const FIELD_EMPTY = -2;
/** FieldRows.digits of a field that is neither a single digit nor empty; the splitLines kernel's value. */
export const FIELD_OTHER = -1;

export interface FieldRows {
  /** Number of records. */
  n: number;
  /** File row of each record (header = row 1); only while the call that was given the rows runs. */
  rowNumbers: ArrayLike<number>;
  readonly starts: Int32Array;
  readonly digits: Int8Array;
  /** The bytes from `from` up to `to` (exclusive) as text. */
  text(from: number, to: number): string;
  /**
   * The records' single digits in the given header columns (at most the header's width), read by a
   * compiled kernel: digit d is table[d] where known[d] is 1, an empty field NaN, every other cell
   * listed for the caller (see PlainRecords.gather). Only while the call that was given the rows runs.
   */
  gather?(columns: readonly number[], table: Float64Array, known: Uint8Array): GatheredDigits;
}

/**
 * Turns data records into a dataset one batch at a time, so a file can be read in chunks and its
 * numeric columns built directly in the compact layout. `addRows` expects records already fitted to
 * the header's width (see fitRecord). Cost O(cells).
 */
export class DatasetAssembler {
  private readonly resolved: ResolvedMapping;
  private readonly reader: CellReader;
  private readonly attentionReaders: { column: number; correct: string; correctNumber?: number }[];
  private readonly slots: NumericSlot[];
  /** Per slot, its column. */
  private readonly slotColumns: Int32Array;
  /**
   * Fast-path table: fastDigit[s·10 + d] is 1 when the single digit d in slot s is simply a value (not
   * a declared missing code, inside the declared scale, not a negative duration), else 0.
   */
  private readonly fastDigit: Uint8Array;
  /** Problems noted in the current batch of rows, before they are put in file order. */
  private readonly pending: { row: number; column: number; message: string }[] = [];
  /** Numeric values of the current batch of rows, column-major, as int8 (see addRows). */
  private scratch = new Int8Array(0);
  /** Cells of the current batch (row · slots + slot) that need the general reader. */
  private slow = new Int32Array(0);
  /** Per slot, the empty cells of the current batch (missing, taken on the fast path). */
  private readonly emptyCells: Int32Array;
  private readonly bounds?: { min: number; max: number };
  private readonly wholePoints: boolean;
  private readonly maxProblems: number;
  private readonly missingCodes: MissingCodes;
  private readonly ids: string[] = [];
  private readonly rowNumbers: number[] = [];
  private readonly groups: TextColumn[];
  private readonly retestLinks?: TextColumn;
  private readonly attention: AttentionColumn[];
  private readonly problems: ImportProblem[] = [];
  private readonly warnings: string[] = [];
  private problemCount = 0;
  /** The first cell whose whole number lost precision, and how many did. */
  private roundedFirst?: { row: number; column: number; text: string; value: number };
  private roundedCount = 0;

  constructor(
    private readonly header: readonly string[],
    mapping: ColumnMapping,
    readonly decimalMark: DecimalMark,
    options: DatasetOptions = {},
    capacityHint = 1024,
  ) {
    this.resolved = resolveMapping(header, mapping);
    this.missingCodes = options.missingCodes ?? NO_MISSING_CODES;
    this.reader = new CellReader(this.missingCodes, decimalMark);
    this.bounds = checkScaleBounds(options.scaleMin, options.scaleMax);
    this.wholePoints = options.wholePoints === true && this.bounds !== undefined;
    this.maxProblems = options.maxProblems ?? DEFAULT_MAX_PROBLEMS;
    const slot = (column: number, role: NumericRole, itemCode?: string): NumericSlot => ({
      column,
      name: header[column],
      role,
      itemCode,
      builder: new ColumnBuilder(capacityHint),
      missing: 0,
      bounded: role === 'item' && this.bounds !== undefined,
    });
    const r = this.resolved;
    this.slots = [
      ...r.items.map((i) => slot(i.column, 'item', i.itemCode)),
      ...r.criteria.map((c) => slot(c, 'criterion')),
      ...(r.duration === undefined ? [] : [slot(r.duration, 'duration')]),
    ].sort((a, b) => a.column - b.column);
    this.slotColumns = Int32Array.from(this.slots, (sl) => sl.column);
    this.emptyCells = new Int32Array(this.slots.length);
    const codes = new Set(this.missingCodes.numeric);
    this.fastDigit = new Uint8Array(this.slots.length * 10);
    this.slots.forEach((sl, s) => {
      for (let d = 0; d <= 9; d++) {
        const inScale = !sl.bounded || !this.bounds || (d >= this.bounds.min && d <= this.bounds.max);
        this.fastDigit[s * 10 + d] = !codes.has(d) && inScale ? 1 : 0;
      }
    });
    this.groups = r.groups.map((c) => ({ name: header[c], values: [] }));
    if (r.retestLink !== undefined) this.retestLinks = { name: header[r.retestLink], values: [] };
    this.attention = r.attention.map((a) => ({
      name: header[a.column],
      correctAnswer: a.correctAnswer,
      outcomes: [],
    }));
    this.attentionReaders = r.attention.map((a) => {
      const correctNumber = this.reader.read(a.correctAnswer);
      return {
        column: a.column,
        correct: a.correctAnswer.toLowerCase(),
        correctNumber: Number.isNaN(correctNumber) ? undefined : correctNumber,
      };
    });
    if (r.idColumn === undefined) {
      this.warnings.push(
        'no column is mapped as the respondent id; respondents are named by their row number',
      );
    }
  }

  /** Number of records added so far. */
  get n(): number {
    return this.ids.length;
  }

  private note(row: number, column: number, message: string): void {
    this.pending.push({ row, column, message });
  }

  /** Lists the problems noted since `from` in file order (row, then column). */
  private flushProblems(from: number): void {
    const batch = this.pending.splice(from);
    if (batch.length > 1) batch.sort((a, b) => a.row - b.row || a.column - b.column);
    for (const p of batch) {
      this.problemCount++;
      if (this.problems.length < this.maxProblems) {
        const name = this.header[p.column];
        this.problems.push({
          row: p.row,
          column: name,
          message: `row ${p.row}, column '${name}': ${p.message}`,
        });
      }
    }
  }

  private textMessage(text: string): string {
    const otherMark = this.decimalMark === '.' ? /^[+-]?\d+,\d+$/ : /^[+-]?\d+\.\d+$/;
    if (otherMark.test(text)) {
      const used = this.decimalMark === '.' ? 'point' : 'comma';
      return `'${text}' uses the other decimal mark; this file's decimal mark is the ${used} (read as missing)`;
    }
    return `'${text}' is not a number (read as missing; declare it as a missing-value code if it means no answer)`;
  }

  /** Reads a cell off the fast path, noting text, out-of-range values and negative durations. */
  private readSlow(raw: string, s: number, rowNumber: number): number {
    const slot = this.slots[s];
    const reader = this.reader;
    const value = reader.read(raw);
    if (Number.isNaN(value)) {
      slot.missing++;
      if (reader.status === CELL_TEXT) this.note(rowNumber, slot.column, this.textMessage(raw.trim()));
    } else if (!Number.isFinite(value)) {
      slot.missing++;
      this.note(rowNumber, slot.column, `${outOfRangeMessage(raw.trim(), value)} (read as missing)`);
      return Number.NaN;
    } else if (slot.bounded && this.bounds && (value < this.bounds.min || value > this.bounds.max)) {
      this.note(
        rowNumber,
        slot.column,
        `value ${String(value)} is outside the declared scale ${this.bounds.min} to ${this.bounds.max} (kept as is, not clipped)`,
      );
    } else if (slot.bounded && this.wholePoints && !Number.isInteger(value)) {
      this.note(
        rowNumber,
        slot.column,
        `value ${String(value)} is not one of the response format's points (whole numbers ${this.bounds?.min} to ${this.bounds?.max}); kept as is`,
      );
    } else if (slot.role === 'duration' && value < 0) {
      this.note(rowNumber, slot.column, `the duration ${String(value)} is negative`);
    }
    if (losesPrecision(raw, value)) {
      this.roundedCount++;
      if (this.roundedFirst === undefined || rowNumber < this.roundedFirst.row)
        this.roundedFirst = { row: rowNumber, column: slot.column, text: raw, value };
    }
    return value;
  }

  /**
   * Adds data records (already fitted to the header) found at file rows `rowNumbers`. Numeric cells
   * go through a scratch block and one bulk append per column builder, which is what keeps a
   * 6-million-cell import close to the parser's own speed. Problems are listed in file order (row,
   * then column).
   */
  addRows(records: readonly (readonly string[])[], rowNumbers: readonly number[]): void {
    const n = records.length;
    this.addBatch(
      n,
      rowNumbers,
      (i, column) => records[i][column],
      (block, slow, empty) => fillFastCells(records, n, this.slotColumns, this.fastDigit, block, slow, empty),
    );
  }

  /**
   * Adds data records given as field offsets into ASCII bytes (see FieldRows), with the same rules,
   * values and problems as addRows on the same records as strings: single-digit cells are read
   * straight from the bytes, and only the other cells become strings.
   */
  addFieldRows(rows: FieldRows): void {
    const width = this.header.length;
    const { starts, digits } = rows;
    const stride = width + 1;
    this.addBatch(
      rows.n,
      rows.rowNumbers,
      (i, column) => rows.text(starts[i * stride + column], starts[i * stride + column + 1] - 1),
      (block, slow, empty) =>
        fillFastFields(digits, width, rows.n, this.slotColumns, this.fastDigit, block, slow, empty),
    );
  }

  /**
   * The body of addRows and addFieldRows: `cell(i, column)` is the raw text of record i in a column,
   * `fill` the first pass that puts the plain digits in the int8 block (see fillFastCells).
   */
  private addBatch(
    n: number,
    rowNumbers: ArrayLike<number>,
    cell: (record: number, column: number) => string,
    fill: (block: Int8Array, slow: Int32Array, empty: Int32Array) => number,
  ): void {
    const r = this.resolved;
    const firstProblem = this.pending.length;
    for (let i = 0; i < n; i++) {
      const rowNumber = rowNumbers[i];
      this.rowNumbers.push(rowNumber);
      if (r.idColumn === undefined) {
        this.ids.push(`row ${rowNumber}`);
      } else {
        const id = cell(i, r.idColumn).trim();
        if (id === '') {
          this.note(rowNumber, r.idColumn, `the respondent id is empty; named 'row ${rowNumber}' instead`);
          this.ids.push(`row ${rowNumber}`);
        } else {
          this.ids.push(id);
        }
      }
    }
    const k = this.slots.length;
    if (this.scratch.length < n * k) this.scratch = new Int8Array(Math.max(n * k, this.scratch.length * 2));
    const scratch = this.scratch;
    const columns = this.slotColumns;
    // Per slot, the batch's values as doubles once one of them does not fit int8 (then the column is
    // appended from these instead of the int8 block).
    const wide: (Float64Array | undefined)[] = new Array(k);
    // Pass 1 (fill) takes the plain digits; pass 2 reads the few other cells one by one.
    if (this.slow.length < n * k) this.slow = new Int32Array(Math.max(n * k, this.slow.length * 2));
    const empty = this.emptyCells.fill(0);
    const slowCount = fill(scratch, this.slow, empty);
    for (let s = 0; s < k; s++) this.slots[s].missing += empty[s];
    for (let c = 0; c < slowCount; c++) {
      const at = this.slow[c];
      const s = at % k;
      const i = (at - s) / k;
      const value = this.readSlow(cell(i, columns[s]), s, rowNumbers[i]);
      const fits = Number.isInteger(value) && value > INT8_MISSING && value <= -INT8_MISSING - 1;
      scratch[s * n + i] = fits ? value : INT8_MISSING;
      let values = wide[s];
      if (values === undefined && !fits && !Number.isNaN(value)) {
        values = new Float64Array(n);
        for (let j = 0; j < n; j++)
          values[j] = scratch[s * n + j] === INT8_MISSING ? Number.NaN : scratch[s * n + j];
        wide[s] = values;
      }
      if (values !== undefined) values[i] = value;
    }
    for (let s = 0; s < k; s++) {
      const block = scratch.subarray(s * n, (s + 1) * n);
      const builder = this.slots[s].builder;
      const values = wide[s];
      if (values !== undefined) {
        builder.pushMany(values, n);
      } else if (!builder.appendInt8(block)) {
        const doubles = new Float64Array(n);
        for (let i = 0; i < n; i++) doubles[i] = block[i] === INT8_MISSING ? Number.NaN : block[i];
        builder.pushMany(doubles, n);
      }
    }
    const reader = this.reader;
    for (let i = 0; i < n; i++) {
      for (let g = 0; g < r.groups.length; g++) {
        const raw = cell(i, r.groups[g]).trim();
        this.groups[g].values.push(raw === '' || reader.isMissing(raw) ? '' : raw);
      }
      if (this.retestLinks && r.retestLink !== undefined)
        this.retestLinks.values.push(cell(i, r.retestLink).trim());
      for (let a = 0; a < this.attentionReaders.length; a++) {
        const check = this.attentionReaders[a];
        const raw = cell(i, check.column).trim();
        const value = reader.read(raw);
        let outcome: AttentionOutcome;
        if (reader.status === CELL_MISSING) outcome = 'missing';
        else if (check.correctNumber !== undefined && !Number.isNaN(value)) {
          outcome = value === check.correctNumber ? 'pass' : 'fail';
        } else outcome = raw.toLowerCase() === check.correct ? 'pass' : 'fail';
        this.attention[a].outcomes.push(outcome);
      }
    }
    this.flushProblems(firstProblem);
  }

  /** The finished dataset in the compact layout. Throws TableError when no record was added. */
  finish(): EncodedDataset {
    if (this.ids.length === 0)
      throw new TableError('the file has a header row but no data rows after row 1', 1);
    const warnings = [...this.warnings];
    if (this.problemCount > this.problems.length) {
      warnings.push(
        `${this.problemCount} cells need a look; the first ${this.problems.length} are listed one by one`,
      );
    }
    const rounded = this.roundedFirst;
    if (rounded !== undefined) {
      const where = `row ${rounded.row}, column '${this.header[rounded.column]}'`;
      warnings.push(precisionWarning(where, rounded.text, rounded.value, this.roundedCount - 1));
    }
    for (const slot of this.slots) {
      if (slot.missing === this.ids.length)
        warnings.push(`column '${slot.name}' has no numeric value at all`);
    }
    return {
      n: this.ids.length,
      ids: this.ids,
      rowNumbers: this.rowNumbers,
      idColumn: this.resolved.idColumn === undefined ? undefined : this.header[this.resolved.idColumn],
      columns: this.slots.map((s) => ({
        name: s.name,
        role: s.role,
        ...(s.itemCode === undefined ? {} : { itemCode: s.itemCode }),
        encoded: s.builder.finish(),
        missing: s.missing,
      })),
      groups: this.groups,
      ...(this.retestLinks ? { retestLinks: this.retestLinks } : {}),
      attention: this.attention,
      decimalMark: this.decimalMark,
      missingCodes: this.missingCodes,
      ...(this.bounds ? { scaleBounds: this.bounds } : {}),
      problems: this.problems,
      problemCount: this.problemCount,
      warnings,
    };
  }
}

/**
 * First pass over a batch of records: every cell that is a single digit allowed by `fastDigit`
 * (slot · 10 + digit) goes straight into the column-major int8 block, and every empty cell into it as
 * missing (counted per slot in `empty`); the others are listed in `slow` as row · slots + slot for the
 * general reader. Rows outside, columns inside, so each record is read while it is in cache. A small
 * function on its own, so the engine optimizes this loop by itself. Returns the number of cells listed
 * in `slow`. Cost O(n · slots).
 */
function fillFastCells(
  records: readonly (readonly string[])[],
  n: number,
  columns: Int32Array,
  fastDigit: Uint8Array,
  block: Int8Array,
  slow: Int32Array,
  empty: Int32Array,
): number {
  const k = columns.length;
  let slowCount = 0;
  for (let i = 0; i < n; i++) {
    const record = records[i];
    for (let s = 0; s < k; s++) {
      const raw = record[columns[s]];
      if (raw.length === 1) {
        const digit = raw.charCodeAt(0) - 48;
        if (digit >= 0 && digit <= 9 && fastDigit[s * 10 + digit] === 1) {
          block[s * n + i] = digit;
          continue;
        }
      } else if (raw.length === 0) {
        block[s * n + i] = INT8_MISSING;
        empty[s]++;
        continue;
      }
      slow[slowCount++] = i * k + s;
    }
  }
  return slowCount;
}

/**
 * fillFastCells for records given as FieldRows, from their digits entries. Columns outside, rows
 * inside: a batch's digits are small enough to stay in cache, and each slot's block is then written in
 * order (the slow cells are listed slot by slot; addBatch does not depend on their order).
 * Cost O(n · slots).
 */
function fillFastFields(
  digits: Int8Array,
  width: number,
  n: number,
  columns: Int32Array,
  fastDigit: Uint8Array,
  block: Int8Array,
  slow: Int32Array,
  empty: Int32Array,
): number {
  const k = columns.length;
  let slowCount = 0;
  for (let s = 0; s < k; s++) {
    const column = columns[s];
    const out = s * n;
    const allowed = s * 10;
    let blanks = 0;
    for (let i = 0; i < n; i++) {
      const digit = digits[i * width + column];
      if (digit >= 0 && fastDigit[allowed + digit] === 1) {
        block[out + i] = digit;
      } else if (digit === FIELD_EMPTY) {
        block[out + i] = INT8_MISSING;
        blanks++;
      } else {
        slow[slowCount++] = i * k + s;
      }
    }
    empty[s] += blanks;
  }
  return slowCount;
}

/** Column indexes whose cells are read as numbers under a mapping (items, criteria, duration). */
export function numericColumns(header: readonly string[], mapping: ColumnMapping): number[] {
  const r = resolveMapping(header, mapping);
  return [...r.items.map((i) => i.column), ...r.criteria, ...(r.duration === undefined ? [] : [r.duration])];
}

/**
 * Chooses the decimal mark for a table: the given one, else the one detectDecimalMark finds in the
 * numeric columns of the first DECIMAL_MARK_ROWS of `records` (the same rows for every reader, so a
 * preview of the file's start and a read of the whole file agree). Adds a warning when both marks
 * occur there; cells written with the other mark are then problems named by row and column.
 * Cost O(DECIMAL_MARK_ROWS × columns).
 */
export function chooseDecimalMark(
  records: readonly (readonly string[])[],
  columns: readonly number[],
  given: DecimalMark | undefined,
  warnings: string[],
): DecimalMark {
  if (given) return given;
  const cells: string[] = [];
  for (const record of records.slice(0, DECIMAL_MARK_ROWS)) {
    for (const c of columns) {
      const cell = record[c];
      if (cell !== undefined && cell.length >= 3) cells.push(cell);
    }
  }
  const guess = detectDecimalMark(cells);
  if (guess.mixed) {
    warnings.push(
      `both decimal marks occur (${guess.dotCells} cells with a point, ${guess.commaCells} with a comma); ` +
        `read with the ${guess.mark === '.' ? 'point' : 'comma'}, the other cells are listed as problems`,
    );
  }
  return guess.mark;
}

/** Decodes every numeric column of an encoded dataset to doubles. Cost O(cells). */
export function decodeDataset(encoded: EncodedDataset): Dataset {
  const { columns, ...rest } = encoded;
  return {
    ...rest,
    columns: columns.map(({ encoded: column, ...meta }) => ({ ...meta, values: decodeColumn(column) })),
  };
}

/**
 * Builds a dataset from a parsed table and a confirmed mapping: numeric columns (items, criteria,
 * duration) read with the dataset's missing codes and decimal mark (detected when not given); text in a
 * numeric column, values outside the declared scale and negative durations listed by row and column;
 * nothing clipped or altered. Cost O(cells). Throws TableError for a mapping that does not fit the
 * header (see resolveMapping), inconsistent scale bounds, or a table without rows.
 */
export function buildDataset(
  table: ParsedTable,
  mapping: ColumnMapping,
  options: DatasetOptions = {},
): Dataset {
  const warnings: string[] = [];
  const mark = chooseDecimalMark(
    table.rows,
    numericColumns(table.header, mapping),
    options.decimalMark,
    warnings,
  );
  const assembler = new DatasetAssembler(table.header, mapping, mark, options, table.rows.length);
  const rowNumbers = table.rowNumbers;
  assembler.addRows(table.rows, rowNumbers ?? table.rows.map((_, i) => i + 2));
  const encoded = assembler.finish();
  encoded.warnings.unshift(...warnings);
  return decodeDataset(encoded);
}
