/**
 * A data file that cannot be read as a table. `row` is 1-based and counts the header as row 1, so it
 * matches the row number a spreadsheet shows for the same record (a quoted field that spans several
 * lines is still one row). `column` is the column's header text when known, otherwise "column N"
 * (1-based). The message already names both; the fields are for callers that point at the cell.
 */
export class TableError extends Error {
  constructor(
    message: string,
    readonly row?: number,
    readonly column?: string,
  ) {
    super(message);
    this.name = 'TableError';
  }
}
