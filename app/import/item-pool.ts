import { checkItemWording } from '../engine/wording.ts';
import {
  ITEM_CODE_PATTERN,
  ITEM_SOURCES,
  type ItemKeying,
  type ItemSource,
  MAX_IMPORT_ITEMS,
  MAX_ITEM_FILE_BYTES,
  MAX_ITEM_TEXT,
  SOURCE_LABEL,
} from '../../db/repos/items.ts';
import { delimiterName } from './detect-format.ts';
import { type FileProblem, tableProblem } from './file-problem.ts';
import { parseTable, TableError } from './parse-table.ts';
import { describeProblem } from './ratings/index.ts';
import { sha256Hex } from './sha256.ts';

/** A facet an item-pool file may name. */
export interface PoolFacet {
  id: number;
  name: string;
}

/** What the reader checks a file against: the study's facets and the codes already in the pool. */
export interface PoolContext {
  facets: readonly PoolFacet[];
  /** Retired facets, named in the message when a row uses one. */
  retiredFacets: readonly PoolFacet[];
  /** The pool's item with this code (compared without letter case), if any. */
  itemByCode(code: string): { code: string } | undefined;
}

export interface ImportRow {
  row: number;
  code: string;
  text: string;
  facetName: string | null;
  facetId: number | null;
  keying: ItemKeying;
  sourceType: ItemSource | null;
  sourceNote: string;
  wordingFlags: string[];
}

export interface ItemImportPreview {
  fileName: string;
  sha256: string;
  delimiter: string;
  header: string[];
  rowCount: number;
  /** The rows that can be imported (rows with a problem are left out and listed in `problems`). */
  rows: ImportRow[];
  problems: FileProblem[];
  warnings: string[];
}

const REQUIRED_COLUMNS = ['code', 'text', 'facet', 'keying'] as const;
const OPTIONAL_COLUMNS = ['source', 'source_note'] as const;
const KEYING_WORDS: Record<string, ItemKeying> = {
  forward: 'forward',
  f: 'forward',
  '+': 'forward',
  reverse: 'reverse',
  r: 'reverse',
  '-': 'reverse',
  '−': 'reverse',
};
const SOURCE_WORDS: Record<string, ItemSource> = {
  literature: 'literature',
  interviews: 'interviews',
  interview: 'interviews',
  'expert-suggestion': 'expert-suggestion',
  'expert suggestion': 'expert-suggestion',
  expert: 'expert-suggestion',
  'own-drafting': 'own-drafting',
  'own drafting': 'own-drafting',
  own: 'own-drafting',
};

function problemAt(row: number, column: string, message: string, header: readonly string[]): FileProblem {
  const problem = { row, column, message };
  return { ...problem, text: describeProblem(problem, header) };
}

/**
 * Reads an item-pool file (columns code, text, facet, keying; optionally source and source_note)
 * without writing anything: every row parsed, every problem named by row and column.
 */
export function readItemPool(bytes: Uint8Array, fileName: string, pool: PoolContext): ItemImportPreview {
  const sha256 = sha256Hex(bytes);
  const empty = { fileName, sha256, delimiter: '', header: [], rowCount: 0, rows: [], warnings: [] };
  let table: ReturnType<typeof parseTable>;
  try {
    table = parseTable(bytes, { fileName, maxBytes: MAX_ITEM_FILE_BYTES });
  } catch (error) {
    if (error instanceof TableError) return { ...empty, problems: [tableProblem(error)] };
    throw error;
  }
  const { header } = table;
  const folded = header.map((h) => h.trim().toLowerCase().replace(/\s+/g, '_'));
  const problems: FileProblem[] = [];
  const warnings = [...table.warnings];
  const at: Record<string, number> = {};
  folded.forEach((name, i) => {
    if (
      (REQUIRED_COLUMNS as readonly string[]).includes(name) ||
      (OPTIONAL_COLUMNS as readonly string[]).includes(name)
    ) {
      at[name] = i;
    } else {
      warnings.push(
        `column '${header[i]}' is not read (an item-pool file uses ${[...REQUIRED_COLUMNS, ...OPTIONAL_COLUMNS].join(', ')})`,
      );
    }
  });
  const absent = REQUIRED_COLUMNS.filter((c) => at[c] === undefined);
  if (absent.length > 0) {
    problems.push(
      problemAt(
        1,
        '',
        `the header lacks ${absent.map((c) => `'${c}'`).join(', ')}; an item-pool file needs code, text, facet, keying (found ${header.join(', ')})`,
        header,
      ),
    );
    return { ...empty, delimiter: delimiterName(table.delimiter), header, problems, warnings };
  }
  const { facets, retiredFacets } = pool;
  const facetList = facets.map((f) => f.name).join(', ');
  const seen = new Map<string, number>();
  const rows: ImportRow[] = [];
  const blankKeying: number[] = [];
  const blankFacet: number[] = [];
  const col = (name: string) => header[at[name]];
  table.rows.forEach((cells, i) => {
    const row = table.rowNumbers?.[i] ?? i + 2;
    const before = problems.length;
    const code = cells[at.code].trim();
    if (code === '') {
      problems.push(problemAt(row, col('code'), 'the item code is blank', header));
    } else if (!ITEM_CODE_PATTERN.test(code)) {
      problems.push(
        problemAt(
          row,
          col('code'),
          `item code '${code}' cannot be used: start with a letter or digit, then up to 20 letters, digits, dots, dashes or underscores`,
          header,
        ),
      );
    } else {
      const earlier = seen.get(code.toLowerCase());
      const existing = pool.itemByCode(code);
      if (earlier !== undefined) {
        problems.push(
          problemAt(row, col('code'), `item code '${code}' already appears on row ${earlier}`, header),
        );
      } else if (existing) {
        problems.push(
          problemAt(
            row,
            col('code'),
            `item code '${code}' is already in the pool (${existing.code})`,
            header,
          ),
        );
      }
      seen.set(code.toLowerCase(), row);
    }
    const text = cells[at.text].trim();
    if (text === '') problems.push(problemAt(row, col('text'), 'the item wording is blank', header));
    else if (text.length > MAX_ITEM_TEXT) {
      problems.push(
        problemAt(
          row,
          col('text'),
          `the wording is ${text.length} characters, above the limit of ${MAX_ITEM_TEXT}`,
          header,
        ),
      );
    }
    const facetText = cells[at.facet].trim();
    let facet: PoolFacet | null = null;
    if (facetText === '') {
      blankFacet.push(row);
    } else {
      facet = facets.find((f) => f.name.toLowerCase() === facetText.toLowerCase()) ?? null;
      if (!facet) {
        const retired = retiredFacets.some((f) => f.name.toLowerCase() === facetText.toLowerCase());
        problems.push(
          problemAt(
            row,
            col('facet'),
            retired
              ? `facet '${facetText}' is retired; restore it in the construct phase or choose one of ${facetList}`
              : `facet '${facetText}' is not a facet of this study; use one of ${facetList || '(no facets defined yet)'}`,
            header,
          ),
        );
      }
    }
    const keyingText = cells[at.keying].trim().toLowerCase();
    let keying: ItemKeying = 'forward';
    if (keyingText === '') blankKeying.push(row);
    else if (Object.hasOwn(KEYING_WORDS, keyingText)) keying = KEYING_WORDS[keyingText];
    else {
      problems.push(
        problemAt(
          row,
          col('keying'),
          `'${cells[at.keying].trim()}' is not a keying; use forward or reverse`,
          header,
        ),
      );
    }
    let sourceType: ItemSource | null = null;
    if (at.source !== undefined) {
      const sourceText = cells[at.source].trim().toLowerCase();
      if (sourceText !== '') {
        if (Object.hasOwn(SOURCE_WORDS, sourceText)) sourceType = SOURCE_WORDS[sourceText];
        else {
          problems.push(
            problemAt(
              row,
              col('source'),
              `'${cells[at.source].trim()}' is not a source; use ${ITEM_SOURCES.map((s) => SOURCE_LABEL[s]).join(', ')}`,
              header,
            ),
          );
        }
      }
    }
    const sourceNote = at.source_note === undefined ? '' : cells[at.source_note].trim();
    if (problems.length > before || rows.length >= MAX_IMPORT_ITEMS) return;
    rows.push({
      row,
      code,
      text,
      facetName: facet?.name ?? null,
      facetId: facet?.id ?? null,
      keying,
      sourceType,
      sourceNote,
      wordingFlags: checkItemWording(text).flags.map((f) => f.check),
    });
  });
  if (table.rows.length > MAX_IMPORT_ITEMS) {
    problems.push(
      problemAt(
        table.rowNumbers?.[MAX_IMPORT_ITEMS] ?? MAX_IMPORT_ITEMS + 2,
        '',
        `the file has ${table.rows.length} items; one import takes at most ${MAX_IMPORT_ITEMS} (split the file)`,
        header,
      ),
    );
  }
  if (blankKeying.length > 0) {
    warnings.push(`keying is blank on ${rowList(blankKeying)}: read as forward`);
  }
  if (blankFacet.length > 0) {
    warnings.push(`facet is blank on ${rowList(blankFacet)}: those items start unmapped`);
  }
  return {
    fileName,
    sha256,
    delimiter: delimiterName(table.delimiter),
    header,
    rowCount: table.rows.length,
    rows,
    problems,
    warnings,
  };
}

function rowList(rows: readonly number[]): string {
  return rows.length === 1 ? `row ${rows[0]}` : `rows ${rows.join(', ')}`;
}
