import { describe, expect, it } from 'vitest';
import { buildDataset } from '../../../app/import/dataset.ts';
import { parseTable, TableError } from '../../../app/import/parse-table.ts';
import { CORPUS, type CorpusEntry } from './broken-corpus.ts';
import { utf8 } from '../../helpers/bytes.ts';

/** Runs one corpus entry the way the import does: parse, then (when asked) build the dataset. */
function run(entry: CorpusEntry) {
  const table = parseTable(entry.bytes, entry.parse);
  const dataset = entry.dataset
    ? buildDataset(table, entry.dataset.mapping, entry.dataset.options)
    : undefined;
  return { table, dataset };
}

describe('broken-file corpus', () => {
  it('has at least 25 files', () => {
    expect(CORPUS.length).toBeGreaterThanOrEqual(25);
  });

  for (const entry of CORPUS) {
    it(`${entry.name}: ${'error' in entry.expect ? 'a clear message' : 'imports with listed warnings'}`, () => {
      const expected = entry.expect;
      if ('error' in expected) {
        let caught: unknown;
        try {
          run(entry);
        } catch (e) {
          caught = e;
        }
        expect(caught).toBeInstanceOf(TableError);
        const err = caught as TableError;
        expect(err.message).toMatch(expected.error);
        expect(err.message).not.toMatch(/NaN|undefined|\n\s+at /);
        expect(err.row).toBe(expected.row);
        expect(err.column).toBe(expected.column);
        if (expected.row !== undefined) expect(err.message).toContain(`row ${expected.row}`);
        return;
      }
      const { table, dataset } = run(entry);
      const warnings = [...table.warnings, ...(dataset?.warnings ?? [])];
      for (const w of expected.warnings ?? []) expect(warnings.some((x) => w.test(x))).toBe(true);
      if (expected.warnings?.length === 0) expect(table.warnings).toEqual([]);
      if (expected.problems) {
        expect(dataset?.problems.length).toBe(expected.problems.length);
        expected.problems.forEach((p, i) => {
          const got = dataset?.problems[i];
          expect(got?.row).toBe(p.row);
          expect(got?.column).toBe(p.column);
          expect(got?.message).toMatch(p.message);
          expect(got?.message).toContain(`row ${p.row}, column '${p.column}'`);
        });
      }
    });
  }
});

describe('parseTable', () => {
  it('reads a plain comma file and numbers rows with the header as row 1', () => {
    const t = parseTable(utf8('id,tc1,tc2\nr1,2,3\nr2,3,4\n'));
    expect(t).toMatchObject({
      header: ['id', 'tc1', 'tc2'],
      rows: [
        ['r1', '2', '3'],
        ['r2', '3', '4'],
      ],
      delimiter: ',',
      encoding: 'utf-8',
      rowNumbers: [2, 3],
      warnings: [],
    });
  });

  it('detects semicolon, tab and pipe delimiters', () => {
    expect(parseTable(utf8('id;tc1\nr1;2,5\n')).delimiter).toBe(';');
    expect(parseTable(utf8('id\ttc1\nr1\t2\n')).delimiter).toBe('\t');
    expect(parseTable(utf8('id|tc1\nr1|2\n')).delimiter).toBe('|');
  });

  it('does not let decimal commas vote for the comma as delimiter', () => {
    const t = parseTable(utf8('id;tc1;tc2\nr1;2,5;3,5\nr2;1,5;4,5\n'));
    expect(t.delimiter).toBe(';');
    expect(t.rows[0]).toEqual(['r1', '2,5', '3,5']);
  });

  it('warns when two delimiters fit equally well', () => {
    const t = parseTable(utf8('a,b;c\n1,2;3\n'));
    expect(t.delimiter).toBe(',');
    expect(t.warnings.join(' ')).toMatch(/semicolon would also fit/);
  });

  it('accepts a named delimiter and keeps quoted delimiters and line breaks inside fields', () => {
    const t = parseTable(utf8('id\tnote\nr1\t"a\tb\nc"\n'), { delimiter: 'tab' });
    expect(t.rows).toEqual([['r1', 'a\tb\nc']]);
  });

  it('detects single quotes only when they wrap the header fields', () => {
    expect(parseTable(utf8("'id','tc1'\n'r1','2'\n")).rows).toEqual([['r1', '2']]);
    expect(parseTable(utf8("id,label\nr1,don't\n")).rows).toEqual([['r1', "don't"]]);
  });

  it('decodes UTF-8 with BOM, UTF-16 with BOM and Windows-1252', () => {
    expect(parseTable(utf8('\ufeffid,café\nr1,2\n')).header).toEqual(['id', 'café']);
    const le = parseTable(new Uint8Array(Buffer.from('\ufeffid,café\nr1,2\n', 'utf16le')));
    expect([le.encoding, le.header[1]]).toEqual(['utf-16le', 'café']);
    const be = parseTable(new Uint8Array(Buffer.from('\ufeffid,café\nr1,2\n', 'utf16le').swap16()));
    expect([be.encoding, be.header[1]]).toEqual(['utf-16be', 'café']);
    const cp = parseTable(Uint8Array.from([...utf8('id,'), 0x80, 0xe9, ...utf8('\nr1,2\n')]));
    expect([cp.encoding, cp.header[1]]).toEqual(['windows-1252', '€é']);
  });

  it('counts blank lines before the header in the row numbers', () => {
    const t = parseTable(utf8('\n\nid,tc1\nr1,2\n'));
    expect(t.rowNumbers).toEqual([4]);
    expect(t.warnings).toContain('skipped 2 blank line(s) before the header');
  });
});
