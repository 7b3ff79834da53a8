import { readFileSync } from 'node:fs';
import { describe, expect, it } from 'vitest';
import { feldtInterval } from '../../../../app/engine/reliability/feldt.ts';

// Limits computed with scipy.stats.f.ppf by test/reference/reliability.py.
const fixture = JSON.parse(
  readFileSync(new URL('../../../reference/fixtures/reliability.json', import.meta.url), 'utf8'),
);
const REFERENCE_TOL = 1e-10;

describe('feldtInterval (Feldt 1965)', () => {
  it('matches scipy for the fixture alphas at 95% and 90%', () => {
    for (const e of [fixture.complete.expected, fixture.missing.listwise]) {
      for (const ref of [e.feldt95, e.feldt90]) {
        const ci = feldtInterval(e.alpha, e.n, e.k, ref.level);
        expect(Math.abs(ci.lower - ref.lower)).toBeLessThan(REFERENCE_TOL);
        expect(Math.abs(ci.upper - ref.upper)).toBeLessThan(REFERENCE_TOL);
        expect(ci.df1).toBe(ref.df1);
        expect(ci.df2).toBe(ref.df2);
      }
    }
  });

  it('narrows as n grows and brackets alpha', () => {
    const small = feldtInterval(0.8, 50, 10, 0.95);
    const large = feldtInterval(0.8, 5000, 10, 0.95);
    expect(small.lower).toBeLessThan(0.8);
    expect(small.upper).toBeGreaterThan(0.8);
    expect(large.upper - large.lower).toBeLessThan(small.upper - small.lower);
  });

  it('rejects too few respondents or items and a bad level', () => {
    expect(() => feldtInterval(0.8, 1, 5, 0.95)).toThrow(
      'the Feldt interval requires at least two respondents',
    );
    expect(() => feldtInterval(0.8, 10, 1, 0.95)).toThrow('the Feldt interval requires at least two items');
    expect(() => feldtInterval(0.8, 10, 5, 1)).toThrow(
      'the confidence level must lie strictly between 0 and 1',
    );
  });
});
