import { describe, expect, it } from 'vitest';
import { TableError } from '../../../app/import/parse-table.ts';
import { describeProblem, type RatingsFile, readRatings } from '../../../app/import/ratings/index.ts';

const bytes = (text: string): Uint8Array => new TextEncoder().encode(text);

function read(text: string, options = {}): RatingsFile {
  return readRatings(bytes(text), { fileName: 'ratings.csv', ...options });
}

function messages(file: RatingsFile, header: string[]): string[] {
  return file.problems.map((p) => describeProblem(p, header));
}

const LONG = [
  'item,expert,relevance,essential,facet,comment',
  'tc1,E1,4,yes,traffic,',
  'tc1,E2,3,no,traffic,clear',
  'tc2,E1,,essential,routes,',
  'tc2,E2,2,not necessary,,',
].join('\n');

describe('readRatings: long form', () => {
  it('reads every column into typed ratings with file rows', () => {
    const file = read(LONG);
    expect(file.problems).toEqual([]);
    expect(file.layout).toBe('long');
    expect(file.experts).toEqual(['E1', 'E2']);
    expect(file.items).toEqual(['tc1', 'tc2']);
    expect(file.hasEssential).toBe(true);
    expect(file.hasFacet).toBe(true);
    expect(file.ratings[1]).toEqual({
      item: 'tc1',
      expert: 'E2',
      relevance: 3,
      essential: false,
      facet: 'traffic',
      comment: 'clear',
      row: 3,
    });
    expect(file.ratings[2].relevance).toBeNull();
    expect(file.ratings[2].essential).toBe(true);
    expect(file.ratings[3].facet).toBeNull();
  });

  it('accepts any column order, letter case and a semicolon or tab delimiter', () => {
    const semi = read('Relevance;Item;Expert\n4;tc1;E1\n3;tc1;E2\n');
    expect(semi.problems).toEqual([]);
    expect(semi.delimiter).toBe(';');
    expect(semi.ratings.map((r) => r.relevance)).toEqual([4, 3]);
    expect(semi.hasEssential).toBe(false);
    const tab = read('item\texpert\trelevance\ntc1\tE1\t9\n');
    expect(messages(tab, ['item', 'expert', 'relevance'])).toEqual([
      "row 2, column 3 ('relevance'): rating 9 is outside the relevance scale 1–4",
    ]);
  });

  it('names the row and column of non-numeric, fractional and off-scale ratings', () => {
    const file = read('item,expert,relevance\ntc1,E1,high\ntc1,E2,2.5\ntc1,E3,0\ntc1,E4,4\n');
    expect(messages(file, ['item', 'expert', 'relevance'])).toEqual([
      "row 2, column 3 ('relevance'): 'high' is not a number; relevance is a whole number from 1 to 4",
      "row 3, column 3 ('relevance'): 2.5 is not a whole number; relevance is a whole number from 1 to 4",
      "row 4, column 3 ('relevance'): rating 0 is outside the relevance scale 1–4",
    ]);
    expect(file.ratings).toHaveLength(1);
  });

  it('uses the declared scale bounds', () => {
    const file = read('item,expert,relevance\ntc1,E1,5\ntc1,E2,0\n', { scaleMin: 1, scaleMax: 5 });
    expect(file.problems.map((p) => [p.row, p.column])).toEqual([[3, 'relevance']]);
  });

  it('reports a duplicate expert–item pair with both rows', () => {
    const file = read('item,expert,relevance\ntc1,E1,4\ntc2,E1,4\ntc1,E1,3\n');
    expect(messages(file, ['item', 'expert', 'relevance'])).toEqual([
      "row 4, column 2 ('expert'): expert 'E1' already rated item 'tc1' on row 2",
    ]);
  });

  it('reports unknown items when an item list is given, and blank codes', () => {
    const file = read('item,expert,relevance\ntc1,E1,4\nxx9,E1,4\n,E2,3\ntc1,,3\n', {
      items: ['tc1', 'tc2'],
    });
    expect(messages(file, ['item', 'expert', 'relevance'])).toEqual([
      "row 3, column 1 ('item'): item 'xx9' is not in the item list",
      "row 4, column 1 ('item'): the item code is blank",
      "row 5, column 2 ('expert'): the expert code is blank",
    ]);
  });

  it('rejects an essential value it cannot read', () => {
    const file = read('item,expert,relevance,essential\ntc1,E1,4,maybe\n');
    expect(messages(file, ['item', 'expert', 'relevance', 'essential'])[0]).toMatch(
      /^row 2, column 4 \('essential'\): 'maybe' is not an essential judgement/,
    );
  });

  it('names unexpected and missing columns on row 1', () => {
    const file = read('item,expert,relevanse\ntc1,E1,4\n');
    const header = ['item', 'expert', 'relevanse'];
    expect(messages(file, header)).toEqual([
      "row 1, column 3 ('relevanse'): unexpected column 'relevanse'; the long form accepts item, expert, relevance, essential, facet, comment",
      "row 1: the header lacks 'relevance'; the long form needs item, expert, relevance",
    ]);
    expect(file.ratings).toEqual([]);
  });
});

describe('readRatings: wide form', () => {
  it('reads one row per item and one column per expert', () => {
    const file = read('item,E1,E2,E3\ntc1,4,3,\ntc2,2,4,4\n');
    expect(file.problems).toEqual([]);
    expect(file.layout).toBe('wide');
    expect(file.experts).toEqual(['E1', 'E2', 'E3']);
    expect(file.ratings).toHaveLength(6);
    expect(file.ratings.find((r) => r.item === 'tc1' && r.expert === 'E3')?.relevance).toBeNull();
    expect(file.ratings.find((r) => r.item === 'tc2' && r.expert === 'E3')?.relevance).toBe(4);
    expect(file.hasEssential).toBe(false);
  });

  it('names the expert column of a bad cell and a repeated item row', () => {
    const file = read('item,E1,E2\ntc1,4,x\ntc1,3,3\n');
    expect(messages(file, ['item', 'E1', 'E2'])).toEqual([
      "row 2, column 3 ('E2'): 'x' is not a number; relevance is a whole number from 1 to 4 (read as the wide form: every column after item holds one expert's ratings)",
      "row 3, column 1 ('item'): item 'tc1' already has a row (row 2); the wide form has one row per item",
    ]);
  });

  it('refuses a header that is neither layout', () => {
    const file = read('code,score\ntc1,4\n');
    expect(messages(file, ['code', 'score'])[0]).toMatch(/^row 1: the header must be item,expert,relevance/);
  });
});

describe('readRatings: unreadable files', () => {
  it('throws TableError for an empty file and for a header without rows', () => {
    expect(() => read('')).toThrow(TableError);
    expect(() => read('')).toThrow(/ratings\.csv" is empty/);
    expect(() => read('item,expert,relevance\n')).toThrow(/no data rows/);
  });

  it('throws TableError naming the row of a ragged line', () => {
    expect(() => read('item,expert,relevance\ntc1,E1,4,extra,more\n')).toThrow(/row 2/);
  });
});
