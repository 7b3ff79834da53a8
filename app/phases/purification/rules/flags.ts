import { getConstruct } from '../../../../db/repos/construct.ts';
import type { Study } from '../../../../db/study.ts';
import type { ItemAnalysis, ItemResult } from '../../../engine/reliability.ts';
import { type ReliabilityCriterion, reliabilityCriterion } from '../../../engine/reliability/criterion.ts';
import { methodEntry, ruleThreshold } from '../../../engine/methods/index.ts';
import { MIN_ITEMS_PER_FACET } from '../../items/index.ts';

/**
 * Rules of thumb the item table flags against. None is a verdict: each only asks the researcher to
 * look, and a decision still needs a reason about the construct's domain.
 */
export const ROUND_RULES = {
  /** Common practice: a corrected item-total correlation below .30 marks an item that fits the rest poorly. */
  minCorrectedItemTotal: 0.3,
  /** Alpha if deleted counts as higher than alpha from this rise on (the precision alpha is shown at). */
  minAlphaRise: 0.001,
  /** Common practice: |skewness| above 2 marks a strongly lopsided item. */
  maxAbsSkewness: 2,
  /** |Excess kurtosis| above 7. Registry: `items.kurtosis`. */
  maxAbsKurtosis: ruleThreshold('items.kurtosis', 'maxAbs'),
  /** Common practice: more than 15% of answers at the lowest or highest category. */
  maxFloorCeilingShare: 0.15,
  /** Common practice: more than 10% of respondents left the item unanswered. */
  maxMissingShare: 0.1,
  /** Common practice: a facet needs at least three items to be measured on its own. */
  minItemsPerFacet: MIN_ITEMS_PER_FACET,
} as const;

export type FlagRule =
  | 'low-item-total'
  | 'negative-item-total'
  | 'alpha-rises'
  | 'skewness'
  | 'kurtosis'
  | 'floor'
  | 'ceiling'
  | 'missing'
  | 'no-variance'
  | 'low-primary'
  | 'cross-loading'
  | 'off-facet';

export interface RuleOfThumb {
  rule: FlagRule;
  /** Short label shown in the table. */
  label: string;
  /** The rule in words, with where it comes from; shown in the legend and as a tooltip. */
  statement: string;
  /** The methods-registry id whose published source a numbered note under the legend gives. */
  source?: string;
}

/** A registry rule's wording, without its source (a numbered note gives that). */
function methodWording(id: string): string {
  const entry = methodEntry(id);
  return entry.kind === 'rule' ? entry.wording : entry.name;
}

export const RULES_OF_THUMB: readonly RuleOfThumb[] = [
  {
    rule: 'low-item-total',
    label: 'low r',
    statement: `Corrected item-total correlation below ${ROUND_RULES.minCorrectedItemTotal.toFixed(2)} (common practice): the item shares little with the other items.`,
  },
  {
    rule: 'negative-item-total',
    label: 'r < 0',
    statement:
      'Corrected item-total correlation below zero: the item runs against the others; check its keying first.',
  },
  {
    rule: 'alpha-rises',
    label: 'α rises',
    statement:
      'Alpha would rise if the item were dropped. On its own this is not a reason to drop it: say how the item relates to the construct’s domain.',
  },
  {
    rule: 'skewness',
    label: 'skew',
    statement: `|Skewness| above ${ROUND_RULES.maxAbsSkewness} (common practice): answers pile up at one end.`,
  },
  {
    rule: 'kurtosis',
    label: 'kurtosis',
    statement: methodWording('items.kurtosis'),
    source: 'items.kurtosis',
  },
  {
    rule: 'floor',
    label: 'floor',
    statement: `More than ${ROUND_RULES.maxFloorCeilingShare * 100}% of answers at the lowest category (common practice).`,
  },
  {
    rule: 'ceiling',
    label: 'ceiling',
    statement: `More than ${ROUND_RULES.maxFloorCeilingShare * 100}% of answers at the highest category (common practice).`,
  },
  {
    rule: 'missing',
    label: 'missing',
    statement: `More than ${ROUND_RULES.maxMissingShare * 100}% of respondents left the item unanswered (common practice).`,
  },
  {
    rule: 'no-variance',
    label: 'no variance',
    statement: 'Every analysed respondent gave the same answer: the item adds nothing to the total.',
  },
  {
    rule: 'low-primary',
    label: 'low loading',
    statement: methodWording('rule.primary-loading'),
    source: 'rule.primary-loading',
  },
  {
    rule: 'cross-loading',
    label: 'cross-loads',
    statement: methodWording('rule.cross-loading'),
    source: 'rule.cross-loading',
  },
  {
    rule: 'off-facet',
    label: 'other factor',
    statement: methodWording('rule.intended-facet'),
    source: 'rule.intended-facet',
  },
];

export interface ItemFlag {
  rule: FlagRule;
  /** What was seen, with the number: "corrected item-total r = .12". */
  text: string;
}

/** The reliability criterion for this study, chosen from the construct's stated use of scores. */
export function criterionFor(study: Study): ReliabilityCriterion {
  return reliabilityCriterion(getConstruct(study).scoreUse);
}

export function fmt(x: number, digits = 2): string {
  return x.toFixed(digits).replace(/^(-?)0\./, '$1.');
}

/** The rules of thumb one item breaks in a round's scale-level analysis. */
export function flagItem(item: ItemResult, analysis: ItemAnalysis): ItemFlag[] {
  const flags: ItemFlag[] = [];
  const r = item.correctedItemTotal;
  if (item.sd === 0 || r === null) {
    flags.push({ rule: 'no-variance', text: 'no variance among the analysed answers' });
  } else if (r < 0) {
    flags.push({ rule: 'negative-item-total', text: `corrected item-total r = ${fmt(r)}` });
  } else if (r < ROUND_RULES.minCorrectedItemTotal) {
    flags.push({ rule: 'low-item-total', text: `corrected item-total r = ${fmt(r)}` });
  }
  if (
    item.alphaIfDeleted !== null &&
    item.alphaIfDeleted - analysis.alpha.value >= ROUND_RULES.minAlphaRise
  ) {
    flags.push({
      rule: 'alpha-rises',
      text: `alpha ${fmt(analysis.alpha.value, 3)} → ${fmt(item.alphaIfDeleted, 3)} without it`,
    });
  }
  if (item.skewness !== null && Math.abs(item.skewness) > ROUND_RULES.maxAbsSkewness) {
    flags.push({ rule: 'skewness', text: `skewness ${fmt(item.skewness)}` });
  }
  if (item.kurtosis !== null && Math.abs(item.kurtosis) > ROUND_RULES.maxAbsKurtosis) {
    flags.push({ rule: 'kurtosis', text: `excess kurtosis ${fmt(item.kurtosis)}` });
  }
  if (item.floorShare !== null && item.floorShare > ROUND_RULES.maxFloorCeilingShare) {
    flags.push({ rule: 'floor', text: `${Math.round(item.floorShare * 100)}% at the lowest category` });
  }
  if (item.ceilingShare !== null && item.ceilingShare > ROUND_RULES.maxFloorCeilingShare) {
    flags.push({ rule: 'ceiling', text: `${Math.round(item.ceilingShare * 100)}% at the highest category` });
  }
  const respondents = analysis.missingData.respondents;
  if (respondents > 0 && item.missing / respondents > ROUND_RULES.maxMissingShare) {
    flags.push({ rule: 'missing', text: `${item.missing} of ${respondents} unanswered` });
  }
  return flags;
}
