import type { MissingMethod } from '../../engine/item-stats.ts';
import { byItem, type ResponseColumns, responseRows } from '../../engine/responses.ts';
import { DEFAULT_SEED } from '../../engine/rng.ts';
import { ENGINE_VERSION } from '../../engine/version.ts';
import type { ResponseMatrix, ScaleBounds } from '../../engine/scoring.ts';
import { chooseDecimalMark } from '../../import/dataset.ts';
import type { DecimalMark } from '../../import/numbers.ts';
import { TableError } from '../../import/table-error.ts';
import { bytePieces, isPlainText, type StreamedRecords, streamRecords } from '../../import/stream-dataset.ts';
import type { OptionSpecs } from '../command.ts';
import { readUserFile } from '../files.ts';
import { ItemColumnsSink } from './item-columns.ts';
import { type CliContext, DataError, type OptionValues, UsageError } from '../types.ts';

/** Options every `stats` analysis on a data file takes; an analysis adds its own. */
export const COMMON_STATS_OPTIONS: OptionSpecs = {
  data: {
    type: 'string',
    value: 'FILE',
    required: true,
    description: 'the responses: a CSV or TSV file with a header row, one row per respondent',
  },
  items: { type: 'string', value: 'a,b,c', required: true, description: 'the item columns to analyse' },
  reverse: {
    type: 'string',
    value: 'a,b',
    description: 'reverse-keyed items, scored min + max − x (needs --min and --max)',
  },
  min: { type: 'string', value: 'N', description: 'lowest point of the response scale (declared bounds)' },
  max: { type: 'string', value: 'N', description: 'highest point of the response scale (declared bounds)' },
  missing: {
    type: 'string',
    value: 'listwise|pairwise',
    description: 'how respondents with missing answers are used (default listwise)',
  },
  'missing-codes': {
    type: 'string',
    value: '-99,999',
    description: 'values that mean "no answer" (an empty cell always does)',
  },
  'decimal-mark': {
    type: 'string',
    value: 'point|comma',
    description:
      "the file's decimal mark (default: detected from the file's first 64 KiB, as an import does)",
  },
  seed: {
    type: 'string',
    value: 'S',
    description: `seed of the random steps (default ${DEFAULT_SEED}; reported as seed)`,
  },
  json: { type: 'boolean', description: 'print one JSON object at full precision instead of the table' },
};

/** The common options without those an analysis has no use for (it refuses them with a hint instead). */
export function commonStatsOptionsExcept(...names: string[]): OptionSpecs {
  return Object.fromEntries(Object.entries(COMMON_STATS_OPTIONS).filter(([name]) => !names.includes(name)));
}

/** Item responses read from a data file, checked, with missing codes blanked and reverse keys applied. */
export interface LoadedItems {
  /** The path as the user gave it (used in messages and in the output). */
  file: string;
  /** SHA-256 of the file's bytes, so a result can be traced to the exact data it came from. */
  sha256: string;
  /** Data rows in the file (header excluded). */
  rows: number;
  names: string[];
  /** One column per item, one value per data row of the file; NaN = missing. Reverse keys applied. */
  answers: ResponseColumns;
  /** The same answers by row (null = missing), built when first asked for. */
  readonly data: ResponseMatrix;
  /** 1-based file row of each entry of `data` (the header is row 1). */
  rowNumbers: number[];
  reverse: string[];
  bounds: ScaleBounds | null;
  missing: MissingMethod;
  missingCodes: string[];
  /** Notes from reading the file (delimiter guesses, skipped blank rows, decimal commas). */
  warnings: string[];
}

/**
 * The head of every `stats` JSON object that reads a data file: the analysis, the engine version, the
 * file read (as given, its SHA-256 and its data rows) and the inputs, as the analysis states them.
 */
export function statsHead(analysis: string, loaded: LoadedItems, inputs: Record<string, unknown>) {
  return {
    analysis,
    engineVersion: ENGINE_VERSION,
    data: { file: loaded.file, sha256: loaded.sha256, rows: loaded.rows },
    inputs,
  };
}

/** The inputs every analysis of items states first: the items, reverse keys, bounds and missing data. */
export function itemInputs(loaded: LoadedItems) {
  return {
    items: loaded.names,
    reverse: loaded.reverse,
    bounds: loaded.bounds,
    missing: loaded.missing,
    missingCodes: loaded.missingCodes,
  };
}

/** How an analysis names its columns (most use --items; some use another option such as --columns). */
export interface LoadOptions {
  itemsOption?: string;
  /** Columns named by another source (such as a model file) instead of an option; `from` says which. */
  names?: { list: string[]; from: string };
}

const NUMBER = /^[+-]?(\d+\.?\d*|\.\d+)([eE][+-]?\d+)?$/;

/** --decimal-mark point|comma; absent, the mark is detected (chooseDecimalMark). */
function decimalMarkOption(values: OptionValues): DecimalMark | undefined {
  const raw = text(values, 'decimal-mark');
  if (raw === undefined) return undefined;
  if (raw === 'point') return '.';
  if (raw === 'comma') return ',';
  throw new UsageError(`--decimal-mark must be point or comma (got "${raw}")`);
}

function text(values: OptionValues, name: string): string | undefined {
  const value = values[name];
  if (value === undefined || value === false) return undefined;
  if (value === true) throw new UsageError(`--${name} needs a value`);
  return value;
}

function list(raw: string, option: string): string[] {
  const parts = raw.split(',').map((s) => s.trim());
  if (parts.some((s) => s === '')) {
    throw new UsageError(`--${option} "${raw}" has an empty name; give names separated by commas`);
  }
  const seen = new Set<string>();
  for (const p of parts) {
    if (seen.has(p)) throw new UsageError(`--${option} names "${p}" twice`);
    seen.add(p);
  }
  return parts;
}

/**
 * Reads a numeric option such as --min 1. Throws UsageError naming the option when the value is not a
 * finite number.
 */
export function numberOption(values: OptionValues, name: string): number | undefined {
  const raw = text(values, name);
  if (raw === undefined) return undefined;
  const trimmed = raw.trim();
  if (!NUMBER.test(trimmed) || !Number.isFinite(Number(trimmed)))
    throw new UsageError(`--${name} must be a number (got "${raw}")`);
  return Number(trimmed);
}

/** Reads a whole-number option within [min, max]; throws UsageError otherwise. */
export function integerOption(
  values: OptionValues,
  name: string,
  min: number,
  max: number,
): number | undefined {
  const value = numberOption(values, name);
  if (value === undefined) return undefined;
  if (!Number.isInteger(value) || value < min || value > max) {
    throw new UsageError(`--${name} must be a whole number from ${min} to ${max} (got ${value})`);
  }
  return value;
}

/** The --seed of a randomized analysis, DEFAULT_SEED when not given; reported in the output as `seed`. */
export function seedOption(values: OptionValues): number {
  return integerOption(values, 'seed', -Number.MAX_SAFE_INTEGER, Number.MAX_SAFE_INTEGER) ?? DEFAULT_SEED;
}

/** --missing listwise|pairwise, default listwise. */
export function missingOption(values: OptionValues): MissingMethod {
  const raw = text(values, 'missing') ?? 'listwise';
  if (raw !== 'listwise' && raw !== 'pairwise') {
    throw new UsageError(`--missing must be listwise or pairwise (got "${raw}")`);
  }
  return raw;
}

function boundsOption(values: OptionValues): ScaleBounds | null {
  const min = numberOption(values, 'min');
  const max = numberOption(values, 'max');
  if (min === undefined && max === undefined) return null;
  if (min === undefined || max === undefined) {
    throw new UsageError('--min and --max go together: give both declared scale bounds');
  }
  if (min >= max) throw new UsageError(`--min (${min}) must be below --max (${max})`);
  return { min, max };
}

/** Bytes looked at to estimate a file's records: its line breaks per byte there, times its size. */
const ESTIMATE_BYTES = 64 * 1024;

/** About how many records a file holds, from the line breaks in its first ESTIMATE_BYTES. Cost O(1). */
function estimatedRecords(bytes: Uint8Array): number {
  const sample = Math.min(bytes.length, ESTIMATE_BYTES);
  let lines = 0;
  for (let at = bytes.indexOf(0x0a); at >= 0 && at < sample; at = bytes.indexOf(0x0a, at + 1)) lines++;
  return sample === 0 ? 0 : (bytes.length * Math.max(1, lines)) / sample + 16;
}

/**
 * The shared loader of every `stats` analysis: reads --data as an import reads a delimited file
 * (streamRecords: encoding, delimiter and quotes detected, blank rows skipped, ragged rows refused),
 * picks the --items columns (or another option's), turns empty cells and --missing-codes into missing
 * values, parses numbers with one decimal mark for the file (detected from the file's first 64 KiB as
 * an import detects it, or --decimal-mark), a cell written with the other mark being an error named by
 * row and column, checks values against --min/--max when given, and applies --reverse as
 * min + max − x. The answers come as one column per item (`answers`), read from the bytes without a
 * string per cell; `data` gives them by row when an analysis asks for it.
 *
 * Throws UsageError (exit 2) for a missing --data or items option, a malformed option, --reverse
 * without --min/--max, or a reversed name not among the items; DataError (exit 1) naming file, row and
 * column for an unreadable file, a malformed table, an unknown column, a non-numeric value or a value
 * outside the declared bounds.
 */
export async function loadItemData(
  values: OptionValues,
  ctx: CliContext,
  options: LoadOptions = {},
): Promise<LoadedItems> {
  const itemsOption = options.itemsOption ?? 'items';
  const file = text(values, 'data');
  if (file === undefined)
    throw new UsageError('--data FILE is required (a CSV or TSV file with a header row)');
  const itemsRaw = options.names ? undefined : text(values, itemsOption);
  if (!options.names && itemsRaw === undefined)
    throw new UsageError(`--${itemsOption} is required (column names separated by commas)`);
  const names = options.names?.list ?? list(itemsRaw as string, itemsOption);
  const namesFrom = options.names?.from ?? `--${itemsOption}`;
  const missing = missingOption(values);
  const bounds = boundsOption(values);
  const reverseRaw = text(values, 'reverse');
  const reverse = reverseRaw === undefined ? [] : list(reverseRaw, 'reverse');
  if (reverse.length > 0 && bounds === null) {
    throw new UsageError(
      '--reverse needs the declared scale bounds --min and --max (reverse score = min + max − x)',
    );
  }
  for (const name of reverse) {
    if (!names.includes(name))
      throw new UsageError(`--reverse names "${name}", which is not in ${namesFrom}`);
  }
  const codesRaw = text(values, 'missing-codes');
  const missingCodes = codesRaw === undefined ? [] : list(codesRaw, 'missing-codes');
  const numericCodes = missingCodes.filter((c) => NUMBER.test(c)).map(Number);

  const bytes = await readUserFile(file, 'data file', ctx);
  let read: StreamedRecords<ItemColumnsSink>;
  try {
    read = await streamRecords(
      bytePieces(bytes),
      (header, sniffed, warnings) => {
        const columns = names.map((name) => {
          const index = header.indexOf(name);
          if (index >= 0) return index;
          const folded = header.find((h) => h.toLowerCase() === name.toLowerCase());
          const hint = folded ? ` (did you mean "${folded}"?)` : '';
          throw new DataError(
            `${file}: no column named "${name}"${hint}; the columns are ${header.join(', ')}`,
          );
        });
        // One rule for the decimal mark, over the same records, as the import of a data file into a study.
        const mark = chooseDecimalMark(sniffed.slice(1), columns, decimalMarkOption(values), warnings);
        const rules = { file, header, columns, mark, missingCodes, numericCodes, bounds };
        return new ItemColumnsSink(rules, estimatedRecords(bytes));
      },
      { fileName: file, plainText: isPlainText(bytes) },
    );
  } catch (error) {
    if (error instanceof TableError) throw new DataError(`${file}: ${error.message}`);
    throw error;
  }
  const { columns, rowNumbers, warnings: cellWarnings } = read.sink.finish();
  if (rowNumbers.length === 0) throw new DataError(`${file}: the file has a header row but no data rows`);
  if (reverse.length > 0 && bounds) {
    const pivot = bounds.min + bounds.max;
    for (const name of reverse) {
      const column = columns[names.indexOf(name)];
      for (let r = 0; r < column.length; r++) column[r] = pivot - column[r];
    }
  }
  const answers = byItem(columns);
  let rows: ResponseMatrix | undefined;
  return {
    file,
    sha256: read.sha256,
    rows: answers.n,
    names,
    answers,
    get data() {
      rows ??= responseRows(answers);
      return rows;
    },
    rowNumbers,
    reverse,
    bounds,
    missing,
    missingCodes,
    warnings: [
      ...read.warnings,
      ...cellWarnings,
      ...(read.sink.mark === ','
        ? ['read with the decimal comma (detected, or given with --decimal-mark)']
        : []),
    ],
  };
}
