import type { Reference, RegistryEntry } from './types.ts';

const FLESCH_1948: Reference = {
  authors: ['Flesch, R.'],
  year: 1948,
  title: 'A new readability yardstick',
  container: 'Journal of Applied Psychology',
  volume: '32',
  issue: '3',
  pages: '221–233',
  doi: '10.1037/h0057532',
};

/** Item wording: readability formulas and the item-writing flags of the trade. */
export const WORDING_METHODS: RegistryEntry[] = [
  {
    kind: 'method',
    id: 'wording.flesch-reading-ease',
    name: 'Flesch Reading Ease',
    references: [FLESCH_1948],
  },
  {
    kind: 'method',
    id: 'wording.flesch-kincaid-grade',
    name: 'Flesch–Kincaid grade level',
    references: [
      {
        authors: ['Kincaid, J. P.', 'Fishburne, R. P., Jr.', 'Rogers, R. L.', 'Chissom, B. S.'],
        year: 1975,
        title:
          'Derivation of new readability formulas (Automated Readability Index, Fog Count and Flesch Reading Ease formula) for Navy enlisted personnel (Research Branch Report 8-75)',
        publisher: 'Naval Technical Training Command',
        fromMemory: true,
      },
    ],
  },
  {
    kind: 'method',
    id: 'wording.near-duplicate',
    name: 'Near-duplicate wording (cosine similarity of character trigrams)',
    commonPractice: true,
    references: [],
  },
  {
    kind: 'rule',
    id: 'wording.max-words',
    name: 'Item length',
    wording: 'Items longer than 20 words are harder to read and answer; keep items short.',
    thresholds: { maximum: 20 },
    commonPractice: true,
    references: [],
  },
  {
    kind: 'rule',
    id: 'wording.min-reading-ease',
    name: 'Reading ease',
    wording:
      "An item with Flesch Reading Ease below 50 is difficult on Flesch's scale; material for the general public usually aims at 60 or more.",
    thresholds: { minimum: 50 },
    commonPractice: true,
    references: [FLESCH_1948],
  },
  {
    kind: 'rule',
    id: 'wording.double-barrelled',
    name: 'Double-barrelled wording',
    wording: 'An item should ask about one thing; "and" or "or" joining two objects may ask about two.',
    thresholds: {},
    commonPractice: true,
    references: [],
  },
  {
    kind: 'rule',
    id: 'wording.double-negative',
    name: 'Double negatives',
    wording: 'Two negations in one sentence are often misread.',
    thresholds: {},
    commonPractice: true,
    references: [],
  },
  {
    kind: 'rule',
    id: 'wording.absolutes',
    name: 'Absolute wording',
    wording: 'Few respondents can endorse "always" or "never", so answers pile up at one end.',
    thresholds: {},
    commonPractice: true,
    references: [],
  },
  {
    kind: 'rule',
    id: 'wording.jargon',
    name: 'Specialist wording',
    wording: 'Respondents may not know specialist words; prefer an everyday word.',
    thresholds: {},
    commonPractice: true,
    references: [],
  },
  {
    kind: 'rule',
    id: 'wording.near-duplicate-threshold',
    name: 'Near-duplicate items',
    wording:
      'Two items whose character-trigram similarity is .80 or more are worded almost alike: keep one, or make each ask something distinct.',
    thresholds: { similarity: 0.8 },
    commonPractice: true,
    references: [],
  },
];
