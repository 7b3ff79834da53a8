import { readFileSync } from 'node:fs';
import { describe, expect, it } from 'vitest';
import {
  normTable,
  percentileRank,
  ruleScores,
  scoreGrid,
  type ScoreRule,
} from '../../../app/engine/norms.ts';

/** Values computed by test/reference/norms.py (numpy and scipy.stats.percentileofscore, kind="mean"). */
const fixture = JSON.parse(
  readFileSync(new URL('../../reference/fixtures/norms.json', import.meta.url), 'utf8'),
) as {
  bounds: { min: number; max: number };
  answers: (number | null)[][];
  cases: {
    rule: ScoreRule;
    minAnswered: number;
    scores: (number | null)[];
    norms: {
      n: number;
      mean: number;
      sd: number;
      rows: { score: number; percentile: number; z: number; t: number }[];
    };
  }[];
};

const DIGITS = 10;

describe('norms against numpy and scipy (test/reference/norms.py)', () => {
  for (const c of fixture.cases) {
    it(`${c.rule} rule with at least ${c.minAnswered} answered items`, () => {
      const scores = ruleScores(fixture.answers, c.rule, c.minAnswered);
      expect(scores.map((s) => s === null)).toEqual(c.scores.map((s) => s === null));
      scores.forEach((s, i) => {
        if (s !== null) expect(s).toBeCloseTo(c.scores[i] as number, DIGITS);
      });
      const grid = scoreGrid(fixture.answers[0].length, fixture.bounds, c.rule);
      expect(grid).toEqual(c.norms.rows.map((r) => r.score));
      const table = normTable(scores, grid);
      expect(table.n).toBe(c.norms.n);
      expect(table.unscored).toBe(scores.length - c.norms.n);
      expect(table.mean).toBeCloseTo(c.norms.mean, DIGITS);
      expect(table.sd).toBeCloseTo(c.norms.sd, DIGITS);
      table.rows.forEach((row, i) => {
        expect(row.percentile).toBeCloseTo(c.norms.rows[i].percentile, DIGITS);
        expect(row.z).toBeCloseTo(c.norms.rows[i].z, DIGITS);
        expect(row.t).toBeCloseTo(c.norms.rows[i].t, DIGITS);
      });
    });
  }
});

describe('percentileRank', () => {
  it('counts half of the tied scores (the mid-point definition)', () => {
    // scipy.stats.percentileofscore([1, 2, 3, 4], 3, kind="mean") is 62.5 (computed with scipy 1.10.1).
    expect(percentileRank([1, 2, 3, 4], 3)).toBe(62.5);
    // scipy's documentation example: percentileofscore([1, 2, 3, 3, 4], 3, kind="mean") is 60.
    expect(percentileRank([1, 2, 3, 3, 4], 3)).toBe(60);
    expect(percentileRank([1, 2, 3], 0)).toBe(0);
    expect(percentileRank([1, 2, 3], 9)).toBe(100);
  });

  it('refuses an empty sample', () => {
    expect(() => percentileRank([], 1)).toThrow('at least one score');
  });
});

describe('normTable and ruleScores refusals', () => {
  it('needs two scores that vary', () => {
    expect(() => normTable([3, null], [3])).toThrow('at least two scored respondents (got 1)');
    expect(() => normTable([3, 3, 3], [3])).toThrow('every respondent has the same score');
  });

  it('names an impossible missing-answer allowance', () => {
    expect(() => ruleScores([[1, 2]], 'sum', 3)).toThrow('between 1 and 2 answered items (got 3)');
    expect(() => scoreGrid(0, { min: 1, max: 5 }, 'sum')).toThrow('at least one item');
  });

  it('gives a complete respondent the plain sum and mean', () => {
    expect(ruleScores([[1, 2, 4]], 'sum', 2)).toEqual([7]);
    expect(ruleScores([[1, 2, 4]], 'mean', 3)).toEqual([7 / 3]);
    expect(ruleScores([[1, null, 4]], 'sum', 2)).toEqual([7.5]);
    expect(ruleScores([[1, null, null]], 'sum', 2)).toEqual([null]);
  });
});
