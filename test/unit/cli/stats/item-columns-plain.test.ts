import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { type CellRules, ItemColumnsSink } from '../../../../app/cli/stats/item-columns.ts';
import { streamRecords } from '../../../../app/import/stream-dataset.ts';
import { chunked, utf8 } from '../../../helpers/bytes.ts';

/**
 * The command line's item columns (ItemColumnsSink) read from a plain file by the compiled splitting
 * and gathering kernels must hold exactly what the same sink holds when papaparse splits the same
 * bytes: the same values (bit for bit, NaN for a missing answer), row numbers and warnings, or the same
 * error. Files span several batches of records and arrive in odd-sized chunks, so that a batch ends
 * mid-line, a line outgrows one chunk, and the gathering regions are laid out while a batch is read.
 */

interface Setup {
  /** Given when it is not one the reader detects (a digit). */
  delimiter?: string;
  items: readonly string[];
  missingCodes: readonly string[];
  bounds: { readonly min: number; readonly max: number } | null;
}

type Outcome =
  | { columns: number[][]; rowNumbers: number[]; warnings: string[] }
  | { error: string; name: string };

async function read(bytes: Uint8Array, sizes: number[], setup: Setup, plainText: boolean): Promise<Outcome> {
  try {
    const read = await streamRecords(
      chunked(bytes, sizes),
      (header, _sniffed, _warnings) => {
        const columns = setup.items.map((name) => header.indexOf(name));
        if (columns.some((c) => c < 0)) throw new Error(`missing column in ${header.join('|')}`);
        const rules: CellRules = {
          file: 'f.csv',
          header,
          columns,
          mark: '.',
          missingCodes: setup.missingCodes,
          numericCodes: setup.missingCodes.filter((c) => /^-?\d+$/.test(c)).map(Number),
          bounds: setup.bounds,
        };
        return new ItemColumnsSink(rules, 16);
      },
      { fileName: 'f.csv', plainText, delimiter: setup.delimiter },
    );
    const done = read.sink.finish();
    return {
      // Arrays of numbers compare NaN equal to NaN and tell 0 from −0 (Object.is).
      columns: done.columns.map((c) => Array.from(c)),
      rowNumbers: done.rowNumbers,
      warnings: [...read.warnings, ...done.warnings],
    };
  } catch (e) {
    return { error: (e as Error).message, name: (e as Error).name };
  }
}

/** Mostly answers 1 to 5; rarely other digits, padded digits, wider numbers, codes and one control. */
const cell = fc.oneof(
  { weight: 400, arbitrary: fc.integer({ min: 1, max: 5 }).map(String) },
  { weight: 4, arbitrary: fc.constantFrom('0', '6', '8', '9') },
  { weight: 40, arbitrary: fc.constant('') },
  { weight: 12, arbitrary: fc.constantFrom(' 3', '4 ', '\t2', '2.5', '1e0', '+4', '03', '-0', 'NA', '-9') },
  { weight: 2, arbitrary: fc.constantFrom('10', '-3') },
  { weight: 1, arbitrary: fc.constant('\u000b5') },
);

const WIDTH = 6;
const HEADER = ['id', 'a', 'b', 'c', 'd', 'e'];

const line = fc.oneof(
  {
    weight: 60,
    arbitrary: fc.array(cell, { minLength: WIDTH - 1, maxLength: WIDTH - 1 }).map((c) => ['r', ...c]),
  },
  { weight: 2, arbitrary: fc.constantFrom([''], [' '], ['', '', '', '', '', ''], ['\u000c']) },
  {
    weight: 2,
    arbitrary: fc
      .array(cell, { minLength: WIDTH - 1, maxLength: WIDTH - 1 })
      .map((c) => ['r', ...c, '', ' ']),
  },
);

const file = fc.record({
  lines: fc.array(line, { minLength: 1, maxLength: 700, size: 'max' }),
  /** A very long id on one line (longer than every chunk), or none. */
  longAt: fc.option(fc.nat(699), { nil: undefined }),
  finalNewline: fc.boolean(),
  // A digit no cell holds, given as the delimiter: never a one-digit field.
  delimiter: fc.constantFrom(',', ';', '\t', '7'),
});

const setup = fc.record({
  items: fc.shuffledSubarray(HEADER.slice(1), { minLength: 1 }),
  missingCodes: fc.constantFrom([], ['NA', '-9'], ['9'], ['0', 'NA']),
  bounds: fc.constantFrom(null, { min: -9, max: 9 }, { min: 1, max: 5 }),
});

describe('the command line item columns from a plain file', () => {
  it('are the same with the compiled splitting and gathering as with papaparse', async () => {
    await fc.assert(
      fc.asyncProperty(
        file,
        setup,
        fc.array(fc.integer({ min: 1, max: 3000 }), { minLength: 1, maxLength: 4 }),
        async (f, s, sizes) => {
          const rows = f.lines.map((cells, i) => {
            const out = [...cells];
            if (i === f.longAt && out.length > 1) out[0] = 'x'.repeat(5000);
            return out.join(f.delimiter);
          });
          const text = `${[HEADER.join(f.delimiter), ...rows].join('\n')}${f.finalNewline ? '\n' : ''}`;
          const bytes = utf8(text);
          const given = { ...s, delimiter: f.delimiter === '7' ? '7' : undefined };
          const papaparse = await read(bytes, sizes, given, false);
          const plain = await read(bytes, sizes, given, true);
          expect(plain).toEqual(papaparse);
        },
      ),
      // Shrinking a file of hundreds of lines read twice per try takes minutes: report the first failure.
      { numRuns: 100, endOnFailure: true },
    );
  });
});
