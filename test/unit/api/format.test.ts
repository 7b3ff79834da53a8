import { describe, expect, it } from 'vitest';
import {
  MINUS,
  NO_VALUE,
  bounded,
  boundedSignificant,
  count,
  duration,
  pCell,
  pValue,
  percent,
  percentOf,
  plural,
  resampleProgress,
  unbounded,
} from '../../../app/api/format.ts';
import { createRng } from '../../../app/engine/rng.ts';
import { JOBS } from '../../../app/workers/jobs.ts';

// The conventions checked here are those of the APA Publication Manual (7th ed., 2020), sections
// 6.36 and 6.44 (from memory): no zero before the decimal point for a statistic that cannot exceed
// 1 (correlations, proportions, p), exact p to two or three decimals with "p < .001" below that, and
// thousands separated by commas in counts of 1,000 or more.

const back = (text: string) => Number(text.replace(MINUS, '-').replaceAll(',', ''));

describe('bounded statistics', () => {
  it.each([
    [0.8423, '.842'],
    [-0.1204, `${MINUS}.120`],
    [1, '1.000'],
    [-1, `${MINUS}1.000`],
    [0, '.000'],
    [-0.0001, '.000'],
    [0.9996, '1.000'],
  ])('%d → %s', (x, text) => {
    expect(bounded(x)).toBe(text);
  });

  it('takes the number of decimals and shows a dash for no value', () => {
    expect(bounded(0.78, 2)).toBe('.78');
    expect(bounded(null)).toBe(NO_VALUE);
    expect(bounded(Number.NaN)).toBe(NO_VALUE);
  });

  it('round-trips every value in [−1, 1] to its rounding, without a leading zero, hyphen or exponent', () => {
    const rng = createRng(20261201);
    const next = () => rng.next();
    for (let i = 0; i < 2_000; i++) {
      const x = 2 * next() - 1;
      const text = bounded(x);
      expect(text).not.toMatch(/^[-\u2212]?0\.|e|-/);
      expect(back(text)).toBeCloseTo(Number(x.toFixed(3)), 10);
    }
  });
});

describe('unbounded statistics', () => {
  it.each([
    [3.4149, '3.41'],
    [0.52, '0.52'],
    [-0.52, `${MINUS}0.52`],
    [-0.001, '0.00'],
    [1204.5, '1,204.50'],
    [7.39e-7, '0.00'],
  ])('%d → %s', (x, text) => {
    expect(unbounded(x)).toBe(text);
  });

  it('keeps fixed notation beyond 1e21, where toFixed would switch to an exponent', () => {
    expect(unbounded(2.5e22, 0)).toMatch(/^2[\d,]+$/);
  });
});

describe('p values', () => {
  it.each([
    [7.39e-7, '< .001', 'p < .001'],
    [0.000999, '< .001', 'p < .001'],
    [0.001, '.001', 'p = .001'],
    [0.0344, '.034', 'p = .034'],
    [0.5, '.500', 'p = .500'],
    [1, '1.000', 'p = 1.000'],
  ])('%d → %s', (p, cell, text) => {
    expect(pCell(p)).toBe(cell);
    expect(pValue(p)).toBe(text);
  });

  it('never prints exponent notation for any p in (0, 1]', () => {
    const rng = createRng(7);
    const next = () => rng.next();
    for (let i = 0; i < 1_000; i++) {
      const p = 10 ** (-12 * next());
      expect(pValue(p)).toMatch(/^p (< \.001|= (\.\d{3}|1\.000))$/);
    }
  });

  it('refuses a value outside [0, 1]', () => {
    expect(() => pCell(1.2)).toThrow(/between 0 and 1/);
  });
});

describe('counts, shares and durations', () => {
  it('separates thousands', () => {
    expect(count(1000)).toBe('1,000');
    expect(count(999)).toBe('999');
    expect(count(1234567)).toBe('1,234,567');
    expect(plural(1, 'resample')).toBe('1 resample');
    expect(plural(5000, 'resample')).toBe('5,000 resamples');
  });

  it('prints shares as percentages', () => {
    expect(percent(0.125)).toBe('12.5%');
    expect(percent(1)).toBe('100.0%');
    expect(percentOf(1, 3)).toBe('33.3%');
    expect(percentOf(1, 0)).toBe(NO_VALUE);
  });

  it.each([
    [0, '0 ms'],
    [850.4, '850 ms'],
    [2_400, '2.4 s'],
    [42_000, '42 s'],
    [185_000, '3 min 05 s'],
    [7_620_000, '2 h 07 min'],
  ])('%d ms → %s', (ms, text) => {
    expect(duration(ms)).toBe(text);
  });
});

describe('progress of a round counts what was asked', () => {
  it('names the resamples asked for, and the scale and facets they run on', () => {
    expect(resampleProgress(0, 1000, 4)).toBe(
      '1,000 resamples for the scale and 4 facets: scale, resample 0 of 1,000',
    );
    expect(resampleProgress(2600, 1000, 4)).toBe(
      '1,000 resamples for the scale and 4 facets: facet 2 of 4, resample 600 of 1,000',
    );
    expect(resampleProgress(5000, 1000, 4)).toBe(
      '1,000 resamples for the scale and 4 facets: facet 4 of 4, resample 1,000 of 1,000',
    );
    expect(resampleProgress(150, 200, 0)).toBe('200 resamples for the scale: scale, resample 150 of 200');
    expect(resampleProgress(3, 1000, 1)).toMatch(/^1,000 resamples for the scale and 1 facet:/);
  });

  it('is what the round job reports while it runs', () => {
    const rng = createRng(11);
    const data = Array.from({ length: 40 }, () => {
      const t = rng.normal();
      return [0, 1, 2, 3].map(() => Math.round(3 + t + rng.normal()));
    });
    const notes: string[] = [];
    JOBS['purification.round'](
      {
        names: ['a', 'b', 'c', 'd'],
        data,
        missing: 'listwise',
        bootstrap: { resamples: 200, seed: 5 },
        facets: [
          { facetId: 1, items: ['a', 'b'] },
          { facetId: 2, items: ['c', 'd'] },
        ],
      },
      { progress: (_done, _total, note) => note && notes.push(note), shouldStop: () => false },
    );
    expect(notes.at(-1)).toBe('200 resamples for the scale and 2 facets: facet 2 of 2, resample 200 of 200');
    expect(notes.some((n) => n.includes('5,000') || n.includes('600 resamples'))).toBe(false);
  });
});

describe('boundedSignificant', () => {
  it('prints small bounded values to three significant digits, never in exponent notation', () => {
    // Checked by hand against the decimal expansions of the inputs.
    expect(boundedSignificant(0.0991)).toBe('.0991');
    expect(boundedSignificant(1.234e-5)).toBe('.0000123');
    expect(boundedSignificant(7.39e-7)).toBe('.000000739');
    expect(boundedSignificant(0.5)).toBe('.500');
    expect(boundedSignificant(-2.5e-4)).toBe('\u2212.000250');
    expect(boundedSignificant(1e-15)).toBe('.000000000000');
    expect(boundedSignificant(null)).toBe('\u2013');
  });
});
