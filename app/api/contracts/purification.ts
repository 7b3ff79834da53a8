/**
 * The purification screens: rounds, item rows, facet results, flag rules, the round's factor
 * analysis and the decisions on items. Declared for the interface, which imports these from here and
 * nothing else of the main side (types only).
 */
export type { ReliabilityCriterion } from '../../engine/reliability/criterion.ts';
export type {
  DecisionView,
  FacetResult,
  FactorRequest,
  FlagRule,
  LoadingRow,
  RoundDetail,
  RoundFactorView,
  RoundItemRow,
  RoundSummary,
  RuleOfThumb,
} from '../../phases/purification/index.ts';
