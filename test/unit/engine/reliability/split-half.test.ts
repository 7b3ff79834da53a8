import { readFileSync } from 'node:fs';
import { describe, expect, it } from 'vitest';
import { covarianceMatrix } from '../../../../app/engine/linalg.ts';
import { oddEvenSplitHalf } from '../../../../app/engine/reliability/split-half.ts';

// numpy: corrcoef of x[:, 0::2].sum(1) and x[:, 1::2].sum(1), test/reference/reliability.py.
const fixture = JSON.parse(
  readFileSync(new URL('../../../reference/fixtures/reliability.json', import.meta.url), 'utf8'),
);

describe('oddEvenSplitHalf', () => {
  it('matches numpy and says which items went where', () => {
    const s = oddEvenSplitHalf(fixture.complete.names, covarianceMatrix(fixture.complete.data));
    expect(s.method).toBe('odd-even');
    expect(s.firstHalf).toEqual(['traffic1', 'route1', 'handling1', 'repair1']);
    expect(s.secondHalf).toEqual(['traffic2', 'route2', 'handling2']);
    expect(s.correlation).toBeCloseTo(fixture.complete.expected.splitHalf.correlation, 12);
    expect(s.spearmanBrown).toBeCloseTo(fixture.complete.expected.splitHalf.spearmanBrown, 12);
  });

  it('gives no step-up when the halves correlate negatively', () => {
    const s = oddEvenSplitHalf(
      ['a', 'b'],
      [
        [1, -0.4],
        [-0.4, 1],
      ],
    );
    expect(s.correlation).toBeCloseTo(-0.4, 14);
    expect(s.spearmanBrown).toBeNull();
    expect(() => oddEvenSplitHalf(['a'], [[1]])).toThrow(
      'split-half reliability requires at least two items',
    );
  });
});
