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
