import { describe, expect, it } from 'vitest';
import { buildDataset } from '../../../app/import/dataset.ts';
import { TableError } from '../../../app/import/parse-table.ts';
import { readWorkbook } from '../../../app/import/workbook.ts';
import { makeWorkbook } from './xlsx-writer.ts';

describe('readWorkbook', () => {
  const wb = makeWorkbook([
    {
      name: 'Responses',
      rows: [
        ['id', 'tc1', 'tc2', 'commute_km'],
        ['r1', 1, 4, 0.1],
        ['r2', 5, null, 12.75],
        [null, null, null, null],
        ['r3', 'NA', 2, 3],
      ],
    },
    { name: 'Notes', rows: [['note'], ['pilot wave 1']] },
  ]);

  it('reads the first sheet as text cells with spreadsheet row numbers', async () => {
    const t = await readWorkbook(wb, { fileName: 'pilot.xlsx' });
    expect(t.header).toEqual(['id', 'tc1', 'tc2', 'commute_km']);
    expect(t.rows).toEqual([
      ['r1', '1', '4', '0.1'],
      ['r2', '5', '', '12.75'],
      ['r3', 'NA', '2', '3'],
    ]);
    expect(t.rowNumbers).toEqual([2, 3, 5]);
    expect(t.sheets).toEqual(['Responses', 'Notes']);
    expect(t.warnings).toEqual(['skipped blank row(s) 4']);
    const d = buildDataset(
      t,
      { tc1: { role: 'item', itemCode: 'tc1' }, commute_km: { role: 'criterion' } },
      {
        missingCodes: { text: ['NA'], numeric: [] },
      },
    );
    expect(Array.from(d.columns[1].values)).toEqual([0.1, 12.75, 3]);
  });

  it('reads a sheet by name and says which sheets exist when the name is wrong', async () => {
    expect((await readWorkbook(wb, { sheet: 'Notes' })).rows).toEqual([['pilot wave 1']]);
    await expect(readWorkbook(wb, { sheet: 'Wave 2' })).rejects.toThrow(
      /has no sheet "Wave 2"; its sheets are "Responses", "Notes"/,
    );
  });

  it('refuses an empty, damaged, old .xls or text file with a TableError', async () => {
    await expect(readWorkbook(new Uint8Array(0))).rejects.toThrow(/is empty \(0 bytes\)/);
    await expect(readWorkbook(Uint8Array.from([0x50, 0x4b, 3, 4, 1, 2, 3]))).rejects.toThrow(/damaged/);
    await expect(
      readWorkbook(Uint8Array.from([0xd0, 0xcf, 0x11, 0xe0, 0xa1, 0xb1, 0x1a, 0xe1, 0, 0, 0, 0])),
    ).rejects.toThrow(/old binary \.xls workbook/);
    await expect(readWorkbook(new TextEncoder().encode('id,tc1\n1,2\n'))).rejects.toBeInstanceOf(TableError);
  });

  it('refuses a value right of the last named column and a sheet with only a header', async () => {
    const wide = makeWorkbook([
      {
        name: 'S',
        rows: [
          ['id', 'tc1'],
          ['r1', 2, 9],
        ],
      },
    ]);
    await expect(readWorkbook(wide)).rejects.toThrow(
      /row 2, column 3: value '9' lies beyond the last named column/,
    );
    const headerOnly = makeWorkbook([{ name: 'S', rows: [['id', 'tc1']] }]);
    await expect(readWorkbook(headerOnly)).rejects.toThrow(/no data rows after row 1/);
  });
});
