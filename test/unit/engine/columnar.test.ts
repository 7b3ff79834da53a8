import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import {
  ColumnBuilder,
  columnFromBytes,
  columnToBytes,
  countMissing,
  decodeColumn,
  encodeColumn,
} from '../../../app/engine/columnar.ts';
import { EngineError } from '../../../app/engine/errors.ts';

/** Exact equality that also treats NaN as equal to NaN (missing stays missing). */
function sameValues(a: ArrayLike<number>, b: ArrayLike<number>): boolean {
  if (a.length !== b.length) return false;
  for (let i = 0; i < a.length; i++)
    if (!(a[i] === b[i] || (Number.isNaN(a[i]) && Number.isNaN(b[i])))) return false;
  return true;
}

describe('compact column layout', () => {
  it('stores a Likert item in one byte per respondent, missing as the int8 sentinel', () => {
    const col = encodeColumn([1, 5, Number.NaN, 3]);
    expect([col.kind, col.scale, Array.from(col.data)]).toEqual(['int8', 0, [1, 5, -128, 3]]);
    expect(countMissing(col)).toBe(1);
    expect(columnToBytes(col).length).toBe(16 + 4);
  });

  it('widens to a decimal scale, int16, int32, float32 and float64 only when needed', () => {
    expect(encodeColumn([1, 2.5]).kind).toBe('int8');
    expect(encodeColumn([1, 2.5]).scale).toBe(1);
    expect(encodeColumn([1, 2.5, 100]).kind).toBe('int16');
    expect(encodeColumn([-128]).kind).toBe('int16');
    expect(encodeColumn([40000]).kind).toBe('int32');
    expect(encodeColumn([0.1234]).kind).toBe('float64');
    expect(encodeColumn([0.5, 2 ** 40]).kind).toBe('float32');
    expect(encodeColumn([1e300]).kind).toBe('float64');
  });

  it('round-trips any finite doubles and NaN exactly, through the byte form too (property)', () => {
    const value = fc.oneof(
      fc.integer({ min: -200, max: 200 }),
      fc.integer({ min: -1e6, max: 1e6 }).map((k) => k / 100),
      fc.double({ noNaN: true, noDefaultInfinity: true }),
      fc.constant(Number.NaN),
    );
    fc.assert(
      fc.property(fc.array(value, { maxLength: 300 }), (values) => {
        const col = encodeColumn(values);
        const back = decodeColumn(columnFromBytes(columnToBytes(col)));
        const expected = values.map((v) => (v === 0 ? 0 : v));
        return sameValues(back, expected) && countMissing(col) === values.filter(Number.isNaN).length;
      }),
      { numRuns: 300 },
    );
  });

  it('builds the same column from int8 blocks as value by value, widening included (property)', () => {
    const int8 = fc.oneof(fc.integer({ min: -127, max: 127 }), fc.constant(-128));
    const step = fc.oneof(
      fc.array(int8, { maxLength: 40 }).map((block) => ({ block })),
      fc
        .oneof(fc.integer({ min: -40000, max: 40000 }), fc.constantFrom(2.5, -0.25, 0.001, 1.5e9, Number.NaN))
        .map((value) => ({ value })),
    );
    fc.assert(
      fc.property(fc.array(step, { maxLength: 12 }), (steps) => {
        const builder = new ColumnBuilder(4);
        const values: number[] = [];
        for (const s of steps) {
          if ('block' in s) {
            const block = Int8Array.from(s.block);
            const asValues = s.block.map((v) => (v === -128 ? Number.NaN : v));
            if (!builder.appendInt8(block)) for (const v of asValues) builder.push(v);
            values.push(...asValues);
          } else {
            builder.push(s.value);
            values.push(s.value);
          }
        }
        const col = builder.finish();
        const reference = encodeColumn(values);
        expect([col.kind, col.scale]).toEqual([reference.kind, reference.scale]);
        expect(sameValues(decodeColumn(col), values)).toBe(true);
      }),
      { numRuns: 300 },
    );
  });

  it('grows past its initial capacity', () => {
    const builder = new ColumnBuilder(2);
    for (let i = 0; i < 1000; i++) builder.push(i % 7);
    const col = builder.finish();
    expect(col.length).toBe(1000);
    expect(decodeColumn(col)[999]).toBe(999 % 7);
  });

  it('refuses infinities and damaged bytes with clear messages', () => {
    expect(() => encodeColumn([1, Number.POSITIVE_INFINITY])).toThrow(EngineError);
    const bytes = columnToBytes(encodeColumn([1, 2, 3]));
    expect(() => columnFromBytes(bytes.subarray(0, 18))).toThrow(/3 int8 values need 19 bytes, found 18/);
    const wrongMagic = Uint8Array.from(bytes);
    wrongMagic[0] = 0;
    expect(() => columnFromBytes(wrongMagic)).toThrow(/does not start with the column header/);
    const wrongKind = Uint8Array.from(bytes);
    wrongKind[4] = 9;
    expect(() => columnFromBytes(wrongKind)).toThrow(/unknown value kind 9/);
  });
});
