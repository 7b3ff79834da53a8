/**
 * The broken-file corpus: files a researcher may really bring (or a program may really write), each
 * with what the reader must do. Built from this committed list when the tests run, so binary cases
 * need no binary files in the repository. `table` entries go through parseTable (and streamDataset);
 * `dataset` entries also through buildDataset with the given mapping and options.
 */
import type { DatasetOptions } from '../../../app/import/dataset.ts';
import type { ColumnMapping } from '../../../app/import/mapping.ts';
import type { ParseTableOptions } from '../../../app/import/parse-table.ts';
import { utf8 } from '../../helpers/bytes.ts';

export interface CorpusEntry {
  name: string;
  bytes: Uint8Array;
  parse?: ParseTableOptions;
  /** When given, the table is also turned into a dataset. */
  dataset?: { mapping: ColumnMapping; options?: DatasetOptions };
  expect:
    | { error: RegExp; row?: number; column?: string }
    | { warnings?: RegExp[]; problems?: { row: number; column: string; message: RegExp }[] };
}

const utf16le = (s: string) => new Uint8Array(Buffer.from(s, 'utf16le'));
const utf16be = (s: string) => new Uint8Array(Buffer.from(s, 'utf16le').swap16());
const item = (code: string) => ({ role: 'item', itemCode: code }) as const;
const items = (...codes: string[]): ColumnMapping => Object.fromEntries(codes.map((c) => [c, item(c)]));

export const CORPUS: CorpusEntry[] = [
  { name: 'zero bytes', bytes: new Uint8Array(0), expect: { error: /is empty \(0 bytes\)/ } },
  { name: 'only blank space', bytes: utf8('  \n\t\n \r\n'), expect: { error: /only blank space/ } },
  {
    name: 'header only',
    bytes: utf8('id,tc1,tc2\n'),
    expect: { error: /header row but no data rows after row 1/, row: 1 },
  },
  {
    name: 'header then blank lines',
    bytes: utf8('id,tc1,tc2\n\n\n'),
    expect: { error: /header row but no data rows after row 1/, row: 1 },
  },
  {
    name: 'ragged row, too few fields',
    bytes: utf8('id,tc1,tc2\nr1,2,3\nr2,3\nr3,4,5\n'),
    expect: {
      error: /row 3: has 2 field\(s\) but the header has 3; column 3 \('tc2'\)/,
      row: 3,
      column: 'tc2',
    },
  },
  {
    name: 'ragged row, value beyond the header',
    bytes: utf8('id,tc1\nr1,2,7\n'),
    expect: {
      error: /row 2, column 3: value '7' lies beyond the last named column/,
      row: 2,
      column: 'column 3',
    },
  },
  {
    name: 'many ragged rows',
    bytes: utf8(`id,tc1,tc2\n${Array.from({ length: 30 }, (_, i) => `r${i},1`).join('\n')}\n`),
    expect: { error: /row 2: .*; rows 3, 4, .* and \d+ more also differ/, row: 2, column: 'tc2' },
  },
  {
    name: 'repeated header',
    bytes: utf8('id,tc1,tc1\nr1,2,3\n'),
    expect: { error: /row 1, column 3: the header 'tc1' repeats column 2/, row: 1, column: 'tc1' },
  },
  {
    name: 'empty header inside',
    bytes: utf8('id,,tc2\nr1,2,3\n'),
    expect: { error: /row 1, column 2: the header is empty/, row: 1, column: 'column 2' },
  },
  {
    name: 'empty first header',
    bytes: utf8(',tc1\n1,2\n'),
    expect: { error: /row 1, column 1: the header is empty/, row: 1, column: 'column 1' },
  },
  {
    name: 'headers differing only in case',
    bytes: utf8('id,TC1,tc1\nr1,2,3\n'),
    expect: { warnings: [/columns 2 \('TC1'\) and 3 \('tc1'\) differ only in letter case/] },
  },
  {
    name: 'binary junk with NUL bytes',
    bytes: Uint8Array.from({ length: 512 }, (_, i) => (i * 97 + 13) % 256),
    expect: { error: /does not look like a text table/ },
  },
  {
    name: 'control characters without NUL',
    bytes: Uint8Array.from({ length: 400 }, (_, i) => [65, 1, 2, 44, 3, 10][i % 6]),
    expect: { error: /does not look like a text table: \d+ control characters/ },
  },
  {
    name: 'PNG image',
    bytes: Uint8Array.from([
      0x89, 0x50, 0x4e, 0x47, 0x0d, 0x0a, 0x1a, 0x0a, 0, 0, 0, 0x0d, 0x49, 0x48, 0x44, 0x52,
    ]),
    expect: { error: /does not look like a text table/ },
  },
  {
    name: 'workbook given as text',
    bytes: Uint8Array.from([0x50, 0x4b, 0x03, 0x04, 0x14, 0, 0, 0, 8, 0]),
    expect: { error: /ZIP archive \(an \.xlsx workbook\?\)/ },
  },
  {
    name: 'unterminated quote',
    bytes: utf8('id,tc1,tc2\nr1,2,3\nr2,"3,4\nr3,5,6\n'),
    expect: {
      error: /row 3, column 2 \('tc1'\).*: a quoted field is opened and never closed/,
      row: 3,
      column: 'tc1',
    },
  },
  {
    name: 'text after a closing quote',
    bytes: utf8('id,tc1,tc2\nr1,"2"x,3\n'),
    expect: { error: /row 2, column 2 \('tc1'\).*text follows the closing quote/, row: 2, column: 'tc1' },
  },
  {
    name: 'space separated (no known delimiter)',
    bytes: utf8('id tc1 tc2\nr1 2 3\n'),
    expect: { warnings: [/no comma, semicolon, tab or pipe splits the header row/] },
  },
  {
    name: 'wrong delimiter given',
    bytes: utf8('id,tc1,tc2\nr1,2,3\n'),
    parse: { delimiter: ';' },
    dataset: { mapping: items('tc1') },
    expect: {
      error: /the mapping names column 'tc1', which is not in the file's header/,
      column: 'tc1',
    },
  },
  {
    name: 'unusable delimiter given',
    bytes: utf8('id,tc1\nr1,2\n'),
    parse: { delimiter: '"' },
    expect: { error: /delimiter """ cannot be used/ },
  },
  {
    name: 'mixed decimal marks',
    bytes: utf8('id;tc1;tc2\nr1;2,5;3.5\nr2;1,5;2,5\n'),
    dataset: { mapping: items('tc1', 'tc2') },
    expect: {
      warnings: [/both decimal marks occur \(1 cells with a point, 3 with a comma\)/],
      problems: [{ row: 2, column: 'tc2', message: /'3\.5' uses the other decimal mark/ }],
    },
  },
  {
    name: 'text in an item column',
    bytes: utf8('id,tc1,tc2\nr1,2,3\nr2,often,4\n'),
    dataset: { mapping: items('tc1', 'tc2') },
    expect: { problems: [{ row: 3, column: 'tc1', message: /'often' is not a number/ }] },
  },
  {
    // IEEE 754 binary64 (the open standard for JavaScript numbers) holds nothing above about 1.8e308.
    name: 'a number beyond the range of doubles',
    bytes: utf8('id,tc1,tc2\nr1,2,3\nr2,1e999,4\nr3,5,-1e400\n'),
    dataset: { mapping: items('tc1', 'tc2') },
    expect: {
      problems: [
        { row: 3, column: 'tc1', message: /'1e999' is beyond the largest number that can be held/ },
        { row: 4, column: 'tc2', message: /'-1e400' is beyond the largest number that can be held/ },
      ],
    },
  },
  {
    // IEEE 754 binary64 has a 53-bit significand: 2^53 + 1 = 9007199254740993 is rounded to 2^53.
    name: 'whole numbers above 2^53',
    bytes: utf8('id,tc1,trips\nr1,2,12\nr2,3,9007199254740993\nr3,4,18014398509481985\n'),
    dataset: { mapping: { tc1: item('tc1'), trips: { role: 'criterion' } } },
    expect: {
      warnings: [
        /^row 3, column 'trips': 9007199254740993 cannot be held exactly and is read as 9007199254740992 .*; so are 1 more cell/,
      ],
      problems: [],
    },
  },
  {
    name: 'undeclared missing code out of range',
    bytes: utf8('id,tc1,tc2\nr1,-99,3\nr2,4,6\n'),
    dataset: { mapping: items('tc1', 'tc2'), options: { scaleMin: 1, scaleMax: 5 } },
    expect: {
      problems: [
        {
          row: 2,
          column: 'tc1',
          message: /value -99 is outside the declared scale 1 to 5 \(kept as is, not clipped\)/,
        },
        { row: 3, column: 'tc2', message: /value 6 is outside the declared scale/ },
      ],
    },
  },
  {
    name: 'inconsistent scale bounds',
    bytes: utf8('id,tc1\nr1,2\n'),
    dataset: { mapping: items('tc1'), options: { scaleMin: 5, scaleMax: 1 } },
    expect: { error: /the minimum 5 must be below the maximum 1/ },
  },
  {
    name: 'empty respondent id',
    bytes: utf8('id,tc1\nr1,2\n ,3\n'),
    dataset: { mapping: { id: { role: 'id' }, tc1: item('tc1') } },
    expect: { problems: [{ row: 3, column: 'id', message: /the respondent id is empty; named 'row 3'/ }] },
  },
  {
    name: 'two columns for one item',
    bytes: utf8('id,tc1,tc1b\nr1,2,3\n'),
    dataset: { mapping: { tc1: item('TC1'), tc1b: item('tc1') } },
    expect: { error: /columns 'tc1' and 'tc1b' are both mapped to item tc1/, column: 'tc1b' },
  },
  {
    name: 'attention check without an answer key',
    bytes: utf8('id,tc1,att\nr1,2,3\n'),
    dataset: { mapping: { tc1: item('tc1'), att: { role: 'attention', correctAnswer: ' ' } } },
    expect: { error: /attention check 'att' needs the correct answer/, column: 'att' },
  },
  {
    name: 'too large for the limit',
    bytes: utf8(`id,tc1\n${'r,1\n'.repeat(100)}`),
    parse: { maxBytes: 200 },
    expect: { error: /is 407 bytes, above the limit of 200 bytes/ },
  },
  {
    name: 'UTF-16LE without BOM',
    bytes: utf16le('id,tc1\nr1,2\n'),
    expect: { warnings: [/no byte-order mark; read as utf-16le/] },
  },
  {
    name: 'UTF-16BE without BOM',
    bytes: utf16be('id,tc1\nr1,2\n'),
    expect: { warnings: [/no byte-order mark; read as utf-16be/] },
  },
  {
    name: 'UTF-16LE with BOM but an odd byte count',
    bytes: Uint8Array.from([...utf16le('\ufeffid,tc1\nr1,2\n'), 0x41]),
    expect: { error: /is not valid utf-16le/ },
  },
  {
    name: 'Windows-1252 text',
    bytes: Uint8Array.from([...utf8('id,caf'), 0xe9, ...utf8('\nr1,2\n')]),
    expect: { warnings: [/not valid UTF-8; read as Windows-1252/] },
  },
  {
    name: 'invalid UTF-8 when UTF-8 is requested',
    bytes: Uint8Array.from([...utf8('id,caf'), 0xe9, ...utf8('\nr1,2\n')]),
    parse: { encoding: 'utf-8' },
    expect: { error: /is not valid UTF-8 as requested/ },
  },
  {
    name: 'unknown encoding requested',
    bytes: utf8('id,tc1\nr1,2\n'),
    parse: { encoding: 'ebcdic' },
    expect: { error: /unknown encoding "ebcdic"/ },
  },
  {
    name: 'blank rows inside the data',
    bytes: utf8('id,tc1\nr1,2\n\n , \nr2,3\n'),
    expect: { warnings: [/skipped blank row\(s\) 3, 4/] },
  },
  {
    name: 'delimiter at the end of every line',
    bytes: utf8('id,tc1,\nr1,2,\nr2,3,\n'),
    expect: { warnings: [/ignored 1 column\(s\) without a header/] },
  },
  {
    name: 'value under a column without a header',
    bytes: utf8('id,tc1,\nr1,2,\nr2,3,9\n'),
    expect: {
      error: /row 3, column 3: value '9' lies beyond the last named column/,
      row: 3,
      column: 'column 3',
    },
  },
  { name: 'old Mac line endings', bytes: utf8('id,tc1\rr1,2\rr2,3\r'), expect: { warnings: [] } },
  {
    name: 'BOM, semicolons and decimal commas',
    bytes: utf8('\ufeffid;tc1;tc2\r\nr1;2,5;3\r\nr2;4;1,5\r\n'),
    dataset: { mapping: items('tc1', 'tc2') },
    expect: { warnings: [], problems: [] },
  },
];
