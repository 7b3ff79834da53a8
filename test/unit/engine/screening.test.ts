import { readFileSync } from 'node:fs';
import { describe, expect, it } from 'vitest';
import { EngineError } from '../../../app/engine/errors.ts';
import {
  intraIndividualVariability,
  longstring,
  MAHALANOBIS_ALPHA,
  mahalanobisDistances,
  screenRespondents,
} from '../../../app/engine/screening.ts';

/** Agreement with numpy/scipy (same formulas in double precision; the inverse is computed differently). */
const FIXTURE_TOL = 1e-9;
/** p-values far in the tail are compared relative to their size. */
const P_RELATIVE_TOL = 1e-7;
/** Floor for p-values that underflow to about zero in both libraries. */
const P_ABSOLUTE_TOL = 1e-15;

interface FixtureCase {
  n: number;
  k: number;
  items: (number | null)[][];
  durations: (number | null)[];
  expected: {
    longstring: number[];
    irv: (number | null)[];
    mahalanobis: (number | null)[];
    mahalanobisP: (number | null)[];
    missingPerRespondent: number[];
    missingPerItem: number[];
    medianDuration: number;
    speeders: number[];
    mahalanobisFlagged: number[];
  };
}

const fixture = JSON.parse(
  readFileSync(new URL('../../reference/fixtures/screening.json', import.meta.url), 'utf8'),
) as { cases: FixtureCase[] };

const toNaN = (v: number | null) => (v === null ? Number.NaN : v);

describe('screening against the numpy/scipy fixture (test/reference/screening.py)', () => {
  fixture.cases.forEach((c, caseIndex) => {
    const ids = Array.from({ length: c.n }, (_, i) => `p${i}`);
    const result = screenRespondents({
      ids,
      items: c.items.map((values, j) => ({ name: `tc${j + 1}`, values: values.map(toNaN) })),
      durations: c.durations.map(toNaN),
    });

    it(`case ${caseIndex}: longstring and IRV per respondent`, () => {
      expect(result.respondents.map((r) => r.longstring)).toEqual(c.expected.longstring);
      result.respondents.forEach((r, i) => {
        const want = c.expected.irv[i];
        if (want === null) expect(r.irv).toBeNull();
        else expect(r.irv).toBeCloseTo(want, 12);
      });
    });

    it(`case ${caseIndex}: Mahalanobis D² (numpy) and χ² p (scipy.stats.chi2.sf)`, () => {
      result.respondents.forEach((r, i) => {
        const d2 = c.expected.mahalanobis[i];
        const p = c.expected.mahalanobisP[i];
        if (d2 === null || p === null) {
          expect(r.mahalanobis).toBeNull();
          return;
        }
        expect(Math.abs((r.mahalanobis ?? Number.NaN) - d2)).toBeLessThan(FIXTURE_TOL * Math.max(1, d2));
        expect(Math.abs((r.mahalanobisP ?? Number.NaN) - p)).toBeLessThanOrEqual(
          P_RELATIVE_TOL * p + P_ABSOLUTE_TOL,
        );
      });
      const flagged = result.respondents.filter((r) => r.flags.some((f) => f.check === 'mahalanobis'));
      expect(flagged.map((r) => r.index)).toEqual(c.expected.mahalanobisFlagged);
    });

    it(`case ${caseIndex}: missing counts, median duration and speeders`, () => {
      expect(result.respondents.map((r) => r.missing)).toEqual(c.expected.missingPerRespondent);
      expect(result.missingPerItem.map((m) => m.missing)).toEqual(c.expected.missingPerItem);
      expect(result.thresholds.medianDuration).toBeCloseTo(c.expected.medianDuration, 12);
      const speeders = result.respondents.filter((r) => r.flags.some((f) => f.check === 'speeder'));
      expect(speeders.map((r) => r.index)).toEqual(c.expected.speeders);
    });

    it(`case ${caseIndex}: planted straight-liners are proposed, never removed`, () => {
      expect(result.respondents).toHaveLength(c.n);
      for (const i of [0, 1]) {
        const checks = result.respondents[i].flags.map((f) => f.check);
        expect(checks).toContain('longstring');
        expect(checks).toContain('irv');
      }
      expect(JSON.stringify(result)).not.toMatch(/NaN/);
    });
  });
});

describe('screening rules', () => {
  it('longstring: longest run, broken by a missing answer', () => {
    expect(longstring([3, 3, 3, 1, 3])).toBe(3);
    expect(longstring([2, 2, Number.NaN, 2, 2])).toBe(2);
    expect(longstring([])).toBe(0);
  });

  it('IRV is the SD with divisor n − 1 of the answered items', () => {
    // SD of 1, 2, 3, 4 with divisor 3: sqrt(5/3), worked by hand.
    expect(intraIndividualVariability([1, 2, Number.NaN, 3, 4])).toBeCloseTo(Math.sqrt(5 / 3), 14);
    expect(intraIndividualVariability([4, Number.NaN])).toBeNull();
  });

  it('Mahalanobis needs more complete rows than items', () => {
    expect(() =>
      mahalanobisDistances([
        [1, 2],
        [2, 3],
      ]),
    ).toThrow(EngineError);
  });

  it('Mahalanobis D² averages to p·(n − 1)/n over the sample (a property of the sample covariance)', () => {
    const rows = Array.from({ length: 40 }, (_, i) => [Math.sin(i), Math.cos(3 * i), ((i * 7) % 11) / 3]);
    const { d2 } = mahalanobisDistances(rows);
    const average = d2.reduce((s, v) => s + v, 0) / d2.length;
    expect(average).toBeCloseTo((3 * 39) / 40, 10);
  });

  it('flags failed and unanswered attention checks, duplicate ids and too many missing answers', () => {
    const result = screenRespondents({
      ids: ['a', 'b', 'a', 'c'],
      items: [
        { name: 'tc1', values: [1, 2, Number.NaN, 4] },
        { name: 'tc2', values: [2, 3, Number.NaN, 1] },
        { name: 'tc3', values: [3, 1, 2, 2] },
      ],
      attention: [{ name: 'att', outcomes: ['pass', 'fail', 'missing', 'pass'] }],
      rowNumbers: [2, 3, 5, 6],
    });
    const reasons = result.respondents.map((r) => r.flags.map((f) => f.reason));
    expect(reasons[0]).toEqual(["id 'a' appears 2 times (rows 2, 5)"]);
    expect(reasons[1]).toEqual(['wrong answer to attention check att']);
    expect(reasons[2]).toEqual([
      '2 of 3 items unanswered, more than 20%',
      'attention check att left unanswered',
      "id 'a' appears 2 times (rows 2, 5)",
    ]);
    expect(reasons[3]).toEqual([]);
    expect(result.flagged).toBe(3);
    expect(result.warnings.join(' ')).toMatch(/Mahalanobis D² was not computed/);
    expect(result.thresholds.mahalanobisAlpha).toBe(MAHALANOBIS_ALPHA);
  });

  it('rejects items of the wrong length and thresholds outside [0, 1]', () => {
    expect(() => screenRespondents({ ids: ['a', 'b'], items: [{ name: 'tc1', values: [1] }] })).toThrow(
      /item tc1 has 1, ids 2/,
    );
    expect(() =>
      screenRespondents({ ids: ['a'], items: [{ name: 'tc1', values: [1] }] }, { speederFraction: 2 }),
    ).toThrow(/speeder fraction must lie between 0 and 1/);
    expect(() => screenRespondents({ ids: [], items: [] })).toThrow(/at least one item/);
  });
});
