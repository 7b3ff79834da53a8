import { readFileSync } from 'node:fs';
import { describe, expect, it } from 'vitest';
import { iccMeasurementError, intraclassCorrelations } from '../../../app/engine/icc.ts';

const fixture = JSON.parse(
  readFileSync(new URL('../../reference/fixtures/validity.json', import.meta.url), 'utf8'),
);

// Shrout, P. E., & Fleiss, J. L. (1979). Intraclass correlations: Uses in assessing rater reliability.
// Psychological Bulletin, 86(2), 420–428. Table 2: 6 targets rated by 4 judges; the paper reports the
// six coefficients to two decimals.
const SHROUT_FLEISS_TABLE_2 = [
  [9, 2, 5, 8],
  [6, 1, 3, 2],
  [8, 4, 6, 8],
  [7, 1, 2, 6],
  [10, 5, 6, 9],
  [6, 2, 4, 7],
];
const PUBLISHED = {
  'ICC(1,1)': 0.17,
  'ICC(2,1)': 0.29,
  'ICC(3,1)': 0.71,
  'ICC(1,k)': 0.44,
  'ICC(2,k)': 0.62,
  'ICC(3,k)': 0.91,
} as const;

const TOL = 1e-9;

describe('intraclassCorrelations', () => {
  it('reproduces Shrout & Fleiss (1979), Table 2, to the published two decimals', () => {
    const result = intraclassCorrelations(SHROUT_FLEISS_TABLE_2);
    expect(result.n).toBe(6);
    expect(result.k).toBe(4);
    expect(result.forms.map((f) => f.form)).toEqual(Object.keys(PUBLISHED));
    for (const f of result.forms) expect(f.value.toFixed(2)).toBe(PUBLISHED[f.form].toFixed(2));
  });

  it('matches the scipy fixture (McGraw & Wong 1996 intervals) on two data sets and two levels', () => {
    // Fixture: test/reference/validity.py (scipy.stats.f quantiles).
    const cases = [
      [fixture.icc.shroutFleiss.data, fixture.icc.shroutFleiss.expected, 0.95],
      [fixture.icc.retest.data, fixture.icc.retest.expected, 0.95],
      [fixture.icc.retest.data, fixture.icc.retest.expected90, 0.9],
    ] as const;
    for (const [data, expected, level] of cases) {
      const result = intraclassCorrelations(data as number[][], level);
      for (const f of result.forms) {
        const e = (expected as Record<string, Record<string, number>>)[f.form];
        for (const key of ['value', 'lower', 'upper', 'F', 'df1', 'df2'] as const) {
          expect(Math.abs(f[key] - e[key]), `${f.form} ${key}`).toBeLessThan(
            1e-7 * Math.max(1, Math.abs(e[key])),
          );
        }
        expect(Math.abs(f.p - e.p) / Math.max(e.p, 1e-300), `${f.form} p`).toBeLessThan(1e-6);
        expect(f.lower).toBeLessThanOrEqual(f.value);
        expect(f.upper).toBeGreaterThanOrEqual(f.value);
      }
    }
  });

  it('labels the model, type and unit of each form', () => {
    const forms = intraclassCorrelations(SHROUT_FLEISS_TABLE_2).forms;
    expect(forms.map((f) => `${f.model}/${f.type}/${f.unit}`)).toEqual([
      'one-way random/agreement/single',
      'two-way random/agreement/single',
      'two-way mixed/consistency/single',
      'one-way random/agreement/average',
      'two-way random/agreement/average',
      'two-way mixed/consistency/average',
    ]);
  });

  it('refuses tables it cannot analyse, saying what and where', () => {
    const same = [
      [1, 1],
      [3, 3],
      [2, 2],
    ];
    expect(() => intraclassCorrelations(same)).toThrow('no residual variation');
    expect(() => intraclassCorrelations([[1, 2]])).toThrow('at least two targets');
    expect(() => intraclassCorrelations([[1], [2]])).toThrow('at least two raters');
    expect(() =>
      intraclassCorrelations([
        [1, 2],
        [3, null],
      ]),
    ).toThrow('row 2, column 2');
    expect(() =>
      intraclassCorrelations([
        [1, 2],
        [1, 2],
      ]),
    ).toThrow('same mean rating');
    expect(() => intraclassCorrelations(SHROUT_FLEISS_TABLE_2, 1)).toThrow('confidence level');
  });
});

describe('iccMeasurementError (SEM = SD·√(1 − ICC), MDC95 = 1.96·√2·SEM, common practice)', () => {
  it('pools the SD over occasions', () => {
    const data = fixture.icc.retest.data as number[][];
    const icc = intraclassCorrelations(data).forms[1].value;
    const me = iccMeasurementError(data, icc);
    // Pooled SD computed here by hand from the column variances (divisor n − 1).
    const k = data[0].length;
    const n = data.length;
    let sum = 0;
    for (let j = 0; j < k; j++) {
      const col = data.map((r) => r[j]);
      const m = col.reduce((a, b) => a + b, 0) / n;
      sum += col.reduce((a, b) => a + (b - m) ** 2, 0) / (n - 1);
    }
    const sd = Math.sqrt(sum / k);
    expect(me.basis).toBe('icc');
    expect(Math.abs(me.sdTotal - sd)).toBeLessThan(TOL);
    expect(Math.abs(me.sem - sd * Math.sqrt(1 - icc))).toBeLessThan(TOL);
    expect(Math.abs(me.mdc95 - 1.96 * Math.SQRT2 * me.sem)).toBeLessThan(TOL);
  });
});
