import { describe, expect, it } from 'vitest';
import { measurementError, Z_95 } from '../../../../app/engine/reliability/sem.ts';

const EXACT_TOL = 1e-12;

describe('measurementError', () => {
  it('SEM = SD·√(1 − r) and MDC95 = 1.96·√2·SEM (common practice)', () => {
    // SD 10 and reliability .91: SEM = 10·√.09 = 3; MDC95 = 1.96·√2·3 = 8.3156…
    const m = measurementError(10, 0.91);
    expect(Math.abs(m.sem - 3)).toBeLessThan(EXACT_TOL);
    expect(Math.abs(m.mdc95 - 1.96 * Math.SQRT2 * 3)).toBeLessThan(EXACT_TOL);
    expect(Z_95).toBe(1.96);
  });

  it('rejects a reliability above 1 and a negative SD', () => {
    expect(() => measurementError(10, 1.2)).toThrow('the SEM needs a reliability of at most 1');
    expect(() => measurementError(-1, 0.8)).toThrow('the SEM needs a non-negative standard deviation');
  });
});
