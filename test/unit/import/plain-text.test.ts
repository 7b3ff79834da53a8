import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import type { ColumnMapping } from '../../../app/import/mapping.ts';
import type { MissingCodes } from '../../../app/import/numbers.ts';
import { TableError } from '../../../app/import/parse-table.ts';
import {
  isPlainText,
  type StreamDatasetOptions,
  type StreamedDataset,
  streamDataset,
} from '../../../app/import/stream-dataset.ts';
import { CORPUS } from './broken-corpus.ts';
import { chunked, utf8 } from '../../helpers/bytes.ts';

/**
 * The plain-text reading (streamDataset with plainText) splits records from the bytes itself; the
 * reference it must match is the same streamDataset reading through papaparse. Both must give the
 * very same dataset (values in the same column layout, ids, row numbers, problems with row and column,
 * warnings) or the very same error (message, row, column) on every plain file.
 */

type Outcome =
  | { dataset: StreamedDataset }
  | { error: { name: string; message: string; row?: number; column?: string } };

async function read(
  bytes: Uint8Array,
  sizes: number[],
  mapping: ColumnMapping | ((header: string[]) => ColumnMapping),
  options: StreamDatasetOptions,
): Promise<Outcome> {
  try {
    return { dataset: await streamDataset(chunked(bytes, sizes), mapping, options) };
  } catch (e) {
    if (!(e instanceof TableError)) throw e;
    return { error: { name: e.name, message: e.message, row: e.row, column: e.column } };
  }
}

/** Papaparse's reading and the plain reading of the same bytes, chunked the same way. */
async function bothReadings(
  bytes: Uint8Array,
  sizes: number[],
  mapping: ColumnMapping | ((header: string[]) => ColumnMapping),
  options: StreamDatasetOptions = {},
): Promise<{ papaparse: Outcome; plain: Outcome }> {
  return {
    papaparse: await read(bytes, sizes, mapping, { ...options, plainText: false }),
    plain: await read(bytes, sizes, mapping, { ...options, plainText: true }),
  };
}

/** Column roles for a header: an id, items, and (when wide enough) a duration, a group and a criterion. */
function mixedRoles(header: string[]): ColumnMapping {
  const roles: ColumnMapping = {};
  header.forEach((name, i) => {
    if (i === 0) roles[name] = { role: 'id' };
    else if (i === 4) roles[name] = { role: 'duration' };
    else if (i === 6) roles[name] = { role: 'group' };
    else if (i === 8) roles[name] = { role: 'criterion' };
    else roles[name] = { role: 'item', itemCode: `TC${i}` };
  });
  return roles;
}

/**
 * Cells of plain files: digits, wider and negative numbers, decimals with either mark, declared codes,
 * text and blanks; with `controls`, rarely also the ASCII controls trim removes (vertical tab, form
 * feed) and one it keeps (unit separator, 0x1F): the reader refuses a file with more than a few.
 */
function plainCell(controls: boolean) {
  return fc.oneof(
    { weight: 60, arbitrary: fc.integer({ min: 0, max: 9 }).map(String) },
    { weight: 20, arbitrary: fc.integer({ min: -300, max: 300 }).map(String) },
    {
      weight: 20,
      arbitrary: fc.constantFrom(
        '',
        ' ',
        ' 3',
        '4 ',
        '\t2',
        '2.5',
        '3,5',
        '-9',
        'NA',
        'na',
        'x',
        '1e3',
        '-',
        '.',
        '127',
        '-128',
        '99999999999',
      ),
    },
    { weight: controls ? 1 : 0, arbitrary: fc.constantFrom('\u000b', '\u000c5', '\u001f') },
  );
}

/** A line of a plain file: mostly as wide as the header, sometimes ragged, blank or with empty ends. */
function plainLine(width: number, delimiter: string, controls: boolean) {
  const cell = plainCell(controls);
  // In a file with controls every blank line has one, so that those lines are tested often.
  const blankLines: string[][] = controls
    ? [['\u000b'], ['\u000c', ' '], ['', '\u000b']]
    : [[''], [' '], ['', ''], ['\t', ' ']];
  return fc
    .oneof(
      { weight: 40, arbitrary: fc.array(cell, { minLength: width, maxLength: width }) },
      { weight: 1, arbitrary: fc.array(cell, { minLength: 0, maxLength: width + 2 }) },
      { weight: 2, arbitrary: fc.constantFrom(...blankLines) },
      {
        weight: 2,
        arbitrary: fc.array(cell, { minLength: width, maxLength: width }).map((cells) => [...cells, '', ' ']),
      },
    )
    .map((cells) => cells.join(delimiter));
}

const plainFile = fc
  .record({
    // A digit as the delimiter (a user may set one) must not be taken for a one-digit field.
    delimiter: fc.constantFrom(',', ';', '\t', '|', '5'),
    width: fc.integer({ min: 2, max: 12 }),
    controls: fc.integer({ min: 0, max: 4 }).map((k) => k === 0),
    bom: fc.boolean(),
    leadingBlank: fc.integer({ min: 0, max: 2 }),
    emptyHeaderEnd: fc.boolean(),
    finalNewline: fc.boolean(),
    rows: fc.integer({ min: 0, max: 30 }),
  })
  .chain((f) =>
    fc
      .array(plainLine(f.width, f.delimiter, f.controls), { minLength: f.rows, maxLength: f.rows })
      .map((lines) => {
        const names = Array.from({ length: f.width }, (_, i) => `c${i + 1}`);
        if (f.emptyHeaderEnd) names.push('');
        const header = names.join(f.delimiter);
        const text = `${'\n'.repeat(f.leadingBlank)}${[header, ...lines].join('\n')}${f.finalNewline ? '\n' : ''}`;
        return { text: `${f.bom ? '\ufeff' : ''}${text}`, delimiter: f.delimiter };
      }),
  );

const datasetOptions = fc.record({
  bounds: fc.constantFrom(undefined, [1, 5], [0, 9]),
  missingCodes: fc.constantFrom<MissingCodes | undefined>(
    undefined,
    { text: ['NA'], numeric: [-9] },
    { text: [], numeric: [3] },
  ),
  giveDelimiter: fc.boolean(),
  maxProblems: fc.constantFrom(undefined, 3),
});

describe('plain-text reading', () => {
  it('accepts only ASCII without quotes or carriage returns (after an optional UTF-8 BOM)', () => {
    expect(isPlainText(utf8('id,tc1\nr1,2\n'))).toBe(true);
    expect(isPlainText(utf8('\ufeffid;tc1\nr1;2\n'))).toBe(true);
    expect(isPlainText(utf8('id,tc1\r\nr1,2\r\n'))).toBe(false);
    expect(isPlainText(utf8('id,"tc1"\nr1,2\n'))).toBe(false);
    expect(isPlainText(utf8("id,tc1\nr1,it's\n"))).toBe(false);
    expect(isPlainText(utf8('id,caf\u00e9\nr1,2\n'))).toBe(false);
    expect(isPlainText(utf8('id,tc1\nr1,2\n\ufeff'))).toBe(false);
  });

  it('refuses to go on when the file turns out not to be plain', async () => {
    await expect(
      streamDataset(chunked(utf8('id,tc1\nr1,2\nr2,"3"\n'), [8]), mixedRoles, { plainText: true }),
    ).rejects.toThrow(/told the file is plain text, but it is not/);
  });

  it('reads a plain file with papaparse when it is decoded as UTF-16', async () => {
    const bytes = new Uint8Array(Buffer.from('id,tc1\nr1,2\n', 'utf16le'));
    const { papaparse, plain } = await bothReadings(bytes, [7], mixedRoles, { encoding: 'utf-16le' });
    expect(plain).toEqual(papaparse);
    expect('dataset' in plain && plain.dataset.n).toBe(1);
  });

  it('gives the same dataset or the same error as papaparse on every plain file of the corpus', async () => {
    let compared = 0;
    for (const entry of CORPUS) {
      if (!isPlainText(entry.bytes) || entry.bytes.length === 0) continue;
      const options = { ...entry.parse, ...entry.dataset?.options };
      const mapping = entry.dataset?.mapping ?? mixedRoles;
      for (const sizes of [[entry.bytes.length], [5, 17, 3], [1]]) {
        const { papaparse, plain } = await bothReadings(entry.bytes, sizes, mapping, options);
        expect(plain, `${entry.name}, chunks ${sizes.join('/')}`).toEqual(papaparse);
      }
      compared++;
    }
    // Most of the corpus is plain; the comparison must not pass by skipping it.
    expect(compared).toBeGreaterThan(CORPUS.length / 3);
  });

  it('property: random plain files read the same way on both paths', async () => {
    let accepted = 0;
    let refused = 0;
    await fc.assert(
      fc.asyncProperty(
        plainFile,
        datasetOptions,
        fc.array(fc.integer({ min: 1, max: 64 }), { minLength: 1, maxLength: 4 }),
        async (file, opts, sizes) => {
          const bytes = utf8(file.text);
          expect(isPlainText(bytes)).toBe(true);
          const options: StreamDatasetOptions = {
            ...(opts.bounds ? { scaleMin: opts.bounds[0], scaleMax: opts.bounds[1] } : {}),
            ...(opts.missingCodes ? { missingCodes: opts.missingCodes } : {}),
            ...(opts.giveDelimiter ? { delimiter: file.delimiter } : {}),
            ...(opts.maxProblems === undefined ? {} : { maxProblems: opts.maxProblems }),
          };
          const { papaparse, plain } = await bothReadings(bytes, sizes, mixedRoles, options);
          expect(plain).toEqual(papaparse);
          if ('dataset' in plain) accepted++;
          else refused++;
        },
      ),
      { numRuns: 500 },
    );
    // Both outcomes must be reached often for the comparison to mean something.
    expect(accepted).toBeGreaterThan(150);
    expect(refused).toBeGreaterThan(20);
  });
});
