import { readFileSync } from 'node:fs';
import { describe, expect, it } from 'vitest';
import { correlationMatrix } from '../../../app/engine/linalg.ts';
import { meanScores, reverseScore, sumScores } from '../../../app/engine/scoring.ts';

const fixture = JSON.parse(
  readFileSync(new URL('../../reference/fixtures/reliability.json', import.meta.url), 'utf8'),
);

/** A correlation of exactly 1 computed in floating point. */
const UNIT_CORRELATION_TOL = 1e-12;

describe('reverseScore', () => {
  it('uses the declared bounds, never the observed ones: x′ = min + max − x', () => {
    // On a 1–5 scale, a sample that only uses 2–4 must still map 2 → 4 and 4 → 2 (reverse keying uses the declared bounds: scoring.reverse-keying, common practice).
    const data = [
      [2, 3],
      [4, 3],
      [3, null],
    ];
    expect(reverseScore(data, ['a', 'b'], ['a'], { min: 1, max: 5 })).toEqual([
      [4, 3],
      [2, 3],
      [3, null],
    ]);
    expect(data[0][0]).toBe(2);
  });

  it('reversing twice gives the data back', () => {
    const names = fixture.complete.names;
    const twice = reverseScore(
      reverseScore(fixture.complete.data, names, names, fixture.bounds),
      names,
      names,
      fixture.bounds,
    );
    expect(twice).toEqual(fixture.complete.data);
  });

  it('names the respondent and item of a value outside the bounds, and an unknown item', () => {
    expect(() => reverseScore([[1], [7]], ['q1'], ['q1'], { min: 1, max: 5 })).toThrow(
      'respondent 2, item "q1": value 7 lies outside the declared bounds 1–5',
    );
    expect(() => reverseScore([[1]], ['q1'], ['q9'], { min: 1, max: 5 })).toThrow(
      'reverse-keyed item "q9" is not among the items',
    );
    expect(() => reverseScore([[1]], ['q1'], ['q1'], { min: 5, max: 1 })).toThrow(
      'scale bounds need min below max',
    );
  });
});

describe('sum and mean scores', () => {
  it('correlate exactly 1 (the mean is the sum divided by a constant k)', () => {
    const data = fixture.complete.data;
    const sums = sumScores(data) as number[];
    const means = meanScores(data) as number[];
    const r = correlationMatrix(sums.map((s, i) => [s, means[i]]));
    expect(Math.abs(r[0][1] - 1)).toBeLessThan(UNIT_CORRELATION_TOL);
  });

  it('sum is null with any missing answer; mean uses the answered items above the minimum', () => {
    const data = [
      [1, 2, 3],
      [2, null, 4],
    ];
    expect(sumScores(data)).toEqual([6, null]);
    expect(meanScores(data)).toEqual([2, null]);
    expect(meanScores(data, 2)).toEqual([2, 3]);
    expect(() => meanScores(data, 4)).toThrow('mean scores need minAnswered between 1 and 3');
  });
});
