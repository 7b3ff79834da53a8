import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { normalQuantile } from '../../../../app/engine/distributions.ts';
import { variance } from '../../../../app/engine/numeric.ts';
import { measurementError } from '../../../../app/engine/reliability/sem.ts';

/*
 * The SEM checked against its definition rather than its formula: in classical test theory
 * (Lord & Novick 1968) an observed score is X = T + E with error uncorrelated with the true score,
 * reliability is var(T)/var(X) and the SEM is the standard deviation of E. Built so that the sample
 * covariance of T and E is exactly zero, SD_X·√(1 − var(T)/var(X)) must equal SD_E.
 */

/** Sample of n true scores and errors, the errors made exactly uncorrelated with the true scores. */
const sample = fc.integer({ min: 5, max: 60 }).chain((n) =>
  fc
    .record({
      t: fc.array(fc.double({ min: 0, max: 50, noNaN: true }), { minLength: n, maxLength: n }),
      e: fc.array(fc.double({ min: -10, max: 10, noNaN: true }), { minLength: n, maxLength: n }),
    })
    .map(({ t, e }) => {
      const mt = t.reduce((s, x) => s + x, 0) / n;
      const me = e.reduce((s, x) => s + x, 0) / n;
      const tc = t.map((x) => x - mt);
      const ec = e.map((x) => x - me);
      const tt = tc.reduce((s, x) => s + x * x, 0);
      const te = tc.reduce((s, x, i) => s + x * ec[i], 0);
      const orthogonal = tt === 0 ? ec : ec.map((x, i) => x - (te / tt) * tc[i]);
      return { t, e: orthogonal };
    })
    .filter(({ t, e }) => variance(t) > 1e-6 && variance(e) > 1e-6),
);

describe('measurementError against classical test theory', () => {
  it('the SEM from SD_X and reliability var(T)/var(X) is the SD of the errors', () => {
    fc.assert(
      fc.property(sample, ({ t, e }) => {
        const x = t.map((v, i) => v + e[i]);
        const reliability = variance(t) / variance(x);
        const m = measurementError(Math.sqrt(variance(x)), reliability);
        expect(m.sem).toBeCloseTo(Math.sqrt(variance(e)), 8);
      }),
      { numRuns: 80, seed: 20261201 },
    );
  });

  it('MDC95 is the 95% limit of a difference of two independent measurements: z(.975)·√2·SEM', () => {
    // Weir (2005): MDC = SEM·1.96·√2; 1.96 is z(.975) = 1.959964… rounded, as the trade writes it.
    const m = measurementError(10, 0.91);
    const exact = normalQuantile(0.975) * Math.SQRT2 * m.sem;
    expect(Math.abs(m.mdc95 - exact) / exact).toBeLessThan(2e-5);
  });

  it('a perfectly reliable score has no measurement error; a useless one has the SD as its SEM', () => {
    expect(measurementError(7, 1).sem).toBe(0);
    expect(measurementError(7, 0).sem).toBe(7);
  });

  it('rejects a reliability above 1 and a negative SD, naming which', () => {
    expect(() => measurementError(10, 1.2)).toThrow('the SEM needs a reliability of at most 1');
    expect(() => measurementError(-1, 0.8)).toThrow('the SEM needs a non-negative standard deviation');
  });
});
