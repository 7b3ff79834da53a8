import { createHash } from 'node:crypto';
import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { columnFromBytes, columnToBytes, decodeColumn, encodeColumn } from '../../../app/engine/columnar.ts';
import { buildDataset, type Dataset } from '../../../app/import/dataset.ts';
import type { ColumnMapping } from '../../../app/import/mapping.ts';
import { parseTable, TableError } from '../../../app/import/parse-table.ts';
import { type StreamedDataset, streamDataset } from '../../../app/import/stream-dataset.ts';
import { CORPUS } from './broken-corpus.ts';
import { chunked, utf8 } from '../../helpers/bytes.ts';

function sameValues(a: ArrayLike<number>, b: ArrayLike<number>): boolean {
  if (a.length !== b.length) return false;
  for (let i = 0; i < a.length; i++)
    if (!(a[i] === b[i] || (Number.isNaN(a[i]) && Number.isNaN(b[i])))) return false;
  return true;
}

/** The parts of a dataset both import paths must agree on. */
function essentials(d: Dataset | StreamedDataset) {
  return {
    n: d.n,
    ids: d.ids,
    rowNumbers: d.rowNumbers,
    decimalMark: d.decimalMark,
    problems: d.problems,
    missing: d.columns.map((c) => c.missing),
    names: d.columns.map((c) => c.name),
  };
}

function allItems(header: readonly string[]): ColumnMapping {
  return Object.fromEntries(header.map((h) => [h, { role: 'item', itemCode: h }]));
}

describe('streamDataset on the broken-file corpus', () => {
  for (const entry of CORPUS) {
    it(`${entry.name}: same outcome as parseTable + buildDataset`, async () => {
      let whole: { dataset?: Dataset; error?: unknown } = {};
      const mapping = entry.dataset?.mapping ?? allItems;
      try {
        const table = parseTable(entry.bytes, entry.parse);
        const columns = typeof mapping === 'function' ? mapping(table.header) : mapping;
        whole = { dataset: buildDataset(table, columns, entry.dataset?.options) };
      } catch (e) {
        whole = { error: e };
      }
      const options = { ...entry.parse, ...entry.dataset?.options };
      let streamed: StreamedDataset | undefined;
      let streamError: unknown;
      try {
        streamed = await streamDataset(chunked(entry.bytes, [5, 17, 3]), mapping, options);
      } catch (e) {
        streamError = e;
      }
      if (whole.error) {
        expect(streamError).toBeInstanceOf(TableError);
        expect((streamError as TableError).row).toBe((whole.error as TableError).row);
        expect((streamError as TableError).column).toBe((whole.error as TableError).column);
      } else {
        expect(streamError).toBeUndefined();
        expect(essentials(streamed as StreamedDataset)).toEqual(essentials(whole.dataset as Dataset));
      }
    });
  }
});

describe('streamDataset', () => {
  it('reports the SHA-256 and byte length and hands every chunk to onBytes', async () => {
    const bytes = utf8('id,tc1\nr1,2\nr2,3\n');
    const seen: number[] = [];
    const d = await streamDataset(
      chunked(bytes, [4]),
      { tc1: { role: 'item', itemCode: 'tc1' } },
      {
        onBytes: (c) => seen.push(c.length),
      },
    );
    expect(d.sha256).toBe(createHash('sha256').update(bytes).digest('hex'));
    expect(d.byteLength).toBe(bytes.length);
    expect(seen.reduce((s, n) => s + n, 0)).toBe(bytes.length);
    expect(Array.from(decodeColumn(d.columns[0].encoded))).toEqual([2, 3]);
  });

  it('decodes a UTF-8 character split across chunks', async () => {
    const bytes = utf8('id,caf\u00e9\nr1,2\n');
    const d = await streamDataset(chunked(bytes, [1]), { 'caf\u00e9': { role: 'item', itemCode: 'c' } });
    expect(d.header).toEqual(['id', 'caf\u00e9']);
  });
});

/** Random files that must pass parseTable and buildDataset, out of 400 runs. */
const MIN_ACCEPTED_RUNS = 100;

/** Characters that make CSV hard: delimiters, quotes, line breaks, decimals, codes and non-ASCII. */
const CSV_CHARS = [
  'a',
  'b',
  '1',
  '2',
  '5',
  '9',
  '0',
  ',',
  ';',
  '\t',
  '|',
  '"',
  "'",
  '\n',
  '\r',
  ' ',
  '.',
  '-',
  'N',
  'A',
  '\u00e9',
  '\u20ac',
];

const randomText = fc.array(fc.constantFrom(...CSV_CHARS), { maxLength: 200 }).map((cs) => cs.join(''));

/** A cell as a program might write it, quoted when it holds a delimiter, quote or line break. */
const cell = fc.oneof(
  fc.integer({ min: -99, max: 9 }).map(String),
  fc.integer({ min: 0, max: 999 }).map((k) => `${Math.floor(k / 100)}.${k % 100}`),
  fc.integer({ min: 0, max: 999 }).map((k) => `${Math.floor(k / 100)},${k % 100}`),
  fc.constantFrom('', ' ', 'NA', 'n/a', '.', '3 ', 'often'),
  fc.array(fc.constantFrom(...CSV_CHARS), { maxLength: 6 }).map((cs) => cs.join('')),
);

function quoteIfNeeded(value: string, delimiter: string): string {
  return /["\r\n]/.test(value) || value.includes(delimiter) ? `"${value.replace(/"/g, '""')}"` : value;
}

const structuredCsv = fc
  .record({
    delimiter: fc.constantFrom(',', ';', '\t', '|'),
    newline: fc.constantFrom('\n', '\r\n'),
    columns: fc.integer({ min: 1, max: 5 }),
    rows: fc.array(fc.array(cell, { minLength: 5, maxLength: 5 }), { minLength: 1, maxLength: 8 }),
  })
  .map(({ delimiter, newline, columns, rows }) => {
    const header = Array.from({ length: columns }, (_, i) => `tc${i + 1}`).join(delimiter);
    const body = rows.map((r) =>
      r
        .slice(0, columns)
        .map((v) => quoteIfNeeded(v, delimiter))
        .join(delimiter),
    );
    return [header, ...body].join(newline) + newline;
  });

describe('property: random CSV text', () => {
  it('never crashes the reader, and every accepted file round-trips through the column layout', async () => {
    let accepted = 0;
    await fc.assert(
      fc.asyncProperty(
        fc.oneof(randomText, structuredCsv),
        fc.array(fc.integer({ min: 1, max: 40 }), { minLength: 1, maxLength: 4 }),
        async (text, sizes) => {
          const bytes = utf8(text);
          let dataset: Dataset | undefined;
          try {
            const table = parseTable(bytes);
            dataset = buildDataset(table, allItems(table.header));
          } catch (e) {
            if (!(e instanceof TableError)) throw e;
            expect(e.message).not.toMatch(/NaN|undefined/);
          }
          let streamed: StreamedDataset | undefined;
          try {
            streamed = await streamDataset(chunked(bytes, sizes), allItems);
          } catch (e) {
            if (!(e instanceof TableError)) throw e;
          }
          expect(streamed === undefined).toBe(dataset === undefined);
          if (!dataset) return;
          accepted++;
          for (const column of dataset.columns) {
            const back = decodeColumn(columnFromBytes(columnToBytes(encodeColumn(column.values))));
            expect(sameValues(back, column.values)).toBe(true);
          }
          expect(streamed).toBeDefined();
          expect(essentials(streamed as StreamedDataset)).toEqual(essentials(dataset));
          streamed?.columns.forEach((c, i) => {
            expect(sameValues(decodeColumn(c.encoded), dataset.columns[i].values)).toBe(true);
          });
          for (const problem of dataset.problems) {
            expect(Number.isInteger(problem.row) && problem.row >= 2).toBe(true);
            expect(problem.message.startsWith(`row ${problem.row}, column '${problem.column}': `)).toBe(true);
          }
        },
      ),
      { numRuns: 400 },
    );
    // The generator must reach the accepting paths often enough for the round trip to be tested.
    expect(accepted).toBeGreaterThan(MIN_ACCEPTED_RUNS);
  });
});
