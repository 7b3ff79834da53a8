import { getItemByCode } from '../../db/repos/items.ts';
import type { Study } from '../../db/study.ts';
import { createRng } from '../engine/rng.ts';
import { signOffPhase } from '../phases/index.ts';
import { addExpert, addRound, decideItem, importRatings } from '../phases/review/index.ts';
import { DEMO_FACETS } from './construct.ts';
import {
  DEMO_ITEMS,
  DEMO_OFF_DOMAIN_ITEM,
  DEMO_RETIRED_ITEM,
  DEMO_REVISED_ITEM,
  DEMO_REVISED_TEXT,
} from './items.ts';

/** Seed of the demo's invented expert ratings. */
export const DEMO_REVIEW_SEED = 20260403;

/** Seven invented panel members, known by code and role only. */
export const DEMO_EXPERTS = [
  { code: 'E1', role: 'traffic engineer' },
  { code: 'E2', role: 'cycling instructor' },
  { code: 'E3', role: 'bicycle mechanic' },
  { code: 'E4', role: 'transport psychologist' },
  { code: 'E5', role: 'community cycling organiser' },
  { code: 'E6', role: 'survey methodologist' },
  { code: 'E7', role: 'road-safety officer' },
] as const;

/** How many of the seven experts rate an item relevant (3 or 4), where the demo fixes it. */
const RELEVANT_COUNT: Record<string, number> = {
  [DEMO_REVISED_ITEM]: 5,
  [DEMO_RETIRED_ITEM]: 4,
  [DEMO_OFF_DOMAIN_ITEM]: 6,
};

/** Chance that an unfixed item is rated relevant by all seven (otherwise by six). */
const UNANIMOUS_SHARE = 0.65;
/** Chance that a relevant rating is 4 rather than 3, and that a not-relevant one is 1 rather than 2. */
const TOP_RATING_SHARE = 0.7;
const BOTTOM_RATING_SHARE = 0.3;
/** Chance that an expert places an item in its intended facet. */
const PLACED_AS_INTENDED = 0.92;

/** Where the seven experts place the off-domain item: spread over the facets. */
const OFF_DOMAIN_PLACEMENTS = [0, 1, 0, 1, 2, 0, 3];

const COMMENTS: Record<string, Record<string, string>> = {
  [DEMO_REVISED_ITEM]: {
    E2: 'Two situations in one: heavy traffic, and unlit roads at night.',
    E6: 'Double-barrelled; split it or drop the night part.',
  },
  [DEMO_RETIRED_ITEM]: {
    E4: 'Says the same as the item about finding a quieter street.',
    E6: 'Near repeat of another route item.',
  },
  TR06: { E6: 'Double negative; some respondents will misread it.' },
  [DEMO_OFF_DOMAIN_ITEM]: { E4: 'Reads as an opinion about cars rather than confidence in riding.' },
};

function csvCell(value: string): string {
  return /[",\n]/.test(value) ? `"${value.replaceAll('"', '""')}"` : value;
}

/**
 * The panel's round-1 ratings as a long-form CSV file (item, expert, relevance, facet, comment),
 * generated from DEMO_REVIEW_SEED: every item is rated relevant by six or seven experts, except the
 * items fixed in RELEVANT_COUNT.
 */
export function demoRoundOneFile(): string {
  const rng = createRng(DEMO_REVIEW_SEED);
  const lines = ['item,expert,relevance,facet,comment'];
  for (const item of DEMO_ITEMS) {
    const relevant = RELEVANT_COUNT[item.code] ?? (rng.next() < UNANIMOUS_SHARE ? 7 : 6);
    const order = DEMO_EXPERTS.map((_, i) => i);
    for (let i = order.length - 1; i > 0; i--) {
      const j = rng.int(i + 1);
      [order[i], order[j]] = [order[j], order[i]];
    }
    const notRelevant = new Set(order.slice(relevant));
    const intended = DEMO_FACETS.findIndex((f) => f.name === item.facet);
    DEMO_EXPERTS.forEach((expert, e) => {
      const relevance = notRelevant.has(e)
        ? rng.next() < BOTTOM_RATING_SHARE
          ? 1
          : 2
        : rng.next() < TOP_RATING_SHARE
          ? 4
          : 3;
      let facet = intended;
      if (item.code === DEMO_OFF_DOMAIN_ITEM) facet = OFF_DOMAIN_PLACEMENTS[e];
      else if (rng.next() >= PLACED_AS_INTENDED)
        facet = (intended + 1 + rng.int(DEMO_FACETS.length - 1)) % DEMO_FACETS.length;
      const comment = COMMENTS[item.code]?.[expert.code] ?? '';
      lines.push(
        [item.code, expert.code, String(relevance), DEMO_FACETS[facet].name, csvCell(comment)].join(','),
      );
    });
  }
  return `${lines.join('\n')}\n`;
}

/** Round 2 re-rates the revised item only: all seven now find it relevant. */
export function demoRoundTwoFile(): string {
  const rng = createRng(DEMO_REVIEW_SEED + 1);
  const lines = ['item,expert,relevance,facet,comment'];
  for (const expert of DEMO_EXPERTS) {
    const relevance = rng.next() < TOP_RATING_SHARE ? 4 : 3;
    const comment = expert.code === 'E2' ? 'Clear now: one situation.' : '';
    lines.push([DEMO_REVISED_ITEM, expert.code, String(relevance), DEMO_FACETS[0].name, comment].join(','));
  }
  return `${lines.join('\n')}\n`;
}

const encoder = new TextEncoder();

/**
 * The demo's expert review: a round over all 32 items rated by seven experts, decisions on the two
 * items below the benchmarks (revise the double-barrelled one, retire the near duplicate), and a
 * second round that re-rates the revised wording; the phase is then signed off.
 */
export function fillDemoReview(study: Study): void {
  const first = addRound(study, { label: 'Content review by the advisory panel', scope: 'kept' });
  for (const expert of DEMO_EXPERTS) {
    addExpert(study, first, { code: expert.code, role: expert.role, name: '', nameWithheld: false });
  }
  importRatings(study, first, encoder.encode(demoRoundOneFile()), 'panel-ratings-round-1.csv');
  const item = (code: string) => {
    const found = getItemByCode(study, code);
    if (!found) throw new Error(`demo item ${code} is missing`);
    return found.id;
  };
  decideItem(study, {
    roundId: first,
    itemId: item(DEMO_REVISED_ITEM),
    decision: 'revise',
    newText: DEMO_REVISED_TEXT,
    rationale:
      'Two situations in one item (heavy traffic; unlit roads at night), as two experts noted. Night riding lies outside the ordinary conditions in the domain, so the item keeps the traffic part only and goes back to the panel.',
  });
  decideItem(study, {
    roundId: first,
    itemId: item(DEMO_RETIRED_ITEM),
    decision: 'retire',
    rationale:
      'Near duplicate of RP02 (trigram similarity .90) and rated lower by the panel; RP02 covers the same content.',
  });
  const second = addRound(study, { label: 'Re-rating of the revised item', scope: 'revised' });
  importRatings(study, second, encoder.encode(demoRoundTwoFile()), 'panel-ratings-round-2.csv');
  signOffPhase(
    study,
    'review',
    'Panel of seven; two items below the benchmarks decided (TR05 revised and re-rated, RP06 retired) (demo).',
  );
}
