import { EngineError } from '../errors.ts';
import { citation, formatReference, methodEntry } from '../methods/index.ts';

/** What the scores of a scale will be used for, as far as reliability is concerned. */
export const SCORE_USES = ['early-research', 'basic-research', 'individual-decisions'] as const;
export type ScoreUse = (typeof SCORE_USES)[number];

/** How each use reads in the construct phase's choice and beside a criterion. */
export const SCORE_USE_LABEL: Record<ScoreUse, string> = {
  'early-research': 'early-stage research (developing the scale, exploring hypotheses)',
  'basic-research': 'basic research (describing and comparing groups)',
  'individual-decisions': 'decisions about individuals',
};

/** The short name of each use, as it follows a criterion: ".80 for basic research". */
const USE_NAME: Record<ScoreUse, string> = {
  'early-research': 'early-stage research',
  'basic-research': 'basic research',
  'individual-decisions': 'decisions about individuals',
};

/** The criterion a reliability coefficient is read against, with where it comes from. */
export interface ReliabilityCriterion {
  /** Registry id of the rule (`reliability.criterion.basic-research`). */
  ruleId: string;
  use: ScoreUse;
  /** "basic research": the use in a few words. */
  useName: string;
  /** False when no use is stated and the early-stage criterion is shown by default. */
  stated: boolean;
  minimum: number;
  /** A higher value the rule calls desirable, where it names one. */
  desirable: number | null;
  /** The rule in a sentence. */
  wording: string;
  /** Why this criterion applies to this study. */
  reason: string;
  /** In-text citation, "Nunnally & Bernstein (1994)". */
  citation: string;
  /** Full reference for a footnote. */
  reference: string;
}

/**
 * The use-dependent reliability criterion (Nunnally & Bernstein 1994; registry ids
 * `reliability.criterion.*`): about .70 for early-stage research, .80 for basic research, .90 (with
 * .95 desirable) where scores inform decisions about individuals. With no use stated the early-stage
 * criterion applies, the least demanding one, and the reason says so.
 *
 * Cost O(1). Throws EngineError for a use outside SCORE_USES.
 */
export function reliabilityCriterion(use: ScoreUse | null): ReliabilityCriterion {
  if (use !== null && !SCORE_USES.includes(use))
    throw new EngineError(`"${use}" is not a known use of scores`);
  const chosen: ScoreUse = use ?? 'early-research';
  const ruleId = `reliability.criterion.${chosen}`;
  const entry = methodEntry(ruleId);
  if (entry.kind !== 'rule') throw new EngineError(`methods registry: "${ruleId}" is not a rule`);
  const ref = entry.references[0];
  return {
    ruleId,
    use: chosen,
    useName: USE_NAME[chosen],
    stated: use !== null,
    minimum: entry.thresholds.minimum,
    desirable: entry.thresholds.desirable ?? null,
    wording: entry.wording,
    reason:
      use === null
        ? 'No use of scores is stated, so the criterion for early-stage research, the least demanding, is shown; stating the use in the construct phase applies its own criterion.'
        : `Chosen from the use of scores stated in the construct phase: ${SCORE_USE_LABEL[use]}.`,
    citation: citation(ref),
    reference: formatReference(ref),
  };
}

/** Whether a coefficient reaches the criterion's minimum. Throws EngineError for a non-finite value. */
export function meetsCriterion(value: number, criterion: ReliabilityCriterion): boolean {
  if (!Number.isFinite(value))
    throw new EngineError(`a reliability criterion needs a finite value (got ${value})`);
  return value >= criterion.minimum;
}
