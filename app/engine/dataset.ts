/**
 * The shape of a dataset in memory: plain data that readers produce, storage writes and the engine
 * and phases read. Types only.
 */
import type { EncodedColumn } from './columnar.ts';

/** The decimal mark of a data file's numbers. */
export type DecimalMark = '.' | ',';

export interface MissingCodes {
  /** Text codes, compared trimmed and without regard to letter case ("NA", "n/a", "."). */
  text: string[];
  /** Numeric codes, compared as numbers after parsing (so "-99" and "-99.0" both match -99). */
  numeric: number[];
}

/** One cell the researcher should look at. `row` counts the header as row 1; `column` is the header. */
export interface ImportProblem {
  row: number;
  column: string;
  message: string;
}

export type NumericRole = 'item' | 'criterion' | 'duration';

export interface EncodedNumericColumn {
  name: string;
  role: NumericRole;
  itemCode?: string;
  encoded: EncodedColumn;
  /** Cells read as missing (blank, a missing-value code, or text that is not a number). */
  missing: number;
}

export interface NumericColumn {
  name: string;
  role: NumericRole;
  itemCode?: string;
  /** One value per respondent; NaN marks a missing value and is never shown as such. */
  values: Float64Array;
  missing: number;
}

export interface TextColumn {
  name: string;
  values: string[];
}

export type AttentionOutcome = 'pass' | 'fail' | 'missing';

export interface AttentionColumn {
  name: string;
  correctAnswer: string;
  outcomes: AttentionOutcome[];
}

export interface DatasetBase {
  n: number;
  /** Respondent ids; `row N` when the file has no id column or the cell is blank. */
  ids: string[];
  /** File row of each respondent (header = row 1). */
  rowNumbers: number[];
  idColumn?: string;
  groups: TextColumn[];
  retestLinks?: TextColumn;
  attention: AttentionColumn[];
  decimalMark: DecimalMark;
  missingCodes: MissingCodes;
  scaleBounds?: { min: number; max: number };
  /** The first `maxProblems` problems, in file order. */
  problems: ImportProblem[];
  /** All problems, listed or not. */
  problemCount: number;
  warnings: string[];
}

/** A dataset whose numeric columns are in the compact layout: what storage writes, column by column. */
export interface EncodedDataset extends DatasetBase {
  columns: EncodedNumericColumn[];
}

/** A dataset with numeric columns as doubles, ready for the engine. */
export interface Dataset extends DatasetBase {
  columns: NumericColumn[];
}
