import { EngineError } from '../errors.ts';

/** z for a two-sided 95% interval as used in the MDC95 formula (common practice: 1.96). */
export const Z_95 = 1.96;

/** Standard error of measurement and the minimal detectable change built on it. */
export interface MeasurementError {
  /** Which reliability coefficient the SEM uses: alpha, or an intraclass correlation (test–retest). */
  basis: 'alpha' | 'icc';
  reliability: number;
  sdTotal: number;
  sem: number;
  mdc95: number;
}

/**
 * Standard error of measurement SEM = SD·√(1 − rₓₓ) and minimal detectable change
 * MDC95 = 1.96·√2·SEM, on the scale of the sum score.
 *
 * Source: sem.classical and sem.mdc95 (the method registry). Cost: O(1).
 * Throws EngineError when SD is negative or not finite, or rₓₓ is above 1 or not finite. A negative
 * reliability is accepted (SEM then exceeds SD); callers warn about it.
 */
export function measurementError(
  sdTotal: number,
  reliability: number,
  basis: MeasurementError['basis'] = 'alpha',
): MeasurementError {
  if (!Number.isFinite(sdTotal) || sdTotal < 0) {
    throw new EngineError(`the SEM needs a non-negative standard deviation (got ${sdTotal})`);
  }
  if (!Number.isFinite(reliability) || reliability > 1) {
    throw new EngineError(`the SEM needs a reliability of at most 1 (got ${reliability})`, 'reliability');
  }
  const sem = sdTotal * Math.sqrt(1 - reliability);
  return { basis, reliability, sdTotal, sem, mdc95: Z_95 * Math.SQRT2 * sem };
}
