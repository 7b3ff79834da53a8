/** The purification workbench's read models, as the renderer sees them (types only). */
export type {
  DecisionView,
  FacetResult,
  FactorRequest,
  FlagRule,
  LoadingRow,
  RoundFactorView,
  RoundDetail,
  RoundItemRow,
  RoundSummary,
  RuleOfThumb,
} from '../../phases/purification/index.ts';
