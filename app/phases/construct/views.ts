import { getConstruct, listFacets, listRelations } from '../../../db/repos/construct.ts';
import type { Study } from '../../../db/study.ts';
import { SCORE_USE_LABEL, SCORE_USES, reliabilityCriterion } from '../../engine/reliability/criterion.ts';

export function constructView(study: Study) {
  return {
    construct: getConstruct(study),
    facets: listFacets(study, { includeRetired: true }),
    relations: listRelations(study, { includeRetired: true }),
    /** The uses of scores to choose from, each with the reliability criterion it sets. */
    scoreUses: SCORE_USES.map((use) => ({
      use,
      label: SCORE_USE_LABEL[use],
      minimum: reliabilityCriterion(use).minimum,
      source: reliabilityCriterion(use).citation,
    })),
  };
}
