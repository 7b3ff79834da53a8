import { describe, expect, it } from 'vitest';
import {
  CELL_MISSING,
  CELL_NUMBER,
  CELL_TEXT,
  CellReader,
  detectDecimalMark,
  parseNumber,
} from '../../../app/import/numbers.ts';

describe('parseNumber', () => {
  it('reads plain decimal notation only', () => {
    expect(parseNumber('3', '.')).toBe(3);
    expect(parseNumber('-2.5', '.')).toBe(-2.5);
    expect(parseNumber('+4', '.')).toBe(4);
    expect(parseNumber('1e3', '.')).toBe(1000);
    expect(parseNumber('.5', '.')).toBe(0.5);
    expect(parseNumber('2,5', ',')).toBe(2.5);
    for (const bad of ['0x10', 'Infinity', '1 000', '3 points', '1,5', '', 'e', '-', '1.2.3']) {
      expect(parseNumber(bad, '.')).toBeUndefined();
    }
    expect(parseNumber('2.5', ',')).toBeUndefined();
    expect(parseNumber('1.234,5', ',')).toBeUndefined();
  });
});

describe('detectDecimalMark', () => {
  it('takes the mark used more often and reports a mix', () => {
    expect(detectDecimalMark(['1', '2,5', '3,25'])).toEqual({
      mark: ',',
      dotCells: 0,
      commaCells: 2,
      mixed: false,
    });
    expect(detectDecimalMark(['1.5', '2,5', '3.5']).mixed).toBe(true);
    expect(detectDecimalMark(['1', '2']).mark).toBe('.');
  });
});

describe('CellReader', () => {
  it('applies blank, text and numeric missing codes per dataset', () => {
    const reader = new CellReader({ text: ['NA', 'n/a'], numeric: [-99, -9] }, '.');
    const read = (raw: string) => {
      const value = reader.read(raw);
      return [Number.isNaN(value) ? 'NaN' : value, reader.status];
    };
    expect(read(' 4 ')).toEqual([4, CELL_NUMBER]);
    expect(read('')).toEqual(['NaN', CELL_MISSING]);
    expect(read('  ')).toEqual(['NaN', CELL_MISSING]);
    expect(read('na')).toEqual(['NaN', CELL_MISSING]);
    expect(read('N/A')).toEqual(['NaN', CELL_MISSING]);
    expect(read('-99')).toEqual(['NaN', CELL_MISSING]);
    expect(read('-99.0')).toEqual(['NaN', CELL_MISSING]);
    expect(read('-9')).toEqual(['NaN', CELL_MISSING]);
    expect(read('-98')).toEqual([-98, CELL_NUMBER]);
    expect(read('often')).toEqual(['NaN', CELL_TEXT]);
  });
});
