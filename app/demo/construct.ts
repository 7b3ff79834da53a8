import type { Study } from '../../db/study.ts';
import {
  addFacet,
  addRelation,
  updateConstructText,
  updateResponseFormat,
  updateScoreUse,
} from '../phases/construct/index.ts';

/**
 * The demo's construct phase: an invented city mobility research unit defining "Everyday
 * Cycling Confidence" for adult urban residents. Nothing here comes from a real study.
 */
export const DEMO_FACETS = [
  {
    name: 'Confidence in traffic',
    definition:
      'Belief in one’s ability to ride safely among motor vehicles: holding a lane, signalling, passing junctions and roundabouts, and handling close passes.',
  },
  {
    name: 'Route planning',
    definition:
      'Belief in one’s ability to choose and adapt a route: judging which streets suit a trip, finding quieter alternatives, and estimating time and effort.',
  },
  {
    name: 'Bike handling',
    definition:
      'Belief in one’s control of the bicycle itself: starting, stopping, braking hard, steering around obstacles, riding one-handed to signal, and riding in rain.',
  },
  {
    name: 'Roadside repairs',
    definition:
      'Belief in one’s ability to deal with common faults during a trip: fixing a flat tyre, refitting a dropped chain, and adjusting brakes or a loose saddle.',
  },
] as const;

export function fillDemoConstruct(study: Study): void {
  updateConstructText(study, 'name', 'Everyday Cycling Confidence');
  updateConstructText(
    study,
    'definition',
    'Everyday cycling confidence is an adult’s belief in their own ability to make ordinary trips by bicycle in an urban setting: riding among traffic, planning routes, controlling the bicycle, and dealing with small mechanical problems on the way.',
  );
  updateConstructText(
    study,
    'includes',
    'Self-efficacy beliefs about utility cycling in the city: commuting, errands and social trips, on streets, shared paths and protected lanes, in ordinary daylight and weather conditions.',
  );
  updateConstructText(
    study,
    'excludes',
    'Sport and racing skill, off-road riding, physical fitness as such, attitudes toward cyclists, perceived danger of the city (a belief about the environment, not about oneself), and actual riding frequency.',
  );
  updateConstructText(
    study,
    'population',
    'Adults aged 18 and over living in a mid-sized city who can ride a bicycle, whether or not they currently cycle.',
  );
  updateConstructText(
    study,
    'intendedUses',
    'Describing groups and evaluating training programmes and street changes in research. Not for licensing, insurance, employment or any decision about an individual.',
  );
  updateScoreUse(study, 'basic-research');
  updateResponseFormat(study, 5, 1, [
    'Not at all confident',
    'Slightly confident',
    'Moderately confident',
    'Very confident',
    'Completely confident',
  ]);
  for (const facet of DEMO_FACETS) addFacet(study, facet.name, facet.definition);
  addRelation(study, {
    otherConstruct: 'General self-efficacy',
    kind: 'convergent',
    expectedSign: 'positive',
    expectedStrength: 'moderate',
    measure: 'A short general self-efficacy questionnaire',
    rationale:
      'Domain-specific confidence should share some variance with general self-efficacy, but far from all of it.',
  });
  addRelation(study, {
    otherConstruct: 'Traffic-related anxiety',
    kind: 'convergent',
    expectedSign: 'negative',
    expectedStrength: 'moderate',
    measure: 'Anxiety-in-traffic items from the unit’s travel survey',
    rationale: 'Riders who feel able to handle traffic should report less anxiety about it.',
  });
  addRelation(study, {
    otherConstruct: 'Social desirability',
    kind: 'discriminant',
    expectedSign: 'none',
    expectedStrength: 'near-zero',
    measure: 'A brief social desirability short form',
    rationale: 'Scores should not mainly reflect a wish to present oneself well.',
  });
  addRelation(study, {
    otherConstruct: 'Cycling trips in the following month',
    kind: 'criterion',
    expectedSign: 'positive',
    expectedStrength: 'moderate',
    measure: 'Trip diary, four weeks after the survey',
    rationale: 'Confidence is expected to predict later cycling, beyond intention alone.',
  });
  addRelation(study, {
    otherConstruct: 'Riding frequency (regular versus rare riders)',
    kind: 'known-groups',
    expectedSign: 'positive',
    expectedStrength: 'strong',
    measure: 'Self-described rider type: regular riders compared with those who rarely ride',
    rationale:
      'People who ride regularly meet traffic, route and handling situations often and should feel far more able to manage them.',
  });
}
