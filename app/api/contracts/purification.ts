/**
 * The purification screens: rounds, item rows, facet results, flag rules and the decisions on items.
 * Declared for the interface, which imports these from here and nothing else of the main side.
 */
export type { ReliabilityCriterion } from '../../engine/reliability/criterion.ts';
export type {
  DecisionView,
  FacetResult,
  FlagRule,
  RoundDetail,
  RoundItemRow,
  RoundSummary,
  RuleOfThumb,
} from '../../phases/purification.ts';
