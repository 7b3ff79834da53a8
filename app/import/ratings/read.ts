import { columnLabel, parseTable } from '../parse-table.ts';

/**
 * Reader for an expert-review ratings file. Two layouts are accepted, told apart by the header
 * (names are matched case-insensitively and without surrounding spaces; any delimiter parseTable
 * detects will do):
 *
 * - long form, one row per expert and item: `item,expert,relevance` and optionally `essential`,
 *   `facet` and `comment`, in any order. `essential` holds Lawshe's judgement (yes/no, 1/0,
 *   true/false, essential/useful/not necessary); `facet` is the facet the expert places the item in.
 * - wide form, one row per item: a first column `item`, then one column per expert whose header is
 *   the expert's code and whose cells hold relevance ratings. It carries relevance only; use the long
 *   form for essential judgements and facet placements.
 *
 * A blank relevance or essential cell is a missing answer, kept as null. Row numbers count the header
 * as row 1, as a spreadsheet does.
 */

/** One expert's answers about one item, with the file row they came from. */
export interface RatingRecord {
  item: string;
  expert: string;
  relevance: number | null;
  essential: boolean | null;
  facet: string | null;
  comment: string | null;
  row: number;
}

/** Something wrong in one cell or row: `column` is the header name (or "" for a whole row). */
export interface RatingsProblem {
  row: number;
  column: string;
  message: string;
}

export interface ReadRatingsOptions {
  fileName?: string;
  /** Relevance scale bounds; default 1 to 4. */
  scaleMin?: number;
  scaleMax?: number;
  /** Item codes the study knows; a rating for any other code is a problem. */
  items?: readonly string[];
}

export interface RatingsFile {
  layout: 'long' | 'wide';
  /** The header row as written, for naming columns in messages (see describeProblem). */
  header: string[];
  ratings: RatingRecord[];
  /** Expert codes and item codes in order of first appearance. */
  experts: string[];
  items: string[];
  hasEssential: boolean;
  hasFacet: boolean;
  problems: RatingsProblem[];
  warnings: string[];
  delimiter: string;
}

export const DEFAULT_SCALE_MIN = 1;
export const DEFAULT_SCALE_MAX = 4;

const LONG_REQUIRED = ['item', 'expert', 'relevance'] as const;
const LONG_OPTIONAL = ['essential', 'facet', 'comment'] as const;
const ESSENTIAL_YES = new Set(['1', 'yes', 'y', 'true', 'essential']);
const ESSENTIAL_NO = new Set(['0', 'no', 'n', 'false', 'useful', 'not essential', 'not necessary']);
const WIDE_HINT = " (read as the wide form: every column after item holds one expert's ratings)";
const NUMBER_PATTERN = /^[+-]?(\d+(\.\d*)?|\.\d+)$/;

/** "row 5, column 3 ('relevance'): message": the one-line form every problem is shown in. */
export function describeProblem(problem: RatingsProblem, header: readonly string[] = []): string {
  if (problem.column === '') return `row ${problem.row}: ${problem.message}`;
  const index = header.indexOf(problem.column);
  const where = index >= 0 ? columnLabel(index, header) : `column '${problem.column}'`;
  return `row ${problem.row}, ${where}: ${problem.message}`;
}

interface CellContext {
  row: number;
  column: string;
  problems: RatingsProblem[];
}

function parseRelevance(
  raw: string,
  min: number,
  max: number,
  at: CellContext,
  hint = '',
): number | null | undefined {
  const text = raw.trim();
  if (text === '') return null;
  if (!NUMBER_PATTERN.test(text)) {
    at.problems.push({
      row: at.row,
      column: at.column,
      message: `'${text}' is not a number; relevance is a whole number from ${min} to ${max}${hint}`,
    });
    return undefined;
  }
  const value = Number(text);
  if (!Number.isInteger(value)) {
    at.problems.push({
      row: at.row,
      column: at.column,
      message: `${text} is not a whole number; relevance is a whole number from ${min} to ${max}`,
    });
    return undefined;
  }
  if (value < min || value > max) {
    at.problems.push({
      row: at.row,
      column: at.column,
      message: `rating ${text} is outside the relevance scale ${min}–${max}`,
    });
    return undefined;
  }
  return value;
}

function parseEssential(raw: string, at: CellContext): boolean | null | undefined {
  const text = raw.trim().toLowerCase().replace(/\s+/g, ' ');
  if (text === '') return null;
  if (ESSENTIAL_YES.has(text)) return true;
  if (ESSENTIAL_NO.has(text)) return false;
  at.problems.push({
    row: at.row,
    column: at.column,
    message: `'${raw.trim()}' is not an essential judgement; use yes/no, 1/0, true/false, or essential/useful/not necessary`,
  });
  return undefined;
}

/**
 * Reads an expert ratings file (long or wide form, see the module comment) into typed ratings.
 * Content problems (missing columns, blank codes, non-numeric or off-scale ratings, unknown items,
 * an expert rating an item twice) are returned in `problems`, each with its row and column, so a
 * screen can list them all; the caller decides whether any problem stops the analysis.
 *
 * Cost: O(file size). Throws TableError (from parseTable) when the bytes are not a readable table:
 * empty file, no data rows, ragged rows, broken quoting.
 */
export function readRatings(bytes: Uint8Array, options: ReadRatingsOptions = {}): RatingsFile {
  const min = options.scaleMin ?? DEFAULT_SCALE_MIN;
  const max = options.scaleMax ?? DEFAULT_SCALE_MAX;
  const table = parseTable(bytes, { fileName: options.fileName });
  const rowNumber = (i: number): number => table.rowNumbers?.[i] ?? i + 2;
  const folded = table.header.map((h) => h.trim().toLowerCase());
  const problems: RatingsProblem[] = [];
  const warnings = [...table.warnings];
  const ratings: RatingRecord[] = [];
  const known = options.items ? new Set(options.items) : null;
  const hasLongColumns = folded.includes('expert') || folded.includes('relevance');
  const base = {
    header: table.header,
    ratings,
    problems,
    warnings,
    delimiter: table.delimiter,
  };

  if (hasLongColumns) {
    const index: Record<string, number> = {};
    folded.forEach((name, i) => {
      if (
        (LONG_REQUIRED as readonly string[]).includes(name) ||
        (LONG_OPTIONAL as readonly string[]).includes(name)
      ) {
        index[name] = i;
      } else {
        problems.push({
          row: 1,
          column: table.header[i],
          message: `unexpected column '${table.header[i]}'; the long form accepts ${[...LONG_REQUIRED, ...LONG_OPTIONAL].join(', ')}`,
        });
      }
    });
    const absent = LONG_REQUIRED.filter((name) => index[name] === undefined);
    if (absent.length > 0) {
      problems.push({
        row: 1,
        column: '',
        message: `the header lacks ${absent.map((n) => `'${n}'`).join(', ')}; the long form needs item, expert, relevance`,
      });
    }
    const hasEssential = index.essential !== undefined;
    const hasFacet = index.facet !== undefined;
    if (problems.length > 0) {
      return { ...base, layout: 'long', experts: [], items: [], hasEssential, hasFacet };
    }
    const name = (key: string): string => table.header[index[key]];
    const firstRow = new Map<string, number>();
    table.rows.forEach((cells, i) => {
      const row = rowNumber(i);
      const item = cells[index.item].trim();
      const expert = cells[index.expert].trim();
      let ok = true;
      if (item === '') {
        problems.push({ row, column: name('item'), message: 'the item code is blank' });
        ok = false;
      } else if (known && !known.has(item)) {
        problems.push({ row, column: name('item'), message: `item '${item}' is not in the item list` });
        ok = false;
      }
      if (expert === '') {
        problems.push({ row, column: name('expert'), message: 'the expert code is blank' });
        ok = false;
      }
      const relevance = parseRelevance(cells[index.relevance], min, max, {
        row,
        column: name('relevance'),
        problems,
      });
      const essential = hasEssential
        ? parseEssential(cells[index.essential], { row, column: name('essential'), problems })
        : null;
      if (relevance === undefined || essential === undefined || !ok) return;
      const key = `${item}\u0000${expert}`;
      const earlier = firstRow.get(key);
      if (earlier !== undefined) {
        problems.push({
          row,
          column: name('expert'),
          message: `expert '${expert}' already rated item '${item}' on row ${earlier}`,
        });
        return;
      }
      firstRow.set(key, row);
      const facet = hasFacet ? cells[index.facet].trim() : '';
      const comment = index.comment !== undefined ? cells[index.comment].trim() : '';
      ratings.push({
        item,
        expert,
        relevance,
        essential,
        facet: facet === '' ? null : facet,
        comment: comment === '' ? null : comment,
        row,
      });
    });
    return { ...base, layout: 'long', ...orderOf(ratings), hasEssential, hasFacet };
  }

  if (folded[0] !== 'item' || table.header.length < 2) {
    problems.push({
      row: 1,
      column: '',
      message: `the header must be item,expert,relevance[,essential][,facet][,comment] (long form) or item followed by one column per expert (wide form); found ${table.header.join(', ')}`,
    });
    return { ...base, layout: 'long', experts: [], items: [], hasEssential: false, hasFacet: false };
  }
  const experts = table.header.slice(1).map((h) => h.trim());
  const seenItems = new Map<string, number>();
  table.rows.forEach((cells, i) => {
    const row = rowNumber(i);
    const item = cells[0].trim();
    if (item === '') {
      problems.push({ row, column: table.header[0], message: 'the item code is blank' });
      return;
    }
    if (known && !known.has(item)) {
      problems.push({ row, column: table.header[0], message: `item '${item}' is not in the item list` });
      return;
    }
    const earlier = seenItems.get(item);
    if (earlier !== undefined) {
      problems.push({
        row,
        column: table.header[0],
        message: `item '${item}' already has a row (row ${earlier}); the wide form has one row per item`,
      });
      return;
    }
    seenItems.set(item, row);
    for (let c = 1; c < table.header.length; c++) {
      const relevance = parseRelevance(
        cells[c],
        min,
        max,
        { row, column: table.header[c], problems },
        WIDE_HINT,
      );
      if (relevance === undefined) continue;
      ratings.push({
        item,
        expert: experts[c - 1],
        relevance,
        essential: null,
        facet: null,
        comment: null,
        row,
      });
    }
  });
  return {
    ...base,
    layout: 'wide',
    experts,
    items: [...seenItems.keys()],
    hasEssential: false,
    hasFacet: false,
  };
}

function orderOf(ratings: readonly RatingRecord[]): { experts: string[]; items: string[] } {
  const experts = new Set<string>();
  const items = new Set<string>();
  for (const r of ratings) {
    experts.add(r.expert);
    items.add(r.item);
  }
  return { experts: [...experts], items: [...items] };
}
