import { describe, expect, it } from 'vitest';
import { proposeMapping, resolveMapping } from '../../../app/import/mapping.ts';
import { TableError } from '../../../app/import/parse-table.ts';

describe('proposeMapping', () => {
  const header = ['Respondent_ID', 'TC1', 'tc2', 'rp1', 'Duration', 'district'];

  it('matches item codes without regard to case and guesses id and duration headers', () => {
    const { mapping, unmatchedItems, unmatchedColumns } = proposeMapping(header, [
      'tc1',
      'TC2',
      'rp1',
      'bh1',
    ]);
    expect(mapping).toEqual({
      Respondent_ID: { role: 'id' },
      TC1: { role: 'item', itemCode: 'tc1' },
      tc2: { role: 'item', itemCode: 'TC2' },
      rp1: { role: 'item', itemCode: 'rp1' },
      Duration: { role: 'duration' },
      district: { role: 'ignored' },
    });
    expect(unmatchedItems).toEqual(['bh1']);
    expect(unmatchedColumns).toEqual(['district']);
  });

  it('lets the researcher override any guess', () => {
    const { mapping } = proposeMapping(header, ['tc1'], {
      TC1: { role: 'criterion' },
      district: { role: 'group' },
      rp1: { role: 'attention', correctAnswer: '4' },
    });
    expect(mapping.TC1).toEqual({ role: 'criterion' });
    expect(mapping.district).toEqual({ role: 'group' });
    expect(mapping.rp1).toEqual({ role: 'attention', correctAnswer: '4' });
  });

  it('refuses an override for a column the file does not have', () => {
    expect(() => proposeMapping(header, [], { tc9: { role: 'group' } })).toThrow(
      /names column 'tc9', which is not in the file's header/,
    );
  });

  it('maps a code only once when two headers match it', () => {
    const { mapping, warnings } = proposeMapping(['tc1', 'TC1'], ['tc1']);
    expect(mapping.TC1).toEqual({ role: 'ignored' });
    expect(warnings[0]).toMatch(/column 'TC1' also matches item tc1/);
  });
});

describe('resolveMapping', () => {
  it('groups column indexes by role', () => {
    const r = resolveMapping(['id', 'tc1', 'grp', 'link', 'secs', 'att', 'crit'], {
      id: { role: 'id' },
      tc1: { role: 'item', itemCode: 'tc1' },
      grp: { role: 'group' },
      link: { role: 'retestLink' },
      secs: { role: 'duration' },
      att: { role: 'attention', correctAnswer: '2' },
      crit: { role: 'criterion' },
    });
    expect(r).toEqual({
      idColumn: 0,
      items: [{ column: 1, itemCode: 'tc1' }],
      criteria: [6],
      groups: [2],
      retestLink: 3,
      duration: 4,
      attention: [{ column: 5, correctAnswer: '2' }],
    });
  });

  it('refuses two id columns and a mapping without items', () => {
    expect(() =>
      resolveMapping(['a', 'b', 'c'], {
        a: { role: 'id' },
        b: { role: 'id' },
        c: { role: 'item', itemCode: 'x' },
      }),
    ).toThrow(/columns 'a' and 'b' are both mapped as id/);
    expect(() => resolveMapping(['a'], { a: { role: 'ignored' } })).toThrow(TableError);
  });
});

describe('proposeMapping: id and duration headers in their usual spellings', () => {
  // Common practice in survey exports: ids and response times under many names; each guess is shown
  // with its reason and the researcher confirms or changes it.
  it.each([
    ['ID'],
    ['respondent_id'],
    ['Respondent ID'],
    ['participant no.'],
    ['Case number'],
    ['resp_id'],
    ['PID'],
  ])('proposes %s as the respondent id, with its reason', (name) => {
    const { mapping, reasons } = proposeMapping([name, 'q1'], ['q1']);
    expect(mapping[name]).toEqual({ role: 'id' });
    expect(reasons[name]).toBe('its header names a respondent id');
    expect(reasons.q1).toBe('its header is item code q1');
  });

  it.each([
    ['duration_s'],
    ['Duration (sec)'],
    ['time_taken'],
    ['Time taken (seconds)'],
    ['completion time'],
    ['response_time_ms'],
  ])('proposes %s as the response duration', (name) => {
    const { mapping, reasons } = proposeMapping(['q1', name], ['q1']);
    expect(mapping[name]).toEqual({ role: 'duration' });
    expect(reasons[name]).toBe('its header names a response time');
  });

  it('leaves look-alikes alone, gives each role to the first match only, and lets the researcher change it', () => {
    const header = [
      'identity',
      'response',
      'idle',
      'party',
      'Respondent ID',
      'ID',
      'duration_s',
      'Duration (sec)',
    ];
    const { mapping, unmatchedColumns } = proposeMapping(header, []);
    expect(unmatchedColumns).toEqual(['identity', 'response', 'idle', 'party', 'ID', 'Duration (sec)']);
    expect(mapping['Respondent ID']).toEqual({ role: 'id' });
    expect(mapping.duration_s).toEqual({ role: 'duration' });
    const confirmed = proposeMapping(header, [], {
      ID: { role: 'id' },
      'Respondent ID': { role: 'ignored' },
    });
    expect(confirmed.mapping.ID).toEqual({ role: 'id' });
    expect(confirmed.mapping['Respondent ID']).toEqual({ role: 'ignored' });
  });
});
