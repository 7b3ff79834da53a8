import type { TableError } from './table-error.ts';

/** One cell or row of a file that cannot be imported. */
export interface FileProblem {
  row: number;
  column: string;
  message: string;
  /** The one-line form, naming row and column: "row 4, column 3 ('facet'): …". */
  text: string;
}

/** A problem for a file that is not a readable table at all (empty, binary, ragged, broken quotes). */
export function tableProblem(error: TableError): FileProblem {
  const row = error.row ?? 1;
  const column = error.column ?? '';
  const message = error.message;
  const text = /^row \d+/.test(message) ? message : `row ${row}: ${message}`;
  return { row, column, message, text };
}
