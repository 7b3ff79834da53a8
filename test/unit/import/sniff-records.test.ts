import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { sniffRecords } from '../../../app/import/detect-format.ts';

/**
 * A text without the quote character is split line by line; the character-by-character reading it
 * replaces is still the reading of quoted text. A quote character that never opens a field (here 'x',
 * only ever inside a field) leaves that reading's records unchanged, so both readings of one text can
 * be compared.
 */
describe('sniffRecords without quotes', () => {
  const field = fc
    .array(fc.constantFrom('a', 'b', '1', ' '), { maxLength: 4 })
    .map((chars) => (chars.length > 0 ? `${chars.join('')}x` : ''));
  const text = fc.record({
    lines: fc.array(fc.array(field, { maxLength: 5 }), { maxLength: 12 }),
    breaks: fc.array(fc.constantFrom('\n', '\r\n', '\r'), { minLength: 1 }),
    delimiter: fc.constantFrom(',', ';', '\t'),
    end: fc.boolean(),
    max: fc.integer({ min: 1, max: 15 }),
  });

  it('gives the records of the character-by-character reading', () => {
    fc.assert(
      fc.property(text, ({ lines, breaks, delimiter, end, max }) => {
        let t = '';
        lines.forEach((fields, i) => {
          t += fields.join(delimiter);
          if (i < lines.length - 1 || end) t += breaks[i % breaks.length];
        });
        expect(sniffRecords(t, delimiter, '"', max)).toEqual(sniffRecords(t, delimiter, 'x', max));
      }),
      { numRuns: 500 },
    );
  });

  it('drops blank lines and splits at every delimiter', () => {
    expect(sniffRecords('id,a\r\n\r\n  \np1,2,\rp2,,3', ',', '"', 10)).toEqual([
      ['id', 'a'],
      ['p1', '2', ''],
      ['p2', '', '3'],
    ]);
  });
});
