import type { Study } from '../../db/study.ts';
import { cholesky } from '../engine/dense.ts';
import { createRng, type Rng } from '../engine/rng.ts';
import type { ColumnMapping } from '../import/mapping.ts';
import { signOffPhase } from '../phases/index.ts';
import {
  automaticMapping,
  excludeRespondents,
  planImport,
  screenDataset,
  storeImport,
} from '../phases/pilot/index.ts';
import { readDelimitedFileNow } from '../import/read-data-file.ts';
import { DEMO_FACETS } from './construct.ts';
import { DEMO_ITEMS, DEMO_OFF_DOMAIN_ITEM, DEMO_RETIRED_ITEM } from './items.ts';

/**
 * The demo's pilot survey: invented answers of about 480 adult residents, generated from a seeded
 * population model whose true structure is exported here, so that later phases (and their tests) can
 * check that the analyses recover it. Nothing here comes from a real survey.
 *
 * The model: four correlated facet factors (DEMO_FACTOR_CORRELATIONS); each item answers one facet
 * with a known loading, y* = λ·F + √(1 − λ²)·ε, cut into the construct's five points at the item's
 * thresholds; the off-domain item (TR09, an attitude to cars) loads only weakly on its facet and
 * mostly on a factor of its own; the double-negative item (TR06) loads lower than its neighbours; a
 * reverse-keyed item is generated reversed (min + max − x). Planted among the respondents: a dozen
 * straight-liners (one answer to every item, fast, failing the attention check), a few random
 * responders, three respondents who submitted twice (duplicate ids), three who stopped early, some
 * answers missing and coded -9, a few speeders and failed attention checks. The file also holds a
 * criterion measured four weeks later (cycling trips from a diary, blank when the diary was not
 * returned), a group variable (how often the respondent cycles), and a retest code for the 90
 * respondents who answered again three weeks later (the separate retest file).
 */

export const DEMO_PILOT_SEED = 20260415;
export const DEMO_PILOT_FILE = 'cycling-confidence-pilot.csv';
export const DEMO_RETEST_FILE = 'cycling-confidence-retest.csv';
export const DEMO_PILOT_NAME = 'Pilot survey, spring (demo)';
export const DEMO_RETEST_NAME = 'Retest after three weeks (demo)';

/** Rows of the pilot file, careless and duplicate rows included. */
export const DEMO_PILOT_ROWS = 480;
export const DEMO_STRAIGHT_LINERS = 12;
export const DEMO_RANDOM_RESPONDERS = 4;
export const DEMO_DUPLICATE_IDS = 3;
export const DEMO_EARLY_STOPPERS = 3;
export const DEMO_RETEST_RESPONDENTS = 90;

/** The code written for an unanswered item. */
export const DEMO_MISSING_CODE = -9;
/** Chance that a genuine respondent leaves one item unanswered (about 9% of them skip at least one of 31). */
const MISSING_SHARE = 0.003;
/** Items left unanswered at the end by a respondent who stopped early (more than 20% of 31). */
const EARLY_STOP_ITEMS = 10;
/** Chance that a genuine respondent misses the attention check. */
const ATTENTION_SLIP = 0.02;
/** Genuine respondents who rushed through (about a third of the median time). */
const GENUINE_SPEEDERS = 3;
/** Even odds (a changed answer goes up or down one point). */
const HALF = 0.5;
/** Chance that a second submission changes an answer by one point. */
const RESUBMISSION_CHANGES = 0.15;
/** Chance that a criterion diary was not returned (blank criterion). */
const DIARY_NOT_RETURNED = 0.15;
/** Correlation of the facet factors between the pilot and the retest three weeks later. */
export const DEMO_RETEST_STABILITY = 0.85;
/** Chance that a retest answer is missing (coded -9). */
const RETEST_MISSING_SHARE = 0.008;

/** Columns besides the items. */
export const DEMO_COLUMNS = {
  id: 'respondent_id',
  group: 'cyclist_type',
  attention: 'att_check',
  duration: 'duration_s',
  criterion: 'trips_4wk',
  retestLink: 'retest_code',
} as const;

/** The attention check reads "For this row, please choose 'Very confident'": the fourth point. */
export const DEMO_ATTENTION_ANSWER = 4;
/** The item after which the attention check appears in the questionnaire. */
const ATTENTION_AFTER = 'RP05';

/** Correlations of the four facet factors (traffic, routes, handling, repairs). */
export const DEMO_FACTOR_CORRELATIONS: readonly (readonly number[])[] = [
  [1, 0.55, 0.6, 0.35],
  [0.55, 1, 0.45, 0.4],
  [0.6, 0.45, 1, 0.45],
  [0.35, 0.4, 0.45, 1],
];

/** Loading of the off-domain item on its facet, and on its own (car attitude) factor. */
export const DEMO_OFF_DOMAIN_LOADING = 0.12;
export const DEMO_OFF_DOMAIN_OWN_LOADING = 0.65;
/** Loading of the double-negative item, lower because some respondents misread it. */
export const DEMO_DOUBLE_NEGATIVE_ITEM = 'TR06';
export const DEMO_DOUBLE_NEGATIVE_LOADING = 0.42;
/**
 * The planted cross-loading item: a repairs item ("get home when my bike breaks down far from home")
 * that also draws on route finding, loading on both facets' factors. Purification's factor analysis
 * should flag it.
 */
export const DEMO_CROSS_LOADING_ITEM = 'RR07';
export const DEMO_CROSS_LOADING = { facet: 'Route planning', own: 0.45, other: 0.45 } as const;
/** Loadings of the other items are drawn once from this range (seeded). */
const LOADING_RANGE = [0.58, 0.8] as const;
/** Thresholds on the latent scale for the five points, before each item's shift (confidence leans high). */
const BASE_THRESHOLDS = [-1.7, -0.85, 0.05, 0.95] as const;
/** Items differ in how hard they are to endorse: thresholds shifted by up to this much either way. */
const THRESHOLD_SHIFT = 0.45;

/** Criterion: trips ~ Poisson(exp(a + b·G)), G the mean of the four facet factors. */
export const DEMO_CRITERION_MODEL = { intercept: 0.9, slope: 0.55 } as const;
/** Group: "regular" when G + noise exceeds the upper cut, "occasional" above the lower, else "rarely". */
export const DEMO_GROUP_MODEL = {
  noise: 0.8,
  cuts: [-0.4, 0.5],
  levels: ['rarely', 'occasional', 'regular'],
};

/** Median answering time of genuine respondents, in seconds, and its log-scale spread. */
const MEDIAN_SECONDS = 420;
const LOG_SPREAD = 0.3;
/** Genuine speeders take this share of the median time, plus up to SPEEDER_SPREAD more. */
const SPEEDER_SHARE = 0.25;
const SPEEDER_SPREAD = 0.1;
/** The answers straight-liners repeat (drawn evenly from the list; never the attention check's answer). */
const STRAIGHT_LINE_VALUES = [1, 2, 3, 3, 5, 5];
/** Straight-liners take this many seconds, plus up to STRAIGHT_LINE_SPREAD more (whole seconds). */
const STRAIGHT_LINE_SECONDS = 55;
const STRAIGHT_LINE_SPREAD = 90;
/** Random responders take this share of the median time, plus up to RANDOM_SPREAD more. */
const RANDOM_SHARE = 0.6;
const RANDOM_SPREAD = 0.5;
/** Careless respondents leave the trip diary out this often; when returned, it holds this mean number of trips. */
const CARELESS_DIARY_MISSING = 0.5;
const CARELESS_TRIPS = 3;
/** A second submission is quicker than the first by this factor. */
const RESUBMISSION_SPEED = 0.7;
/** The retest takes this share of the pilot's median time (the items are familiar). */
const RETEST_TIME_SHARE = 0.9;

export interface DemoItemTruth {
  code: string;
  /** Index into DEMO_FACETS. */
  facet: number;
  loading: number;
  /** Loading on the item's own factor (the off-domain item only; 0 otherwise). */
  ownLoading: number;
  /** A second facet the item also answers (the planted cross-loading item only), with its loading. */
  cross: { facet: number; loading: number } | null;
  thresholds: number[];
  keying: 'forward' | 'reverse';
}

/** The items as the pilot questionnaire asked them: the pool without the item retired in review. */
export const DEMO_PILOT_ITEMS = DEMO_ITEMS.filter((it) => it.code !== DEMO_RETIRED_ITEM);

/** The true measurement model of the demo population, item by item. */
export const DEMO_ITEM_TRUTH: readonly DemoItemTruth[] = (() => {
  const rng = createRng(DEMO_PILOT_SEED - 1);
  return DEMO_PILOT_ITEMS.map((item) => {
    const facet = DEMO_FACETS.findIndex((f) => f.name === item.facet);
    const drawn = LOADING_RANGE[0] + (LOADING_RANGE[1] - LOADING_RANGE[0]) * rng.next();
    const shift = (2 * rng.next() - 1) * THRESHOLD_SHIFT;
    const crossFacet = DEMO_FACETS.findIndex((f) => f.name === DEMO_CROSS_LOADING.facet);
    const loading =
      item.code === DEMO_CROSS_LOADING_ITEM
        ? DEMO_CROSS_LOADING.own
        : item.code === DEMO_OFF_DOMAIN_ITEM
          ? DEMO_OFF_DOMAIN_LOADING
          : item.code === DEMO_DOUBLE_NEGATIVE_ITEM
            ? DEMO_DOUBLE_NEGATIVE_LOADING
            : Math.round(drawn * 100) / 100;
    return {
      code: item.code,
      facet,
      loading,
      ownLoading: item.code === DEMO_OFF_DOMAIN_ITEM ? DEMO_OFF_DOMAIN_OWN_LOADING : 0,
      cross:
        item.code === DEMO_CROSS_LOADING_ITEM
          ? { facet: crossFacet, loading: DEMO_CROSS_LOADING.other }
          : null,
      thresholds: BASE_THRESHOLDS.map((t) => Math.round((t + shift) * 100) / 100),
      keying: item.keying,
    };
  });
})();

export type DemoRowKind = 'genuine' | 'straight-liner' | 'random' | 'second-submission';

/** What was planted in each row of the pilot file (file row = index + 2). */
export interface DemoRowTruth {
  row: number;
  id: string;
  kind: DemoRowKind;
  /** The four facet factor scores (genuine rows and second submissions). */
  factors: number[] | null;
  stoppedEarly: boolean;
  speeder: boolean;
  attentionFailed: boolean;
  retestCode: string | null;
}

export interface DemoPilot {
  pilotCsv: string;
  retestCsv: string;
  rows: DemoRowTruth[];
  /** File rows (header = row 1) of each planted kind. */
  straightLinerRows: number[];
  randomResponderRows: number[];
  duplicateIds: string[];
  earlyStopperRows: number[];
}

interface Respondent {
  kind: DemoRowKind;
  factors: number[] | null;
  answers: (number | null)[];
  attention: number;
  seconds: number;
  trips: number | null;
  group: string;
  stoppedEarly: boolean;
  speeder: boolean;
  retestCode: string | null;
  id?: string;
}

/** A Poisson draw by Knuth's product of uniforms (small means only; demo data). */
export function poisson(rng: Rng, mean: number): number {
  const limit = Math.exp(-mean);
  let k = 0;
  let p = rng.next();
  while (p > limit) {
    k++;
    p *= rng.next();
  }
  return k;
}

function shuffle<T>(rng: Rng, values: T[]): T[] {
  for (let i = values.length - 1; i > 0; i--) {
    const j = rng.int(i + 1);
    [values[i], values[j]] = [values[j], values[i]];
  }
  return values;
}

const SCALE_MIN = 1;
const SCALE_MAX = 5;

/**
 * An item's answer from the factors, the off-domain factor and the item's own unique draw `e`
 * (standard normal): the latent response scaled so its variance is 1, cut at the item's thresholds.
 * The pilot and the validation wave share it, so both samples come from one population.
 */
export function demoAnswer(item: DemoItemTruth, factors: number[], own: number, e: number): number {
  const cross = item.cross;
  const common = cross
    ? item.loading ** 2 +
      cross.loading ** 2 +
      2 * item.loading * cross.loading * DEMO_FACTOR_CORRELATIONS[item.facet][cross.facet]
    : item.loading ** 2;
  const unique = Math.sqrt(Math.max(0, 1 - common - item.ownLoading ** 2));
  const latent =
    item.loading * factors[item.facet] +
    (cross ? cross.loading * factors[cross.facet] : 0) +
    item.ownLoading * own +
    unique * e;
  let point = SCALE_MIN;
  for (const t of item.thresholds) if (latent > t) point++;
  return item.keying === 'reverse' ? SCALE_MIN + SCALE_MAX - point : point;
}

function answer(item: DemoItemTruth, factors: number[], own: number, rng: Rng): number {
  return demoAnswer(item, factors, own, rng.normal());
}

function drawFactors(rng: Rng, chol: number[][]): number[] {
  const z = chol.map(() => rng.normal());
  return chol.map((row) => row.reduce((s, l, k) => s + l * z[k], 0));
}

function general(factors: number[]): number {
  return factors.reduce((s, f) => s + f, 0) / factors.length;
}

function genuine(rng: Rng, factors: number[]): Respondent {
  const own = rng.normal();
  const answers: (number | null)[] = DEMO_ITEM_TRUTH.map((item) =>
    rng.next() < MISSING_SHARE ? null : answer(item, factors, own, rng),
  );
  const g = general(factors);
  const noisyG = g + DEMO_GROUP_MODEL.noise * rng.normal();
  const group =
    DEMO_GROUP_MODEL.levels[
      noisyG > DEMO_GROUP_MODEL.cuts[1] ? 2 : noisyG > DEMO_GROUP_MODEL.cuts[0] ? 1 : 0
    ];
  const trips = poisson(rng, Math.exp(DEMO_CRITERION_MODEL.intercept + DEMO_CRITERION_MODEL.slope * g));
  return {
    kind: 'genuine',
    factors,
    answers,
    attention: rng.next() < ATTENTION_SLIP ? 1 + rng.int(3) : DEMO_ATTENTION_ANSWER,
    seconds: Math.round(Math.exp(Math.log(MEDIAN_SECONDS) + LOG_SPREAD * rng.normal())),
    trips: rng.next() < DIARY_NOT_RETURNED ? null : trips,
    group,
    stoppedEarly: false,
    speeder: false,
    retestCode: null,
  };
}

function csvLine(cells: (string | number | null)[]): string {
  return cells.map((c) => (c === null ? '' : String(c))).join(',');
}

/** The pilot file's header: id, group, the items with the attention check after RP05, then the rest. */
function pilotHeader(): string[] {
  const items = DEMO_PILOT_ITEMS.map((it) => it.code);
  const at = items.indexOf(ATTENTION_AFTER) + 1;
  return [
    DEMO_COLUMNS.id,
    DEMO_COLUMNS.group,
    ...items.slice(0, at),
    DEMO_COLUMNS.attention,
    ...items.slice(at),
    DEMO_COLUMNS.duration,
    DEMO_COLUMNS.criterion,
    DEMO_COLUMNS.retestLink,
  ];
}

function coded(value: number | null): number {
  return value ?? DEMO_MISSING_CODE;
}

/**
 * Generates the demo pilot file and its retest file from `seed` (DEMO_PILOT_SEED for the demo study),
 * with what was planted in every row. Deterministic: the same seed gives the same bytes. Cost
 * O(rows × items).
 */
export function generateDemoPilot(seed: number = DEMO_PILOT_SEED): DemoPilot {
  const rng = createRng(seed);
  const chol = cholesky(DEMO_FACTOR_CORRELATIONS.map((row) => [...row]));
  const k = DEMO_ITEM_TRUTH.length;
  const genuineCount = DEMO_PILOT_ROWS - DEMO_STRAIGHT_LINERS - DEMO_RANDOM_RESPONDERS - DEMO_DUPLICATE_IDS;
  const people: Respondent[] = Array.from({ length: genuineCount }, () =>
    genuine(rng, drawFactors(rng, chol)),
  );

  // Early stoppers, speeders and the retest sample come from distinct genuine respondents.
  const order = shuffle(
    rng,
    people.map((_, i) => i),
  );
  let next = 0;
  const take = (n: number) => {
    const taken = order.slice(next, next + n);
    next += n;
    return taken;
  };
  for (const i of take(DEMO_EARLY_STOPPERS)) {
    const p = people[i];
    p.stoppedEarly = true;
    for (let j = k - EARLY_STOP_ITEMS; j < k; j++) p.answers[j] = null;
  }
  for (const i of take(GENUINE_SPEEDERS)) {
    people[i].speeder = true;
    people[i].seconds = Math.round(MEDIAN_SECONDS * (SPEEDER_SHARE + SPEEDER_SPREAD * rng.next()));
  }
  const twice = take(DEMO_DUPLICATE_IDS);
  const retested = take(DEMO_RETEST_RESPONDENTS);

  const careless: Respondent[] = [];
  for (let s = 0; s < DEMO_STRAIGHT_LINERS; s++) {
    const value = STRAIGHT_LINE_VALUES[rng.int(STRAIGHT_LINE_VALUES.length)];
    careless.push({
      kind: 'straight-liner',
      factors: null,
      answers: new Array(k).fill(value),
      attention: value,
      seconds: STRAIGHT_LINE_SECONDS + rng.int(STRAIGHT_LINE_SPREAD),
      trips: rng.next() < CARELESS_DIARY_MISSING ? null : poisson(rng, CARELESS_TRIPS),
      group: DEMO_GROUP_MODEL.levels[rng.int(3)],
      stoppedEarly: false,
      speeder: true,
      retestCode: null,
    });
  }
  for (let s = 0; s < DEMO_RANDOM_RESPONDERS; s++) {
    careless.push({
      kind: 'random',
      factors: null,
      answers: Array.from({ length: k }, () => SCALE_MIN + rng.int(SCALE_MAX - SCALE_MIN + 1)),
      attention: SCALE_MIN + rng.int(SCALE_MAX - SCALE_MIN + 1),
      seconds: Math.round(MEDIAN_SECONDS * (RANDOM_SHARE + RANDOM_SPREAD * rng.next())),
      trips: rng.next() < CARELESS_DIARY_MISSING ? null : poisson(rng, CARELESS_TRIPS),
      group: DEMO_GROUP_MODEL.levels[rng.int(3)],
      stoppedEarly: false,
      speeder: false,
      retestCode: null,
    });
  }
  const seconds: Respondent[] = twice.map((i) => {
    const first = people[i];
    const answers = first.answers.map((a) =>
      a !== null && rng.next() < RESUBMISSION_CHANGES
        ? Math.min(SCALE_MAX, Math.max(SCALE_MIN, a + (rng.next() < HALF ? -1 : 1)))
        : a,
    );
    return {
      ...first,
      kind: 'second-submission' as const,
      answers,
      seconds: Math.round(first.seconds * RESUBMISSION_SPEED),
    };
  });

  const rows = shuffle(rng, [...people, ...careless]);
  rows.forEach((p, r) => {
    p.id = `P${String(r + 1).padStart(4, '0')}`;
  });
  retested.forEach((i, n) => {
    people[i].retestCode = `RT${String(n + 1).padStart(3, '0')}`;
  });
  // A second submission follows its first a few rows later, under the same id.
  for (const [t, i] of twice.entries()) {
    const first = people[i];
    const at = rows.indexOf(first) + 2 + t;
    seconds[t].id = first.id;
    seconds[t].retestCode = null;
    rows.splice(Math.min(at, rows.length), 0, seconds[t]);
  }

  const header = pilotHeader();
  const attentionAt = header.indexOf(DEMO_COLUMNS.attention) - 2;
  const lines = [header.join(',')];
  for (const p of rows) {
    const answers = p.answers.map(coded);
    lines.push(
      csvLine([
        p.id ?? '',
        p.group,
        ...answers.slice(0, attentionAt),
        p.attention,
        ...answers.slice(attentionAt),
        p.seconds,
        p.trips,
        p.retestCode,
      ]),
    );
  }

  const retestLines = [
    [DEMO_COLUMNS.retestLink, ...DEMO_PILOT_ITEMS.map((it) => it.code), DEMO_COLUMNS.duration].join(','),
  ];
  const retestRng = createRng(seed + 1);
  const byCode = retested
    .map((i) => people[i])
    .sort((a, b) => (a.retestCode ?? '').localeCompare(b.retestCode ?? ''));
  for (const p of byCode) {
    const factors = (p.factors as number[]).map(
      (f) => DEMO_RETEST_STABILITY * f + Math.sqrt(1 - DEMO_RETEST_STABILITY ** 2) * retestRng.normal(),
    );
    const own = retestRng.normal();
    const answers = DEMO_ITEM_TRUTH.map((item) =>
      retestRng.next() < RETEST_MISSING_SHARE ? null : answer(item, factors, own, retestRng),
    );
    retestLines.push(
      csvLine([
        p.retestCode,
        ...answers.map(coded),
        Math.round(Math.exp(Math.log(MEDIAN_SECONDS * RETEST_TIME_SHARE) + LOG_SPREAD * retestRng.normal())),
      ]),
    );
  }

  const truth: DemoRowTruth[] = rows.map((p, r) => ({
    row: r + 2,
    id: p.id ?? '',
    kind: p.kind,
    factors: p.factors,
    stoppedEarly: p.stoppedEarly,
    speeder: p.speeder,
    attentionFailed: p.attention !== DEMO_ATTENTION_ANSWER,
    retestCode: p.retestCode,
  }));
  const rowsOf = (kind: DemoRowKind) => truth.filter((t) => t.kind === kind).map((t) => t.row);
  return {
    pilotCsv: `${lines.join('\n')}\n`,
    retestCsv: `${retestLines.join('\n')}\n`,
    rows: truth,
    straightLinerRows: rowsOf('straight-liner'),
    randomResponderRows: rowsOf('random'),
    duplicateIds: twice.map((i) => people[i].id ?? ''),
    earlyStopperRows: truth.filter((t) => t.stoppedEarly && t.kind === 'genuine').map((t) => t.row),
  };
}

/** How the researcher maps the columns the automatic matching leaves alone. */
export const DEMO_PILOT_MAPPING: ColumnMapping = {
  [DEMO_COLUMNS.group]: { role: 'group' },
  [DEMO_COLUMNS.attention]: { role: 'attention', correctAnswer: String(DEMO_ATTENTION_ANSWER) },
  [DEMO_COLUMNS.criterion]: { role: 'criterion' },
  [DEMO_COLUMNS.retestLink]: { role: 'retestLink' },
};

/** The retest file names respondents by their retest code. */
export const DEMO_RETEST_MAPPING: ColumnMapping = { [DEMO_COLUMNS.retestLink]: { role: 'id' } };

export const DEMO_STRAIGHT_LINER_REASON =
  'Straight-lining: the same answer to every item, with no variation at all; these respondents also answered in a fraction of the usual time. Excluded as careless responding (demo).';

const encoder = new TextEncoder();

function importDemoFile(
  study: Study,
  csv: string,
  fileName: string,
  role: 'pilot' | 'retest',
  name: string,
  overrides: ColumnMapping,
): number {
  const bytes = encoder.encode(csv);
  const { plan, read } = planImport(study, bytes, {
    fileName,
    role,
    name,
    mapping: automaticMapping(study, overrides),
    missingCodes: { text: [], numeric: [DEMO_MISSING_CODE] },
    reading: {},
  });
  return storeImport(study, plan, readDelimitedFileNow(read), bytes, { acceptProblems: false });
}

/**
 * The demo's pilot phase, worked through the same functions the screens and the command line use:
 * the pilot file (written as CSV bytes, so the stored file and its hash are real) mapped as the
 * command line maps it (items matched by code, id and duration by name, the other columns given
 * their roles), read with -9 as the missing code, checked and stored; screened; the straight-liners excluded by rule with a logged reason; the retest file
 * imported; the phase signed off. Deterministic (DEMO_PILOT_SEED).
 */
export function fillDemoPilot(study: Study): void {
  const demo = generateDemoPilot();
  const pilot = importDemoFile(
    study,
    demo.pilotCsv,
    DEMO_PILOT_FILE,
    'pilot',
    DEMO_PILOT_NAME,
    DEMO_PILOT_MAPPING,
  );
  screenDataset(study, pilot);
  excludeRespondents(study, pilot, { checks: ['irv'], reason: DEMO_STRAIGHT_LINER_REASON });
  importDemoFile(study, demo.retestCsv, DEMO_RETEST_FILE, 'retest', DEMO_RETEST_NAME, DEMO_RETEST_MAPPING);
  signOffPhase(
    study,
    'pilot',
    'Pilot of 480 rows imported with -9 as missing; 12 straight-liners excluded; duplicate ids, outliers and early stoppers left in for the team to judge during purification (demo).',
  );
}
