import { EngineError } from './errors.ts';
import { type ResidentColumns, residentColumns } from './kernels/index.ts';
import type { ResponseMatrix } from './scoring.ts';

/**
 * Answers held by item: one Float64Array per item, NaN for a missing answer, every column one value per
 * respondent. The form the moment computations work in; a reader that builds it directly (the command
 * line's data loader) spares the engine a matrix of boxed rows.
 */
export interface ResponseColumns {
  readonly kind: 'columns';
  /** Respondents (the length of every column). */
  readonly n: number;
  readonly columns: readonly Float64Array[];
}

/** Answers by respondent (a ResponseMatrix, null for missing) or by item (ResponseColumns). */
export type Responses = ResponseMatrix | ResponseColumns;

/**
 * Wraps columns as ResponseColumns. Cost O(k).
 * Throws EngineError when the columns differ in length.
 */
export function byItem(columns: readonly Float64Array[]): ResponseColumns {
  const n = columns[0]?.length ?? 0;
  columns.forEach((column, c) => {
    if (column.length !== n) {
      throw new EngineError(
        `the answers of item ${c + 1} hold ${column.length} values but those of item 1 hold ${n}`,
        'shape',
      );
    }
  });
  return { kind: 'columns', n, columns };
}

export function isByItem(data: Responses): data is ResponseColumns {
  return !Array.isArray(data);
}

/** Respondents in the answers. Cost O(1). */
export function respondentCount(data: Responses): number {
  return isByItem(data) ? data.n : data.length;
}

/** The answers by item, with how many items each respondent answered and how many each item lacks. */
export interface AnswerTally {
  columns: Float64Array[];
  /** answered[r]: the items respondent r answered. */
  answered: Int32Array;
  /** missing[c]: the respondents who left item c unanswered. */
  missing: number[];
  /** The columns in the kernels' memory, when they were counted there. */
  resident?: ResidentColumns;
}

/**
 * itemColumns, with the answers counted by respondent and the gaps by item (the tallyColumn kernel
 * for answers held by item). Cost: O(n·k). Throws as itemColumns.
 */
export function tallyAnswers(names: readonly string[], data: Responses): AnswerTally {
  const k = names.length;
  if (!isByItem(data)) {
    const columns = itemColumns(names, data);
    const answered = new Int32Array(data.length);
    const missing = columns.map((column) => {
      let gaps = 0;
      for (let r = 0; r < column.length; r++) {
        if (Number.isNaN(column[r])) gaps++;
        else answered[r]++;
      }
      return gaps;
    });
    return { columns, answered, missing };
  }
  if (data.columns.length !== k) {
    throw new EngineError(`the answers hold ${data.columns.length} items but ${k} are named`, 'shape');
  }
  const n = data.n;
  const resident = residentColumns(data.columns);
  const { arena } = resident;
  const at = arena.i32(n);
  const memory = arena.ready();
  const missing = data.columns.map((column, c) => {
    const result = arena.k.tallyColumn(resident.base + c * n * 8, n, at);
    if (result >= 0) {
      throw new EngineError(
        `respondent ${result + 1}, item "${names[c]}": the value ${column[result]} is not a finite number`,
      );
    }
    return -result - 1;
  });
  const answered = new Int32Array(memory, at, n).slice();
  return { columns: data.columns.slice(), answered, missing, resident };
}

/**
 * The answers as one column per item (NaN for a missing answer), checking that every respondent has
 * one answer per item and every answer is a finite number. Columns given are returned as they are
 * (after the same checks), never copied.
 *
 * Cost: O(n·k). Throws EngineError naming the respondent (1-based) and the item.
 */
export function itemColumns(names: readonly string[], data: Responses): Float64Array[] {
  const k = names.length;
  if (isByItem(data)) return tallyAnswers(names, data).columns;
  const n = data.length;
  const columns = Array.from({ length: k }, () => new Float64Array(n));
  for (let r = 0; r < n; r++) {
    const row = data[r];
    if (row.length !== k) {
      throw new EngineError(
        `respondent ${r + 1} has ${row.length} answers but there are ${k} items`,
        'shape',
      );
    }
    for (let c = 0; c < k; c++) {
      const x = row[c];
      if (x === null) columns[c][r] = Number.NaN;
      else if (Number.isFinite(x)) columns[c][r] = x;
      else {
        throw new EngineError(
          `respondent ${r + 1}, item "${names[c]}": the value ${x} is not a finite number`,
        );
      }
    }
  }
  return columns;
}

/** The answers by respondent (null for a missing answer); a matrix given is returned as it is. Cost O(n·k). */
export function responseRows(data: Responses): ResponseMatrix {
  if (!isByItem(data)) return data;
  const { n, columns } = data;
  const rows: ResponseMatrix = new Array(n);
  for (let r = 0; r < n; r++) {
    const row: (number | null)[] = new Array(columns.length);
    for (let c = 0; c < columns.length; c++) {
      const x = columns[c][r];
      row[c] = Number.isNaN(x) ? null : x;
    }
    rows[r] = row;
  }
  return rows;
}
