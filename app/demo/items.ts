import { listFacets } from '../../db/repos/construct.ts';
import type { ItemKeying, ItemSource } from '../../db/repos/items.ts';
import type { Study } from '../../db/study.ts';
import { signOffPhase } from '../phases/index.ts';
import { addItem, changeItemState, rewordItem } from '../phases/items/index.ts';
import { DEMO_FACETS } from './construct.ts';

/**
 * The demo's item pool: 32 invented items over the four facets, answered on the construct's
 * confidence scale. The pool deliberately holds a few items a careful team would catch: one
 * double-barrelled item (TR05), one double negative (TR06), a near-duplicate pair (RP02 and RP06),
 * and one off-domain item about attitudes to cars (TR09) that the experts let through and the
 * pilot data will show to be weak.
 */
export interface DemoItem {
  code: string;
  facet: (typeof DEMO_FACETS)[number]['name'];
  /** The wording as first drafted. */
  text: string;
  keying: ItemKeying;
  source: ItemSource;
  sourceNote: string;
  /** A later rewording in the item pool phase, kept as a second revision. */
  reworded?: string;
}

/** The off-domain item (an attitude to cars, not confidence in one's own riding). */
export const DEMO_OFF_DOMAIN_ITEM = 'TR09';
/** The double-barrelled item the experts rate low; revised after round 1 and rated again in round 2. */
export const DEMO_REVISED_ITEM = 'TR05';
/** The near duplicate of RP02 the experts rate low; retired after round 1. */
export const DEMO_RETIRED_ITEM = 'RP06';
/** The new wording of DEMO_REVISED_ITEM after round 1. */
export const DEMO_REVISED_TEXT = 'I can ride on a busy street in heavy traffic.';

const TRAFFIC = DEMO_FACETS[0].name;
const ROUTES = DEMO_FACETS[1].name;
const HANDLING = DEMO_FACETS[2].name;
const REPAIRS = DEMO_FACETS[3].name;

const INTERVIEWS = 'Resident interviews held by the unit (invented for the demo)';
const CURRICULA = 'Paraphrased from cycling-skills course outlines the unit collected';
const INSTRUCTOR = 'Suggested by the cycling instructor on the advisory group';
const MECHANIC = 'Suggested by the bicycle mechanic on the advisory group';

export const DEMO_ITEMS: readonly DemoItem[] = [
  {
    code: 'TR01',
    facet: TRAFFIC,
    text: 'I can ride in a bus lane while buses pass me.',
    keying: 'forward',
    source: 'interviews',
    sourceNote: INTERVIEWS,
  },
  {
    code: 'TR02',
    facet: TRAFFIC,
    text: 'I can turn across oncoming traffic at a busy junction.',
    keying: 'forward',
    source: 'literature',
    sourceNote: CURRICULA,
  },
  {
    code: 'TR03',
    facet: TRAFFIC,
    text: 'I can keep a steady line when cars pass close to me.',
    reworded: 'I can keep a steady line when a car passes me closely.',
    keying: 'forward',
    source: 'interviews',
    sourceNote: INTERVIEWS,
  },
  {
    code: 'TR04',
    facet: TRAFFIC,
    text: 'I can ride through a roundabout with several lanes.',
    keying: 'forward',
    source: 'literature',
    sourceNote: CURRICULA,
  },
  {
    code: 'TR05',
    facet: TRAFFIC,
    text: 'I can ride in heavy traffic and on unlit roads at night.',
    keying: 'forward',
    source: 'own-drafting',
    sourceNote: '',
  },
  {
    code: 'TR06',
    facet: TRAFFIC,
    text: 'I do not feel unsafe riding past a row of parked cars.',
    keying: 'forward',
    source: 'interviews',
    sourceNote: INTERVIEWS,
  },
  {
    code: 'TR07',
    facet: TRAFFIC,
    text: 'I can ride on a street without a cycle lane during rush hour.',
    keying: 'forward',
    source: 'interviews',
    sourceNote: INTERVIEWS,
  },
  {
    code: 'TR08',
    facet: TRAFFIC,
    text: 'I can make eye contact with drivers at a junction to check they have seen me.',
    keying: 'forward',
    source: 'expert-suggestion',
    sourceNote: INSTRUCTOR,
  },
  {
    code: 'TR09',
    facet: TRAFFIC,
    text: 'I think there are too many cars in the city centre.',
    keying: 'forward',
    source: 'own-drafting',
    sourceNote: '',
  },
  {
    code: 'RP01',
    facet: ROUTES,
    text: 'I can plan a bike route to a part of the city I do not know.',
    keying: 'forward',
    source: 'interviews',
    sourceNote: INTERVIEWS,
  },
  {
    code: 'RP02',
    facet: ROUTES,
    text: 'I can find a quieter street when my usual route is busy.',
    keying: 'forward',
    source: 'interviews',
    sourceNote: INTERVIEWS,
  },
  {
    code: 'RP03',
    facet: ROUTES,
    text: 'I can estimate how long a trip across town will take by bike.',
    keying: 'forward',
    source: 'own-drafting',
    sourceNote: '',
  },
  {
    code: 'RP04',
    facet: ROUTES,
    text: 'I can use a map app to pick a route that avoids steep hills.',
    keying: 'forward',
    source: 'own-drafting',
    sourceNote: '',
  },
  {
    code: 'RP05',
    facet: ROUTES,
    text: 'I can change my route on the way when a street is closed.',
    keying: 'forward',
    source: 'literature',
    sourceNote: CURRICULA,
  },
  {
    code: 'RP06',
    facet: ROUTES,
    text: 'I can find a quiet street when my usual route is too busy.',
    keying: 'forward',
    source: 'own-drafting',
    sourceNote: '',
  },
  {
    code: 'RP07',
    facet: ROUTES,
    text: 'I can judge whether a street suits cycling before I ride it.',
    keying: 'forward',
    source: 'literature',
    sourceNote: CURRICULA,
  },
  {
    code: 'RP08',
    facet: ROUTES,
    text: 'I can work out where to lock my bike safely at the end of a trip.',
    keying: 'forward',
    source: 'interviews',
    sourceNote: INTERVIEWS,
  },
  {
    code: 'BH01',
    facet: HANDLING,
    text: 'I can stop quickly in an emergency without losing control.',
    keying: 'forward',
    source: 'literature',
    sourceNote: CURRICULA,
  },
  {
    code: 'BH02',
    facet: HANDLING,
    text: 'I can ride one-handed while I signal a turn.',
    keying: 'forward',
    source: 'literature',
    sourceNote: CURRICULA,
  },
  {
    code: 'BH03',
    facet: HANDLING,
    text: 'I can steer around a pothole at the last moment.',
    keying: 'forward',
    source: 'interviews',
    sourceNote: INTERVIEWS,
  },
  {
    code: 'BH04',
    facet: HANDLING,
    text: 'I can start off smoothly on an uphill slope.',
    keying: 'forward',
    source: 'expert-suggestion',
    sourceNote: INSTRUCTOR,
  },
  {
    code: 'BH05',
    facet: HANDLING,
    text: 'I can ride slowly in a straight line through a crowded area.',
    keying: 'forward',
    source: 'expert-suggestion',
    sourceNote: INSTRUCTOR,
  },
  {
    code: 'BH06',
    facet: HANDLING,
    text: 'I can keep control of my bike on a wet, slippery surface.',
    keying: 'forward',
    source: 'interviews',
    sourceNote: INTERVIEWS,
  },
  {
    code: 'BH07',
    facet: HANDLING,
    text: 'I can look over my shoulder without swerving.',
    keying: 'forward',
    source: 'literature',
    sourceNote: CURRICULA,
  },
  {
    code: 'BH08',
    facet: HANDLING,
    text: 'I can ride safely in strong crosswinds.',
    reworded: 'I can hold my line in strong crosswinds.',
    keying: 'forward',
    source: 'own-drafting',
    sourceNote: '',
  },
  {
    code: 'RR01',
    facet: REPAIRS,
    text: 'I can fix a flat tyre at the side of the road.',
    keying: 'forward',
    source: 'literature',
    sourceNote: CURRICULA,
  },
  {
    code: 'RR02',
    facet: REPAIRS,
    text: 'I can put the chain back on after it comes off.',
    keying: 'forward',
    source: 'expert-suggestion',
    sourceNote: MECHANIC,
  },
  {
    code: 'RR03',
    facet: REPAIRS,
    text: 'I can adjust brakes that rub on the wheel.',
    keying: 'forward',
    source: 'expert-suggestion',
    sourceNote: MECHANIC,
  },
  {
    code: 'RR04',
    facet: REPAIRS,
    text: 'I can tighten a loose saddle with a multi-tool.',
    keying: 'forward',
    source: 'expert-suggestion',
    sourceNote: MECHANIC,
  },
  {
    code: 'RR05',
    facet: REPAIRS,
    text: 'I can pump a tyre up to the right pressure.',
    keying: 'forward',
    source: 'own-drafting',
    sourceNote: '',
  },
  {
    code: 'RR06',
    facet: REPAIRS,
    text: 'I can tell whether a strange noise means I should stop riding.',
    keying: 'forward',
    source: 'interviews',
    sourceNote: INTERVIEWS,
  },
  {
    code: 'RR07',
    facet: REPAIRS,
    text: 'I can get home when my bike breaks down far from home.',
    keying: 'forward',
    source: 'interviews',
    sourceNote: INTERVIEWS,
  },
];

/** Drafts the pool, rewords two items (kept as revisions), keeps every item for expert review, and signs the phase off. */
export function fillDemoItems(study: Study): void {
  const facets = new Map(listFacets(study).map((f) => [f.name, f.id]));
  const ids = new Map<string, number>();
  for (const item of DEMO_ITEMS) {
    const facetId = facets.get(item.facet);
    if (facetId === undefined) throw new Error(`demo facet "${item.facet}" is missing`);
    ids.set(
      item.code,
      addItem(study, {
        code: item.code,
        text: item.text,
        facetId,
        keying: item.keying,
        sourceType: item.source,
        sourceNote: item.sourceNote,
      }),
    );
  }
  for (const item of DEMO_ITEMS) {
    if (item.reworded) rewordItem(study, ids.get(item.code) as number, item.reworded);
  }
  for (const item of DEMO_ITEMS) changeItemState(study, ids.get(item.code) as number, 'kept');
  signOffPhase(
    study,
    'items',
    'Pool of 32 drafted; wording flags on TR05, TR06 and the RP02/RP06 pair left for the panel to judge (demo).',
  );
}
