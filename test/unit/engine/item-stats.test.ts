import { readFileSync } from 'node:fs';
import { describe, expect, it } from 'vitest';
import { correctedItemTotal, itemDescriptives, itemMoments } from '../../../app/engine/item-stats.ts';

// Expected values: test/reference/reliability.py (numpy; scipy.stats.skew/kurtosis with bias=False).
const fixture = JSON.parse(
  readFileSync(new URL('../../reference/fixtures/reliability.json', import.meta.url), 'utf8'),
);

describe('itemDescriptives', () => {
  it('matches numpy/scipy: mean, SD (n − 1), G1, G2, floor and ceiling shares', () => {
    const d = itemDescriptives(fixture.complete.names, fixture.complete.data, fixture.bounds);
    d.forEach((item, i) => {
      const e = fixture.complete.expected.items[i];
      expect(item.mean).toBeCloseTo(e.mean, 12);
      expect(item.sd).toBeCloseTo(e.sd, 12);
      expect(item.skewness).toBeCloseTo(e.skewness, 10);
      expect(item.kurtosis).toBeCloseTo(e.kurtosis, 10);
      expect(item.floorShare).toBeCloseTo(e.floorShare, 14);
      expect(item.ceilingShare).toBeCloseTo(e.ceilingShare, 14);
    });
  });

  it('counts missing answers, gives null shape statistics without variance and null shares without bounds', () => {
    const d = itemDescriptives(
      ['a', 'b'],
      [
        [1, 3],
        [null, 3],
        [2, 3],
        [4, 3],
      ],
    );
    expect(d[0].missing).toBe(1);
    expect(d[0].n).toBe(3);
    expect(d[0].kurtosis).toBeNull();
    expect(d[1].skewness).toBeNull();
    expect(d[1].sd).toBe(0);
    expect(d[0].floorShare).toBeNull();
  });

  it('needs two answered values per item', () => {
    expect(() => itemDescriptives(['a'], [[1], [null]])).toThrow(
      'item "a" has 1 answered value(s); item statistics require at least two',
    );
  });
});

describe('itemMoments', () => {
  it('pairwise: matches the numpy pairwise correlations and the smallest pair n', () => {
    const m = itemMoments(fixture.missing.names, fixture.missing.data, 'pairwise');
    expect(m.minPairN).toBe(fixture.missing.pairwise.minPairN);
    m.correlation.forEach((row, i) => {
      row.forEach((r, j) => {
        expect(r).toBeCloseTo(fixture.missing.pairwise.correlation[i][j], 12);
      });
    });
  });

  it('refuses a pair answered together by fewer than two respondents', () => {
    expect(() =>
      itemMoments(
        ['a', 'b'],
        [
          [1, null],
          [2, null],
          [null, 3],
          [3, 4],
        ],
        'pairwise',
      ),
    ).toThrow(
      'items "a" and "b" were answered together by 1 respondent(s); pairwise deletion requires at least two',
    );
  });

  it('names the items when one does not vary on the respondents they share', () => {
    expect(() =>
      itemMoments(
        ['a', 'b'],
        [
          [1, 2],
          [1, 3],
          [2, null],
          [1, 4],
        ],
        'pairwise',
      ),
    ).toThrow('"a" does not vary among the 3 respondents who answered both');
  });
});

describe('correctedItemTotal', () => {
  it('matches numpy corrcoef(item, sum of the other items)', () => {
    const m = itemMoments(fixture.complete.names, fixture.complete.data, 'listwise');
    correctedItemTotal(m.covariance).forEach((r, i) => {
      expect(r).toBeCloseTo(fixture.complete.expected.items[i].correctedItemTotal, 12);
    });
  });
});
