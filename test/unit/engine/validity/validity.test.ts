import { readFileSync } from 'node:fs';
import { describe, expect, it } from 'vitest';
import {
  correlate,
  criterionCorrelation,
  fisherInterval,
} from '../../../../app/engine/validity/correlation.ts';
import { oneWayAnova, welchComparison } from '../../../../app/engine/validity/groups.ts';
import { evaluateHypothesis, strengthBand } from '../../../../app/engine/validity/hypotheses.ts';
import { regressOnScore } from '../../../../app/engine/validity/regression.ts';
import { scaleScores } from '../../../../app/engine/validity/scores.ts';

// Fixture: test/reference/validity.py (scipy.stats.pearsonr, ttest_ind, f_oneway; statsmodels OLS).
const fixture = JSON.parse(
  readFileSync(new URL('../../../reference/fixtures/validity.json', import.meta.url), 'utf8'),
);
const rel = (a: number, b: number) => Math.abs(a - b) / Math.max(1, Math.abs(b));

describe('correlations with Fisher-z intervals', () => {
  it('match scipy.stats.pearsonr and tanh(atanh r ± z/√(n − 3))', () => {
    const c = fixture.correlation;
    const est = correlate(c.score, c.criterion);
    expect(rel(est.r, c.r)).toBeLessThan(1e-12);
    expect(Math.abs(est.p - c.p) / c.p).toBeLessThan(1e-6);
    expect(rel(est.lower, c.ci95[0])).toBeLessThan(1e-10);
    expect(rel(est.upper, c.ci95[1])).toBeLessThan(1e-10);
    const at90 = correlate(c.score, c.criterion, 0.9);
    expect(rel(at90.lower, c.ci90[0])).toBeLessThan(1e-10);
    const f = fisherInterval(c.fisherOnly.r, c.fisherOnly.n);
    expect(rel(f.lower, c.fisherOnly.ci95[0])).toBeLessThan(1e-10);
    expect(rel(f.upper, c.fisherOnly.ci95[1])).toBeLessThan(1e-10);
  });

  it('leaves out incomplete pairs and corrects for attenuation with the stored reliabilities', () => {
    const c = fixture.correlation;
    const withGaps = [...c.score, null, 5];
    const crit = [...c.criterion, 1, null];
    const est = criterionCorrelation('weekly riding hours', withGaps, crit, {
      timing: 'predictive',
      reliabilityScore: 0.81,
      reliabilityCriterion: 0.64,
    });
    expect(est.n).toBe(c.score.length);
    expect(est.timing).toBe('predictive');
    // Spearman (1904): r / √(rxx·ryy) = r / (.9·.8).
    expect(rel(est.disattenuated ?? 0, c.r / 0.72)).toBeLessThan(1e-12);
    expect(() => correlate([1, 2, 3], [1, 2, 3])).toThrow('at least 4 complete pairs');
    expect(() => correlate([1, 1, 1, 1], [1, 2, 3, 4])).toThrow('two variables that vary');
    expect(() => fisherInterval(0.3, 3)).toThrow('more than 3 cases');
  });
});

describe('regression of a criterion on the score', () => {
  it('matches statsmodels OLS', () => {
    const c = fixture.correlation;
    const e = fixture.regression;
    const r = regressOnScore(c.criterion, c.score);
    for (const k of [
      'intercept',
      'slope',
      'interceptSE',
      'slopeSE',
      't',
      'slopeLower',
      'slopeUpper',
      'rSquared',
    ] as const) {
      expect(rel(r[k], e[k]), k).toBeLessThan(1e-9);
    }
    expect(Math.abs(r.p - e.p) / e.p).toBeLessThan(1e-6);
    expect(rel(r.standardizedSlope, fixture.correlation.r)).toBeLessThan(1e-10);
  });
});

describe('known groups', () => {
  it("Welch's t, its df and interval, Cohen's d and Hedges' g match scipy", () => {
    const k = fixture.knownGroups;
    const w = welchComparison(
      { name: 'daily riders', values: k.a },
      { name: 'occasional riders', values: k.b },
    );
    for (const key of ['t', 'df', 'difference', 'lower', 'upper', 'cohensD', 'hedgesG'] as const) {
      expect(rel(w[key], k.welch[key]), key).toBeLessThan(1e-9);
    }
    expect(Math.abs(w.p - k.welch.p) / k.welch.p).toBeLessThan(1e-6);
  });

  it('one-way ANOVA for three groups matches scipy.stats.f_oneway', () => {
    const k = fixture.knownGroups;
    const a = oneWayAnova([
      { name: 'daily', values: k.a },
      { name: 'occasional', values: k.b },
      { name: 'weekend', values: k.c },
    ]);
    expect(rel(a.F, k.anova.F)).toBeLessThan(1e-9);
    expect(Math.abs(a.p - k.anova.p) / k.anova.p).toBeLessThan(1e-6);
    expect([a.df1, a.df2]).toEqual([k.anova.df1, k.anova.df2]);
    expect(() => oneWayAnova([{ name: 'x', values: [1, 2] }])).toThrow('at least two groups');
    expect(() => welchComparison({ name: 'x', values: [1] }, { name: 'y', values: [1, 2] })).toThrow(
      'group "x" has 1 score(s)',
    );
  });
});

describe('hypotheses from the construct phase (bands: Cohen 1988, common practice)', () => {
  it('applies the stated rule', () => {
    const moderatePositive = { sign: 'positive', strength: 'moderate' } as const;
    expect(evaluateHypothesis(moderatePositive, { estimate: 0.42, lower: 0.3, upper: 0.52 }).verdict).toBe(
      'supported',
    );
    expect(evaluateHypothesis(moderatePositive, { estimate: 0.62, lower: 0.5, upper: 0.7 }).verdict).toBe(
      'partly supported',
    );
    expect(evaluateHypothesis(moderatePositive, { estimate: 0.1, lower: -0.05, upper: 0.25 }).verdict).toBe(
      'not supported',
    );
    expect(evaluateHypothesis(moderatePositive, { estimate: -0.4, lower: -0.5, upper: -0.3 }).verdict).toBe(
      'not supported',
    );
    const none = { sign: 'none', strength: 'near-zero' } as const;
    expect(evaluateHypothesis(none, { estimate: 0.04, lower: -0.1, upper: 0.18 }).verdict).toBe('supported');
    expect(evaluateHypothesis(none, { estimate: 0.2, lower: 0.05, upper: 0.34 }).verdict).toBe(
      'partly supported',
    );
    expect(evaluateHypothesis(none, { estimate: 0.45, lower: 0.3, upper: 0.58 }).verdict).toBe(
      'not supported',
    );
    const strongNegativeD = { sign: 'negative', strength: 'strong' } as const;
    expect(
      evaluateHypothesis(strongNegativeD, { estimate: -0.9, lower: -1.2, upper: -0.6 }, 'd').verdict,
    ).toBe('supported');
    expect(strengthBand(0.3, 'r')).toBe('moderate');
    expect(strengthBand(0.3, 'd')).toBe('weak');
    expect(() => evaluateHypothesis(none, { estimate: 0.5, lower: 0.6, upper: 0.7 })).toThrow(
      'inside its interval',
    );
  });
});

describe('scaleScores', () => {
  it('applies reverse keys from the declared bounds, then sums or averages', () => {
    const names = ['tc1', 'tc2', 'rp1'];
    const data = [
      [4, 2, 5],
      [1, null, 3],
    ];
    const keys = [{ name: 'traffic', items: ['tc1', 'tc2'], reverse: ['tc2'] }];
    // tc2 reversed on 1–5: 1 + 5 − 2 = 4.
    expect(scaleScores(names, data, keys, 'sum', { min: 1, max: 5 })).toEqual({ traffic: [8, null] });
    expect(scaleScores(names, data, keys, 'mean', { min: 1, max: 5 })).toEqual({ traffic: [4, null] });
    expect(() => scaleScores(names, data, [{ name: 's', items: ['zz'] }], 'sum')).toThrow('item "zz"');
    expect(() => scaleScores(names, data, keys, 'sum')).toThrow('no declared scale bounds');
  });
});
