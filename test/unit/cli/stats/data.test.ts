import { mkdtempSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, describe, expect, it } from 'vitest';
import { loadItemData, seedOption } from '../../../../app/cli/stats/data.ts';
import { DataError, UsageError } from '../../../../app/cli/types.ts';
import { DEFAULT_SEED } from '../../../../app/engine/rng.ts';

const dir = mkdtempSync(join(tmpdir(), 'scalewright-data-'));
afterAll(() => rmSync(dir, { recursive: true, force: true }));
const ctx = { cwd: dir };

function file(name: string, text: string): string {
  writeFileSync(join(dir, name), text);
  return name;
}

// Invented demo answers on a 1–5 scale.
const pilot = file('pilot.csv', 'id,traffic1,route1,repair1\np1,4,2,NA\np2,5,1,3\np3,3,-99,4\n');

describe('loadItemData', () => {
  it('blanks missing codes (numbers and words), applies reverse keys and records the file hash', async () => {
    const loaded = await loadItemData(
      {
        data: pilot,
        items: 'traffic1,route1,repair1',
        'missing-codes': '-99,NA',
        reverse: 'route1',
        min: '1',
        max: '5',
      },
      ctx,
    );
    expect(loaded.data).toEqual([
      [4, 4, null],
      [5, 5, 3],
      [3, null, 4],
    ]);
    expect(loaded.rowNumbers).toEqual([2, 3, 4]);
    expect(loaded.missing).toBe('listwise');
    expect(loaded.sha256).toMatch(/^[0-9a-f]{64}$/);
  });

  it('reads a decimal comma in a semicolon file, with a warning', async () => {
    const name = file('semi.csv', 'a;b\n1,5;2\n3;4,5\n');
    const loaded = await loadItemData({ data: name, items: 'a,b' }, ctx);
    expect(loaded.data).toEqual([
      [1.5, 2],
      [3, 4.5],
    ]);
    expect(loaded.warnings).toContain('read with the decimal comma (detected, or given with --decimal-mark)');
  });

  it('usage errors: missing --data or --items, lone --min, reversed name not in --items, bad --missing', async () => {
    await expect(loadItemData({ items: 'a,b' }, ctx)).rejects.toThrow(UsageError);
    await expect(loadItemData({ data: pilot }, ctx)).rejects.toThrow('--items is required');
    await expect(loadItemData({ data: pilot, items: 'traffic1,route1', min: '1' }, ctx)).rejects.toThrow(
      '--min and --max go together',
    );
    await expect(
      loadItemData({ data: pilot, items: 'traffic1,route1', reverse: 'repair1', min: '1', max: '5' }, ctx),
    ).rejects.toThrow('--reverse names "repair1", which is not in --items');
    await expect(loadItemData({ data: pilot, items: 'traffic1,traffic1' }, ctx)).rejects.toThrow(
      '--items names "traffic1" twice',
    );
    await expect(
      loadItemData({ data: pilot, items: 'traffic1,route1', missing: 'mean' }, ctx),
    ).rejects.toThrow('--missing must be listwise or pairwise (got "mean")');
    await expect(
      loadItemData({ data: pilot, items: 'traffic1,route1', min: 'one', max: '5' }, ctx),
    ).rejects.toThrow('--min must be a number (got "one")');
  });

  it('data errors name the file, row and column', async () => {
    await expect(loadItemData({ data: pilot, items: 'traffic1,repair1' }, ctx)).rejects.toThrow(
      `pilot.csv, row 2, column 4 ('repair1'): value "NA" is not a number`,
    );
    await expect(
      loadItemData(
        { data: pilot, items: 'traffic1,repair1', 'missing-codes': 'NA', min: '1', max: '4' },
        ctx,
      ),
    ).rejects.toThrow(
      `pilot.csv, row 3, column 2 ('traffic1'): value 5 lies outside the declared bounds 1–4`,
    );
    await expect(loadItemData({ data: pilot, items: 'Traffic1,route1' }, ctx)).rejects.toThrow(
      'no column named "Traffic1" (did you mean "traffic1"?)',
    );
    const ragged = file('ragged.csv', 'a,b\n1,2\n3\n');
    await expect(loadItemData({ data: ragged, items: 'a,b' }, ctx)).rejects.toThrow(DataError);
    await expect(loadItemData({ data: ragged, items: 'a,b' }, ctx)).rejects.toThrow(/^ragged\.csv: row 3/);
    await expect(loadItemData({ data: 'absent.csv', items: 'a,b' }, ctx)).rejects.toThrow(
      'cannot read data file "absent.csv": no such file',
    );
  });
});

describe('seedOption', () => {
  it('defaults to DEFAULT_SEED and refuses a fraction', () => {
    expect(seedOption({})).toBe(DEFAULT_SEED);
    expect(seedOption({ seed: '17' })).toBe(17);
    expect(() => seedOption({ seed: '1.5' })).toThrow(UsageError);
  });
});

/**
 * A plain-text file (ASCII, no quotes, no carriage returns) is split from its bytes; any other goes
 * through papaparse. Quoting one header name changes nothing a reader keeps but sends the same table
 * down the other path, so the two readings of each file must agree in every answer, row number,
 * warning and message.
 */
describe('loadItemData reads plain and quoted files alike', () => {
  const quoted = (text: string) => text.replace(/^id/, '"id"');
  const both = async (name: string, text: string, options: Record<string, string>) => {
    const plain = file(`${name}.csv`, text);
    const other = file(`${name}-quoted.csv`, quoted(text));
    const read = async (f: string) => {
      try {
        const loaded = await loadItemData({ data: f, ...options }, ctx);
        return { data: loaded.data, rows: loaded.rowNumbers, warnings: loaded.warnings };
      } catch (error) {
        return { error: (error as Error).message.replace(f, 'FILE') };
      }
    };
    return { plain: await read(plain), other: await read(other) };
  };

  type Outcome = 'reads' | 'refuses';
  /** 700 rows (several batches of records): digits, gaps, wider numbers, codes, blank lines; `late` ends it. */
  const long = (late: string) => {
    const lines = ['id,a,b,c,d'];
    for (let i = 1; i <= 700; i++) {
      const cells = [`p${i}`, String(1 + (i % 5)), i % 7 === 0 ? '' : String(1 + ((i * 3) % 5))];
      cells.push(i % 11 === 0 ? '-99' : i % 13 === 0 ? '4.5' : String(1 + ((i * 7) % 4)));
      cells.push(i % 17 === 0 ? ' 3' : i % 19 === 0 ? 'NA' : String(2 + (i % 3)));
      lines.push(cells.join(','));
      if (i % 250 === 0) lines.push('');
    }
    return `${lines.join('\n')}\n${late}`;
  };
  const cases: [string, string, Record<string, string>, Outcome][] = [
    ['likert with gaps', 'id,a,b,c\np1,1,,5\np2,2,3,\n\np3,4,4,4\np4,,5,1\n', { items: 'a,b,c' }, 'reads'],
    [
      'missing codes and decimals',
      'id,a,b\np1,-99,2.5\np2,3,NA\np3,1.25,4\n',
      { items: 'a,b', 'missing-codes': '-99,NA' },
      'reads',
    ],
    [
      'a value outside the bounds',
      'id,a,b\np1,1,2\np2,7,3\n',
      { items: 'a,b', min: '1', max: '5' },
      'refuses',
    ],
    ['a word in an item column', 'id,a,b\np1,1,2\np2,3,often\n', { items: 'a,b' }, 'refuses'],
    ['reverse keys', 'id,a,b\np1,1,2\np2,5,\n', { items: 'a,b', reverse: 'b', min: '1', max: '5' }, 'reads'],
    ['trailing delimiters and padded cells', 'id,a,b,\np1, 2 ,3,\np2,4,5,\n', { items: 'b,a' }, 'reads'],
    ['a ragged row', 'id,a,b\np1,1,2\np2,3\n', { items: 'a,b' }, 'refuses'],
    ['a long file', long('p701,5,4,3,2'), { items: 'd,b,a,c', 'missing-codes': '-99,NA' }, 'reads'],
    // Long first rows make the first bytes promise few respondents: the columns must grow.
    [
      'a file whose first rows are long',
      long('p701,5,4,3,2').replace(/\np(\d),/g, (_, d) => `\np${d}${'x'.repeat(9000)},`),
      { items: 'a,b,c,d', 'missing-codes': '-99,NA' },
      'reads',
    ],
    [
      'a long file whose last row holds the first 6',
      long('p701,6,4,3,2\n'),
      { items: 'a,b,c,d', 'missing-codes': '-99,NA', min: '1', max: '5' },
      'refuses',
    ],
  ];
  it.each(cases)('%s', async (name, text, options, outcome) => {
    const { plain, other } = await both(name.replace(/\W+/g, '-'), text, options);
    expect('error' in plain ? 'refuses' : 'reads').toBe(outcome);
    expect(other).toEqual(plain);
  });

  it('the answers by item match the answers by row', async () => {
    const name = file('columns.csv', 'id,a,b\np1,1,\np2,,4\np3,2,5\n');
    const loaded = await loadItemData({ data: name, items: 'a,b' }, ctx);
    expect(loaded.answers.n).toBe(3);
    expect(loaded.answers.columns.map((c) => Array.from(c))).toEqual([
      [1, Number.NaN, 2],
      [Number.NaN, 4, 5],
    ]);
    expect(loaded.data).toEqual([
      [1, null],
      [null, 4],
      [2, 5],
    ]);
  });
});

describe('loadItemData refuses a file without data rows', () => {
  it('names the file and says what is missing', async () => {
    const name = file('header-only.csv', 'id,a,b\n\n');
    await expect(loadItemData({ data: name, items: 'a,b' }, ctx)).rejects.toThrow(
      'header-only.csv: the file has a header row but no data rows',
    );
  });
});
