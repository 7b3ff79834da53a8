import { EngineError } from '../errors.ts';

export type ExpectedSign = 'positive' | 'negative' | 'none';
export type ExpectedStrength = 'near-zero' | 'weak' | 'moderate' | 'strong';
export type Verdict = 'supported' | 'partly supported' | 'not supported';

/**
 * Lower edges of the strength bands (Cohen 1988, common practice): for a correlation .10 weak, .30
 * moderate, .50 strong; for a standardized mean difference .20, .50, .80. Registry: `effect.bands`.
 */
export const STRENGTH_BANDS = {
  r: { weak: 0.1, moderate: 0.3, strong: 0.5 },
  d: { weak: 0.2, moderate: 0.5, strong: 0.8 },
} as const;

/** The rule, in words, shown wherever a verdict is shown. */
export const HYPOTHESIS_RULE =
  'supported: the interval excludes zero on the expected side and the estimate falls in the expected strength band ' +
  '(near-zero: the interval includes zero and the estimate is below the weak band); partly supported: the direction ' +
  'holds (interval excludes zero on the expected side) but the strength band differs, or a near-zero expectation ' +
  'meets an estimate that is only weak; not supported: otherwise. Bands for r: .10 weak, .30 moderate, .50 strong; ' +
  'for d: .20, .50, .80 (Cohen 1988, common practice).';

export interface HypothesisOutcome {
  verdict: Verdict;
  observedStrength: ExpectedStrength;
  /** One sentence naming what was expected and what was found. */
  reason: string;
}

/** The strength band of an effect size's magnitude. */
export function strengthBand(value: number, metric: 'r' | 'd'): ExpectedStrength {
  const b = STRENGTH_BANDS[metric];
  const a = Math.abs(value);
  return a >= b.strong ? 'strong' : a >= b.moderate ? 'moderate' : a >= b.weak ? 'weak' : 'near-zero';
}

/**
 * Tests a relation planned in the construct phase (expected sign and rough strength) against the
 * observed effect and its confidence interval, by the rule in HYPOTHESIS_RULE. `metric` says whether
 * the effect is a correlation (convergent, discriminant, criterion) or a standardized mean difference
 * (known groups, with "positive" meaning the group expected higher scores it higher). Registry:
 * `validity.hypotheses`, `effect.bands`.
 *
 * Cost: O(1). Throws EngineError for a non-finite estimate or an interval that does not contain it.
 */
export function evaluateHypothesis(
  expected: { sign: ExpectedSign; strength: ExpectedStrength },
  observed: { estimate: number; lower: number; upper: number },
  metric: 'r' | 'd' = 'r',
): HypothesisOutcome {
  const { estimate, lower, upper } = observed;
  if (![estimate, lower, upper].every(Number.isFinite) || lower > estimate || estimate > upper) {
    throw new EngineError(
      `an observed effect needs a finite estimate inside its interval (got ${estimate} in [${lower}, ${upper}])`,
    );
  }
  const band = strengthBand(estimate, metric);
  const found = `observed ${metric} = ${estimate.toFixed(2)} [${lower.toFixed(2)}, ${upper.toFixed(2)}], ${band}`;
  if (expected.sign === 'none' || expected.strength === 'near-zero') {
    const includesZero = lower <= 0 && upper >= 0;
    const verdict: Verdict =
      includesZero && band === 'near-zero'
        ? 'supported'
        : band === 'near-zero' || band === 'weak'
          ? 'partly supported'
          : 'not supported';
    return { verdict, observedStrength: band, reason: `expected near zero; ${found}` };
  }
  const directionHolds = expected.sign === 'positive' ? lower > 0 : upper < 0;
  const verdict: Verdict = !directionHolds
    ? 'not supported'
    : band === expected.strength
      ? 'supported'
      : 'partly supported';
  return {
    verdict,
    observedStrength: band,
    reason: `expected ${expected.sign}, ${expected.strength}; ${found}`,
  };
}
