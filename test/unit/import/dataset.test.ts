import { describe, expect, it } from 'vitest';
import { buildDataset, DEFAULT_MAX_PROBLEMS } from '../../../app/import/dataset.ts';
import type { ColumnMapping } from '../../../app/import/mapping.ts';
import { parseTable } from '../../../app/import/parse-table.ts';
import { utf8 } from '../../helpers/bytes.ts';

const item = (code: string) => ({ role: 'item', itemCode: code }) as const;

describe('buildDataset', () => {
  const csv = [
    'id;tc1;tc2;rp1;district;link;secs;att;commute_km',
    'r1;1;2,5;NA;north;L1;300;3;4,2',
    'r2;6;x;-99;south;L2;20;2;',
    'r3;3;1,5;4;NA;L3;310;3;12',
  ].join('\n');
  const mapping: ColumnMapping = {
    id: { role: 'id' },
    tc1: item('TC1'),
    tc2: item('TC2'),
    rp1: item('RP1'),
    district: { role: 'group' },
    link: { role: 'retestLink' },
    secs: { role: 'duration' },
    att: { role: 'attention', correctAnswer: '3' },
    commute_km: { role: 'criterion' },
  };
  const d = buildDataset(parseTable(utf8(csv)), mapping, {
    missingCodes: { text: ['NA'], numeric: [-99] },
    scaleMin: 1,
    scaleMax: 5,
  });

  it('reads every role, with the decimal comma detected', () => {
    expect(d.decimalMark).toBe(',');
    expect(d.ids).toEqual(['r1', 'r2', 'r3']);
    expect(d.rowNumbers).toEqual([2, 3, 4]);
    const byName = Object.fromEntries(d.columns.map((c) => [c.name, Array.from(c.values)]));
    expect(byName.tc1).toEqual([1, 6, 3]);
    expect(byName.tc2).toEqual([2.5, Number.NaN, 1.5]);
    expect(byName.rp1).toEqual([Number.NaN, Number.NaN, 4]);
    expect(byName.secs).toEqual([300, 20, 310]);
    expect(byName.commute_km).toEqual([4.2, Number.NaN, 12]);
    expect(d.columns.map((c) => c.role)).toEqual(['item', 'item', 'item', 'duration', 'criterion']);
    expect(d.columns.find((c) => c.name === 'tc1')?.itemCode).toBe('TC1');
    expect(d.groups).toEqual([{ name: 'district', values: ['north', 'south', ''] }]);
    expect(d.retestLinks).toEqual({ name: 'link', values: ['L1', 'L2', 'L3'] });
    expect(d.attention[0].outcomes).toEqual(['pass', 'fail', 'pass']);
  });

  it('lists out-of-range values and text by row and column, keeping the raw value', () => {
    expect(d.problems.map((p) => [p.row, p.column])).toEqual([
      [3, 'tc1'],
      [3, 'tc2'],
    ]);
    expect(d.problems[0].message).toBe(
      "row 3, column 'tc1': value 6 is outside the declared scale 1 to 5 (kept as is, not clipped)",
    );
    expect(d.columns[0].values[1]).toBe(6);
    expect(d.columns.map((c) => c.missing)).toEqual([0, 1, 2, 0, 1]);
  });

  it('names respondents by row when there is no id column', () => {
    const t = parseTable(utf8('tc1\n1\n2\n'));
    const plain = buildDataset(t, { tc1: item('tc1') });
    expect(plain.ids).toEqual(['row 2', 'row 3']);
    expect(plain.warnings[0]).toMatch(/no column is mapped as the respondent id/);
  });

  it('lists the first problems and counts the rest', () => {
    const rows = Array.from({ length: DEFAULT_MAX_PROBLEMS + 5 }, () => 'x').join('\n');
    const many = buildDataset(parseTable(utf8(`tc1\n${rows}\n`)), { tc1: item('tc1') });
    expect(many.problems).toHaveLength(DEFAULT_MAX_PROBLEMS);
    expect(many.problemCount).toBe(DEFAULT_MAX_PROBLEMS + 5);
    expect(many.warnings.join(' ')).toMatch(/1005 cells need a look; the first 1000 are listed/);
  });

  it('compares text attention answers without regard to case', () => {
    const t = parseTable(utf8('tc1,att\n1,Blue\n2,red\n3,\n'));
    const ds = buildDataset(t, { tc1: item('tc1'), att: { role: 'attention', correctAnswer: 'blue' } });
    expect(ds.attention[0].outcomes).toEqual(['pass', 'fail', 'missing']);
  });
});
