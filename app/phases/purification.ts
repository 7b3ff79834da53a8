import { canonicalJson } from '../../db/canonical-json.ts';
import { getRun } from '../../db/repos/analysis-runs.ts';
import { type FacetRecord, getConstruct, listFacets } from '../../db/repos/construct.ts';
import {
  currentDatasetChoice,
  currentExclusions,
  type DatasetSummary,
  loadEncodedDataset,
} from '../../db/repos/datasets.ts';
import { getItemByCode, type ItemRecord, listItems } from '../../db/repos/items.ts';
import { getPhaseStatus } from '../../db/repos/phase-state.ts';
import {
  type DecisionAction,
  type DecisionRecord,
  getDecision,
  getRound,
  insertDecision,
  insertRound,
  listDecisions,
  listRounds,
  type RoundItem,
  type RoundRecord,
} from '../../db/repos/purification.ts';
import type { Study } from '../../db/study.ts';
import { BOUND_TOLERANCE, type MissingMethod } from '../engine/item-stats.ts';
import { DEFAULT_CI_LEVEL, type ItemAnalysis, type ItemResult } from '../engine/reliability.ts';
import {
  meetsCriterion,
  type ReliabilityCriterion,
  reliabilityCriterion,
} from '../engine/reliability/criterion.ts';
import { methodEntry, ruleThreshold } from '../engine/methods/index.ts';
import { MIN_BOOTSTRAP_RESAMPLES } from '../engine/reliability/bootstrap.ts';
import { reverseScore, type ScaleBounds } from '../engine/scoring.ts';
import { JOBS, type RoundJobInput, type RoundJobOutput } from '../workers/jobs.ts';
import { analysisData } from './analysis-data.ts';
import { changeInPhase, recordRun, requireOpen } from './change.ts';
import { currentPilotDataset, declaredBounds } from './analysis-data.ts';
import { RuleError } from './errors.ts';
import { MIN_ITEMS_PER_FACET } from './items/index.ts';
import type { ChecklistItem, PhaseRules } from './types.ts';

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
  | 'no-variance';

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
];

export interface ItemFlag {
  rule: FlagRule;
  /** What was seen, with the number: "corrected item-total r = .12". */
  text: string;
}

/** Bootstrap resamples of a round unless the researcher asks otherwise. */
export const DEFAULT_BOOTSTRAP_RESAMPLES = 1_000;
/** Fewest and most bootstrap resamples a round accepts (the fewest is the engine's, one rule). */
export { MIN_BOOTSTRAP_RESAMPLES };
export const MAX_BOOTSTRAP_RESAMPLES = 20_000;

/** How a round is run. Every field is stored with the round. */
export interface RoundRequest {
  missing?: MissingMethod;
  ciLevel?: number;
  /** null: no bootstrap (Feldt's interval only). Seed defaults to the round's number, so a rerun repeats it. */
  bootstrap?: { resamples?: number; seed?: number } | null;
}

/** A round ready to run: the engine input and everything that is stored with the result. */
export interface PreparedRound {
  studyPath: string;
  number: number;
  startedFromRound: number | null;
  datasetId: number;
  items: RoundItem[];
  job: RoundJobInput;
  inputs: Record<string, unknown>;
  options: Record<string, unknown>;
  seed: number | null;
  distributions: Record<string, ItemDistribution>;
  /** What the round depends on, to check nothing changed while it ran. */
  fingerprint: string;
}

/** How often each response category was given (scored values: reverse-keyed items reversed). */
export interface ItemDistribution {
  /** Counts for each category from the declared minimum to the maximum. */
  counts: number[];
  missing: number;
  /** Answers that are not one of the categories (e.g. 2.5). */
  offCategory: number;
}

/** What a stored round's analysis run holds in `results`. */
export interface RoundResults extends RoundJobOutput {
  distributions: Record<string, ItemDistribution>;
  flags: Record<string, ItemFlag[]>;
}

const PHASE = 'purification';

/** Where each item stands after every decision so far. */
export interface ItemStanding {
  item: ItemRecord;
  /** The drop decision in force, if the item is out. */
  droppedBy: DecisionRecord | null;
  /** The facet the item belongs to now: the pool's, or the latest move's. */
  facetId: number | null;
  /** The move in force, if any. */
  movedBy: DecisionRecord | null;
  decisions: DecisionRecord[];
}

function standingsOf(items: ItemRecord[], decisions: DecisionRecord[]): Map<number, ItemStanding> {
  const out = new Map<number, ItemStanding>();
  for (const item of items) {
    out.set(item.id, { item, droppedBy: null, facetId: item.facetId, movedBy: null, decisions: [] });
  }
  for (const d of decisions) {
    const s = out.get(d.itemId);
    if (!s) continue;
    s.decisions.push(d);
    if (d.action === 'drop') s.droppedBy = d;
    else if (d.action === 'restore') s.droppedBy = null;
    else if (d.action === 'move') {
      s.facetId = d.toFacetId;
      s.movedBy = d;
    }
  }
  return out;
}

/** Item codes of the dataset's item columns, looked up without regard to letter case. */
function datasetCodes(study: Study, datasetId: number): Map<string, string> {
  const encoded = loadEncodedDataset(study, datasetId);
  const out = new Map<string, string>();
  for (const column of encoded?.columns ?? []) {
    if (column.role === 'item' && column.itemCode) out.set(column.itemCode.toLowerCase(), column.itemCode);
  }
  return out;
}

interface WorkingSet {
  pilot: DatasetSummary;
  standings: Map<number, ItemStanding>;
  /** Items in the next round: in the pool, in the data, not dropped; pool order. */
  items: RoundItem[];
  /** The dataset's own spelling of each round item's code. */
  dataCodes: string[];
  notInData: string[];
}

function workingSet(study: Study): WorkingSet {
  const pilot = currentPilotDataset(study);
  if (!pilot) {
    throw new RuleError(
      'no pilot data has been imported yet; import the pilot responses in the Pilot data phase first',
      'no-data',
    );
  }
  const codes = datasetCodes(study, pilot.id);
  const pool = listItems(study).filter((it) => it.state !== 'retired');
  const standings = standingsOf(pool, listDecisions(study));
  const items: RoundItem[] = [];
  const dataCodes: string[] = [];
  const notInData: string[] = [];
  for (const item of pool) {
    const inData = codes.get(item.code.toLowerCase());
    if (!inData) {
      notInData.push(item.code);
      continue;
    }
    const s = standings.get(item.id) as ItemStanding;
    if (s.droppedBy) continue;
    items.push({ itemId: item.id, code: item.code, facetId: s.facetId, keying: item.keying });
    dataCodes.push(inData);
  }
  return { pilot, standings, items, dataCodes, notInData };
}

function fingerprintOf(parts: {
  datasetId: number;
  fileSha256: string;
  excludedRespondents: number[];
  items: RoundItem[];
  bounds: ScaleBounds;
}): string {
  return canonicalJson(parts);
}

function checkRequest(request: RoundRequest, number: number) {
  const missing = request.missing ?? 'listwise';
  const ciLevel = request.ciLevel ?? DEFAULT_CI_LEVEL;
  if (!(ciLevel > 0 && ciLevel < 1)) {
    throw new RuleError(`the confidence level must lie strictly between 0 and 1 (got ${ciLevel})`);
  }
  let bootstrap: { resamples: number; seed: number } | null = null;
  if (request.bootstrap !== null) {
    const resamples = request.bootstrap?.resamples ?? DEFAULT_BOOTSTRAP_RESAMPLES;
    const seed = request.bootstrap?.seed ?? number;
    if (
      !Number.isInteger(resamples) ||
      resamples < MIN_BOOTSTRAP_RESAMPLES ||
      resamples > MAX_BOOTSTRAP_RESAMPLES
    ) {
      throw new RuleError(
        `bootstrap resamples must be a whole number from ${MIN_BOOTSTRAP_RESAMPLES} to ${MAX_BOOTSTRAP_RESAMPLES} (got ${resamples})`,
      );
    }
    if (!Number.isInteger(seed) || seed < 0 || seed > 0xffff_ffff) {
      throw new RuleError(`the bootstrap seed must be a whole number from 0 to 4294967295 (got ${seed})`);
    }
    bootstrap = { resamples, seed };
  }
  return { missing, ciLevel, bootstrap };
}

export function distributionOf(values: (number | null)[], bounds: ScaleBounds): ItemDistribution {
  const counts = new Array<number>(bounds.max - bounds.min + 1).fill(0);
  let missing = 0;
  let offCategory = 0;
  for (const x of values) {
    if (x === null) {
      missing++;
      continue;
    }
    const index = Math.round(x - bounds.min);
    if (Math.abs(x - bounds.min - index) <= BOUND_TOLERANCE && index >= 0 && index < counts.length)
      counts[index]++;
    else offCategory++;
  }
  return { counts, missing, offCategory };
}

/**
 * Gets the next round ready: the current pilot data minus the current exclusions, the items still in
 * (every decision so far applied), reverse keys from the item pool applied with the construct's
 * declared bounds (the stored responses are never changed). Refuses a signed-off phase, missing
 * pilot data, fewer than two items or respondents, and answers outside the declared bounds (named by
 * respondent and item).
 */
export function prepareRound(study: Study, request: RoundRequest = {}): PreparedRound {
  requireOpen(study, PHASE);
  const ws = workingSet(study);
  const rounds = listRounds(study);
  const number = (rounds.at(-1)?.number ?? 0) + 1;
  const options = checkRequest(request, number);
  if (ws.items.length < 2) {
    throw new RuleError(
      `a round needs at least two items; ${ws.items.length === 0 ? 'none is' : 'only one is'} left in the pilot data "${ws.pilot.name}"`,
    );
  }
  const bounds = declaredBounds(study);
  const read = analysisData(study, ws.pilot.id, ws.dataCodes);
  const { provenance } = read;
  if (read.data.length < 2) {
    throw new RuleError(
      `pilot data "${ws.pilot.name}" has ${read.data.length} respondent(s) left after ${provenance.excluded} exclusion(s); a round needs at least two`,
      'no-data',
    );
  }
  read.data.forEach((row, r) => {
    row.forEach((x, c) => {
      if (x !== null && (x < bounds.min - BOUND_TOLERANCE || x > bounds.max + BOUND_TOLERANCE)) {
        throw new RuleError(
          `pilot data "${ws.pilot.name}", respondent ${read.respondentIds[r]}, column ${ws.dataCodes[c]}: ` +
            `the answer ${x} lies outside the declared response range ${bounds.min}–${bounds.max} (Construct phase, response format)`,
          'bounds',
        );
      }
    });
  });
  const names = ws.items.map((it) => it.code);
  const reverse = ws.items.filter((it) => it.keying === 'reverse').map((it) => it.code);
  const scored = reverseScore(read.data, names, reverse, bounds);
  const facetIds = [...new Set(ws.items.map((it) => it.facetId).filter((f): f is number => f !== null))];
  const facetNames = new Map(listFacets(study, { includeRetired: true }).map((f) => [f.id, f.name]));
  const facetGroups = facetIds.map((facetId) => ({
    facetId,
    name: facetNames.get(facetId) ?? `facet ${facetId}`,
    items: ws.items.filter((it) => it.facetId === facetId).map((it) => it.code),
  }));
  const distributions: Record<string, ItemDistribution> = {};
  names.forEach((name, c) => {
    distributions[name] = distributionOf(
      scored.map((row) => row[c]),
      bounds,
    );
  });
  const items = ws.items;
  const revisionOf = new Map([...ws.standings.values()].map((s) => [s.item.id, s.item.revisionId]));
  return {
    studyPath: study.path,
    number,
    startedFromRound: rounds.at(-1)?.id ?? null,
    datasetId: ws.pilot.id,
    items,
    job: {
      names,
      data: scored,
      missing: options.missing,
      ciLevel: options.ciLevel,
      bounds,
      bootstrap: options.bootstrap ?? undefined,
      facets: facetGroups
        .filter((f) => f.items.length >= 2)
        .map(({ facetId, items: codes }) => ({ facetId, items: codes })),
    },
    inputs: {
      round: number,
      startedFromRound: rounds.at(-1)?.number ?? null,
      dataset: {
        id: ws.pilot.id,
        name: ws.pilot.name,
        fileName: ws.pilot.fileName,
        fileSha256: provenance.fileSha256,
        respondentsInFile: provenance.respondentsInFile,
        excluded: provenance.excluded,
        excludedRespondents: provenance.excludedRespondents,
        analysedRows: read.data.length,
      },
      items: items.map((it) => ({ ...it, revisionId: revisionOf.get(it.itemId) ?? null })),
      reverseKeyed: reverse,
      bounds,
      facets: facetGroups,
      decisionsApplied: listDecisions(study).map((d) => d.id),
    },
    options: { ...options, rules: ROUND_RULES },
    seed: options.bootstrap?.seed ?? null,
    distributions,
    fingerprint: fingerprintOf({
      datasetId: ws.pilot.id,
      fileSha256: provenance.fileSha256,
      excludedRespondents: provenance.excludedRespondents,
      items,
      bounds,
    }),
  };
}

/** The reliability criterion for this study, chosen from the construct's stated use of scores. */
export function criterionFor(study: Study): ReliabilityCriterion {
  return reliabilityCriterion(getConstruct(study).scoreUse);
}

/** "meets" or "below" the criterion, with the criterion and its source, for checklist text. */
function criterionNote(summary: RoundSummary, criterion: ReliabilityCriterion): string {
  return `${summary.meetsCriterion ? 'meets' : 'below'} the ${fmt(criterion.minimum, 2)} criterion for ${criterion.useName}, ${criterion.citation}`;
}

function fmt(x: number, digits = 2): string {
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

/**
 * Stores a finished round: its analysis run (exact inputs, options, seed, engine version, results)
 * with the log row, and the round itself, in one transaction. Refuses when the study, the data, the
 * exclusions, the item set or the keys changed while the round ran, or another round was stored.
 */
export function storeRound(study: Study, prepared: PreparedRound, result: RoundJobOutput): RoundSummary {
  if (study.path !== prepared.studyPath) {
    throw new RuleError('this round was started on another study; run it again on this one', 'stale');
  }
  const now = prepareRound(study, prepared.options as RoundRequest);
  if (now.number !== prepared.number) {
    throw new RuleError(
      `round ${prepared.number} was stored while this one ran; run the round again`,
      'stale',
    );
  }
  if (now.fingerprint !== prepared.fingerprint) {
    throw new RuleError(
      `the pilot data, its exclusions, the item keys or the decisions changed while round ${prepared.number} ran; nothing was stored: run it again`,
      'stale',
    );
  }
  const flags: Record<string, ItemFlag[]> = {};
  for (const item of result.scale.items) flags[item.name] = flagItem(item, result.scale);
  const results: RoundResults = { ...result, distributions: prepared.distributions, flags };
  let id = 0;
  recordRun(
    study,
    {
      phase: PHASE,
      kind: 'purification-round',
      label: `purification round ${prepared.number} (${prepared.items.length} items, n = ${result.scale.n})`,
      inputs: prepared.inputs,
      options: prepared.options,
      seed: prepared.seed,
      results,
    },
    (runId) => {
      id = insertRound(study, {
        number: prepared.number,
        datasetId: prepared.datasetId,
        items: prepared.items,
        runId,
        startedFromRound: prepared.startedFromRound,
      });
    },
  );
  return roundSummaries(study).find((r) => r.id === id) as RoundSummary;
}

/**
 * Runs the next round in this thread and stores it (the demo, the command line and tests; the app
 * runs rounds in a worker through `prepareRound` and `storeRound`).
 */
export function runRound(study: Study, request: RoundRequest = {}): RoundSummary {
  const prepared = prepareRound(study, request);
  const result = JOBS['purification.round'](prepared.job, {
    progress: () => undefined,
    shouldStop: () => false,
  });
  return storeRound(study, prepared, result);
}

/** One round as the history lists it. */
export interface RoundSummary {
  id: number;
  number: number;
  runId: number;
  createdAt: string;
  actor: string;
  datasetId: number;
  datasetName: string;
  items: string[];
  k: number;
  n: number;
  respondentsInFile: number;
  excluded: number;
  missing: MissingMethod;
  missingText: string;
  alpha: number;
  /** Whether alpha reaches the study's reliability criterion (`criterionFor`). */
  meetsCriterion: boolean;
  ci: { level: number; lower: number; upper: number };
  bootstrapCI: { level: number; lower: number; upper: number; resamples: number; seed: number } | null;
  omega: number | null;
  sem: number | null;
  /** Items in the round before that are not in this one. */
  left: string[];
  /** Items in this round that were not in the round before. */
  returned: string[];
  /** Whether the round ran on the current pilot data with the current exclusions. */
  onCurrentData: boolean;
  /** Why the round is out of date (null when it ran on the current data), in words. */
  outOfDate: string | null;
}

/**
 * Why a round no longer reflects the data analyses use: another dataset made current (or none), or
 * the exclusions changed since. Null when the round ran on the current data.
 */
function outOfDateReason(
  study: Study,
  pilot: DatasetSummary | undefined,
  excludedNow: number[],
  inputs: StoredInputs,
): string | null {
  const ran = `"${inputs.dataset.name}" (dataset ${inputs.dataset.id})`;
  if (!pilot) {
    const choice = currentDatasetChoice(study, 'pilot');
    return `ran on ${ran}; no pilot dataset is current now${choice ? ` (withdrawn ${choice.decidedAt.slice(0, 10)}: ${choice.reason})` : ''}`;
  }
  if (pilot.id !== inputs.dataset.id || pilot.fileSha256 !== inputs.dataset.fileSha256) {
    const choice = currentDatasetChoice(study, 'pilot');
    return `ran on ${ran}; the current pilot data is now "${pilot.name}" (dataset ${pilot.id})${choice ? `, chosen ${choice.decidedAt.slice(0, 10)}: ${choice.reason}` : ''}`;
  }
  if (canonicalJson(excludedNow) !== canonicalJson(inputs.dataset.excludedRespondents)) {
    return `the exclusions from "${pilot.name}" changed after this round (${inputs.dataset.excluded} then, ${excludedNow.length} now)`;
  }
  return null;
}

interface StoredInputs {
  dataset: {
    id: number;
    name: string;
    fileSha256: string;
    respondentsInFile: number;
    excluded: number;
    excludedRespondents: number[];
  };
  bounds: ScaleBounds;
  facets: { facetId: number; name: string; items: string[] }[];
}

function storedRound(study: Study, round: RoundRecord) {
  const run = getRun(study, round.runId);
  if (!run) throw new RuleError(`round ${round.number} has lost its analysis run ${round.runId}`, 'corrupt');
  return { run, inputs: run.inputs as unknown as StoredInputs, results: run.results as RoundResults };
}

/** Every round with its headline numbers, oldest first. */
export function roundSummaries(study: Study): RoundSummary[] {
  const criterion = criterionFor(study);
  const pilot = currentPilotDataset(study);
  const excludedNow = pilot ? [...currentExclusions(study, pilot.id).keys()].sort((a, b) => a - b) : [];
  let before: string[] = [];
  return listRounds(study).map((round) => {
    const { run, inputs, results } = storedRound(study, round);
    const scale = results.scale;
    const codes = round.items.map((it) => it.code);
    const summary: RoundSummary = {
      id: round.id,
      number: round.number,
      runId: round.runId,
      createdAt: run.createdAt,
      actor: run.actor,
      datasetId: round.datasetId,
      datasetName: inputs.dataset.name,
      items: codes,
      k: scale.k,
      n: scale.n,
      respondentsInFile: inputs.dataset.respondentsInFile,
      excluded: inputs.dataset.excluded,
      missing: scale.missingData.method,
      missingText: scale.missingData.description,
      alpha: scale.alpha.value,
      meetsCriterion: meetsCriterion(scale.alpha.value, criterion),
      ci: { level: scale.alphaCI.level, lower: scale.alphaCI.lower, upper: scale.alphaCI.upper },
      bootstrapCI: scale.bootstrapCI && {
        level: scale.bootstrapCI.level,
        lower: scale.bootstrapCI.lower,
        upper: scale.bootstrapCI.upper,
        resamples: scale.bootstrapCI.resamples,
        seed: scale.bootstrapCI.seed,
      },
      omega: scale.omegaTotal?.value ?? null,
      sem: scale.measurementError?.sem ?? null,
      left: before.filter((c) => !codes.includes(c)),
      returned: before.length === 0 ? [] : codes.filter((c) => !before.includes(c)),
      onCurrentData: false,
      outOfDate: outOfDateReason(study, pilot, excludedNow, inputs),
    };
    summary.onCurrentData = summary.outOfDate === null;
    before = codes;
    return summary;
  });
}

/** One row of a round's item table. */
export interface RoundItemRow {
  code: string;
  itemId: number;
  text: string;
  keying: 'forward' | 'reverse';
  facetId: number | null;
  facetName: string | null;
  facetDefinition: string;
  stats: ItemResult;
  /** The same item within its facet's own analysis; null when the facet has fewer than two items. */
  withinFacet: {
    correctedItemTotal: number | null;
    alphaIfDeleted: number | null;
    facetAlpha: number;
  } | null;
  flags: ItemFlag[];
  distribution: ItemDistribution;
  /** Decisions on this item made on this round. */
  decisions: DecisionView[];
  /** Whether the item is dropped now (by a decision on this round or a later one). */
  droppedNow: boolean;
}

export interface FacetResult {
  facetId: number;
  name: string;
  definition: string;
  items: string[];
  analysis: ItemAnalysis | null;
  /** Why there is no analysis, or what to watch. */
  note: string | null;
}

export interface RoundDetail {
  summary: RoundSummary;
  /** The study's reliability criterion, from the construct's stated use of scores. */
  criterion: ReliabilityCriterion;
  isLatest: boolean;
  engineVersion: string;
  options: Record<string, unknown>;
  seed: number | null;
  bounds: ScaleBounds;
  scale: ItemAnalysis;
  facets: FacetResult[];
  rows: RoundItemRow[];
  rules: readonly RuleOfThumb[];
  /** The rules of thumb the round was flagged against, as stored with it. */
  thresholds: typeof ROUND_RULES;
}

/** A round with everything its screen shows, read back from the stored run. */
export function roundDetail(study: Study, roundId: number): RoundDetail {
  const round = getRound(study, roundId);
  if (!round) throw new RuleError(`there is no purification round ${roundId} in this study`, 'not-found');
  const { run, inputs, results } = storedRound(study, round);
  const facets = new Map(listFacets(study, { includeRetired: true }).map((f) => [f.id, f]));
  const pool = new Map(listItems(study).map((it) => [it.id, it]));
  const decisions = decisionViews(study);
  const standings = standingsOf([...pool.values()], listDecisions(study));
  const facetResults: FacetResult[] = inputs.facets.map((group) => {
    const analysed = results.facets.find((f) => f.facetId === group.facetId);
    const facet = facets.get(group.facetId);
    let note: string | null = null;
    if (!analysed) note = `only ${group.items.length} item in this round: alpha needs at least two`;
    else if (group.items.length < ROUND_RULES.minItemsPerFacet) {
      note = `${group.items.length} items: fewer than ${ROUND_RULES.minItemsPerFacet} (common practice)`;
    }
    return {
      facetId: group.facetId,
      name: facet?.name ?? group.name,
      definition: facet?.definition ?? '',
      items: group.items,
      analysis: analysed?.analysis ?? null,
      note,
    };
  });
  const rows: RoundItemRow[] = round.items.map((it) => {
    const stats = results.scale.items.find((x) => x.name === it.code) as ItemResult;
    const facet = it.facetId === null ? undefined : facets.get(it.facetId);
    const inFacet = facetResults.find((f) => f.facetId === it.facetId)?.analysis;
    const facetStats = inFacet?.items.find((x) => x.name === it.code);
    return {
      code: it.code,
      itemId: it.itemId,
      text: pool.get(it.itemId)?.text ?? '',
      keying: it.keying,
      facetId: it.facetId,
      facetName: facet?.name ?? null,
      facetDefinition: facet?.definition ?? '',
      stats,
      withinFacet:
        inFacet && facetStats
          ? {
              correctedItemTotal: facetStats.correctedItemTotal,
              alphaIfDeleted: facetStats.alphaIfDeleted,
              facetAlpha: inFacet.alpha.value,
            }
          : null,
      flags: results.flags[it.code] ?? [],
      distribution: results.distributions[it.code],
      decisions: decisions.filter((d) => d.roundId === round.id && d.itemId === it.itemId),
      droppedNow: standings.get(it.itemId)?.droppedBy !== null,
    };
  });
  const summaries = roundSummaries(study);
  return {
    summary: summaries.find((s) => s.id === round.id) as RoundSummary,
    isLatest: summaries.at(-1)?.id === round.id,
    engineVersion: run.engineVersion,
    options: run.options,
    seed: run.seed ?? null,
    bounds: inputs.bounds,
    scale: results.scale,
    facets: facetResults,
    rows,
    rules: RULES_OF_THUMB,
    criterion: criterionFor(study),
    thresholds: (run.options as { rules?: typeof ROUND_RULES }).rules ?? ROUND_RULES,
  };
}

/** A decision as the history shows it. */
export interface DecisionView extends DecisionRecord {
  roundNumber: number;
  runId: number;
  fromFacet: string | null;
  toFacet: string | null;
  /** The decision that reversed this one, if any. */
  reversedBy: number | null;
  /** Whether this decision still shapes the item set (a drop or move not undone since). */
  inForce: boolean;
}

/** Every decision, oldest first, with its round and what became of it. */
export function decisionViews(study: Study): DecisionView[] {
  const rounds = new Map(listRounds(study).map((r) => [r.id, r]));
  const names = new Map(listFacets(study, { includeRetired: true }).map((f) => [f.id, f.name]));
  const all = listDecisions(study);
  const reversedBy = new Map(
    all.filter((d) => d.reversesId !== null).map((d) => [d.reversesId as number, d.id]),
  );
  const standings = standingsOf(listItems(study), all);
  return all.map((d) => {
    const s = standings.get(d.itemId);
    const round = rounds.get(d.roundId) as RoundRecord;
    return {
      ...d,
      roundNumber: round.number,
      runId: round.runId,
      fromFacet: d.fromFacetId === null ? null : (names.get(d.fromFacetId) ?? null),
      toFacet: d.toFacetId === null ? null : (names.get(d.toFacetId) ?? null),
      reversedBy: reversedBy.get(d.id) ?? null,
      inForce: s !== undefined && (s.droppedBy?.id === d.id || s.movedBy?.id === d.id),
    };
  });
}

export interface DecisionRequest {
  /** The round the decision is made on; default the latest. Only the latest round takes decisions. */
  roundId?: number;
  itemCode: string;
  action: DecisionAction;
  /** For a move: the facet the item goes to. */
  toFacetId?: number;
  /** How the item relates to the construct's domain (the facet's definition). */
  domainRationale: string;
  /** What the round's statistics show. */
  statisticalRationale: string;
  /** Set when the decision undoes the change logged in this row (its `seq`). */
  reversesRow?: number;
}

/**
 * One decision, with one pair of reasons, on several items at once: each item still gets its own
 * decision and its own log row, and either every one is recorded or (when one is refused) none is.
 * Returns the new decisions' ids in the order of `itemCodes`.
 */
export function decideItems(
  study: Study,
  request: Omit<DecisionRequest, 'itemCode'> & { itemCodes: string[] },
): number[] {
  const codes = [...new Set(request.itemCodes.map((c) => c.trim()))].filter((c) => c !== '');
  if (codes.length === 0) throw new RuleError('choose at least one item for the decision');
  const { itemCodes: _all, ...common } = request;
  return study.db.transaction(() => codes.map((itemCode) => decideItem(study, { ...common, itemCode })))();
}

const ACTION_VERB: Record<DecisionAction, string> = {
  drop: 'dropping',
  keep: 'keeping',
  move: 'moving',
  restore: 'restoring',
};

const ACTION_KIND: Record<DecisionAction, string> = {
  drop: 'item-dropped',
  keep: 'item-kept',
  move: 'item-moved',
  restore: 'item-restored',
};

function latestRound(study: Study, roundId: number | undefined): RoundRecord {
  const rounds = listRounds(study);
  const latest = rounds.at(-1);
  if (!latest) throw new RuleError('run a round first: decisions are made on a round’s results', 'no-round');
  if (roundId === undefined || roundId === latest.id) return latest;
  const asked = rounds.find((r) => r.id === roundId);
  if (!asked) throw new RuleError(`there is no purification round ${roundId} in this study`, 'not-found');
  throw new RuleError(
    `decisions are made on the latest round (round ${latest.number}); round ${asked.number} is kept as history`,
  );
}

function activeFacet(study: Study, id: number): FacetRecord {
  const facet = listFacets(study).find((f) => f.id === id);
  if (!facet) throw new RuleError(`facet ${id} is not an active facet of this study`, 'not-found');
  return facet;
}

/**
 * Records a drop, keep, move or restore of one item on the latest round, with both rationales, in
 * the log (its row cites the round's analysis run). A drop without a domain rationale is accepted
 * and marked "statistics only"; a move needs one; every decision needs at least one of the two.
 * A restore reverses the drop in force; a drop reverses a keep or restore in force; a move back
 * to the facet an item came from reverses that move. Returns the decision id.
 */
export function decideItem(study: Study, request: DecisionRequest): number {
  requireOpen(study, PHASE);
  const round = latestRound(study, request.roundId);
  const item = getItemByCode(study, request.itemCode.trim());
  if (!item) throw new RuleError(`there is no item "${request.itemCode}" in the item pool`, 'not-found');
  const domain = request.domainRationale.trim();
  const statistical = request.statisticalRationale.trim();
  const standing = standingsOf([item], listDecisions(study)).get(item.id) as ItemStanding;
  const inRound = round.items.some((it) => it.itemId === item.id);
  const action = request.action;
  const what = `${ACTION_VERB[action]} item ${item.code}`;
  if (action === 'restore') {
    if (!standing.droppedBy)
      throw new RuleError(`item ${item.code} is not dropped, so there is nothing to restore`);
  } else {
    if (standing.droppedBy) {
      const by = decisionViews(study).find((d) => d.id === standing.droppedBy?.id);
      throw new RuleError(
        `item ${item.code} was dropped in round ${by?.roundNumber}; restore it before ${ACTION_VERB[action]} it`,
      );
    }
    if (!inRound) {
      throw new RuleError(
        `item ${item.code} was not analysed in round ${round.number}; run a round that includes it first`,
      );
    }
  }
  let toFacet: FacetRecord | null = null;
  if (action === 'move') {
    if (request.toFacetId === undefined) throw new RuleError(`say which facet item ${item.code} moves to`);
    toFacet = activeFacet(study, request.toFacetId);
    if (toFacet.id === standing.facetId) {
      throw new RuleError(`item ${item.code} is already in facet "${toFacet.name}"`);
    }
    if (domain === '') {
      throw new RuleError(
        `moving item ${item.code} to facet "${toFacet.name}" is a judgement about the construct’s domain: say how its content fits that facet’s definition`,
      );
    }
  } else if (request.toFacetId !== undefined) {
    throw new RuleError(`only a move names a facet to go to; ${what} does not`);
  }
  if (domain === '' && statistical === '') {
    throw new RuleError(
      `give a rationale for ${what}: how it relates to the construct’s domain, and what the statistics show`,
    );
  }
  let reversesId: number | null = null;
  const last = standing.decisions.at(-1);
  if (action === 'restore') reversesId = standing.droppedBy?.id ?? null;
  else if (action === 'drop' && last && (last.action === 'keep' || last.action === 'restore'))
    reversesId = last.id;
  else if (action === 'move' && standing.movedBy && standing.movedBy.fromFacetId === toFacet?.id) {
    reversesId = standing.movedBy.id;
  }
  const statisticsOnly = action === 'drop' && domain === '';
  const names = new Map(listFacets(study, { includeRetired: true }).map((f) => [f.id, f.name]));
  const fromFacet = standing.facetId === null ? null : (names.get(standing.facetId) ?? null);
  const reversed = reversesId === null ? null : getDecision(study, reversesId);
  const lines: string[] = [];
  if (statisticsOnly) lines.push('Statistics only: no reason about the construct’s domain was given.');
  else if (domain !== '') lines.push(`Domain: ${domain}`);
  if (statistical !== '') lines.push(`Statistics: ${statistical}`);
  return changeInPhase(
    study,
    {
      phase: PHASE,
      kind: ACTION_KIND[action],
      target: `item ${item.code}${toFacet ? ` to facet "${toFacet.name}"` : ''}${statisticsOnly ? ' (statistics only)' : ''}`,
      rationale: lines.join('\n'),
      runId: round.runId,
      detail: {
        round: round.number,
        itemId: item.id,
        code: item.code,
        action,
        fromFacet,
        toFacet: toFacet?.name ?? null,
        domainRationale: domain,
        statisticalRationale: statistical,
        statisticsOnly,
        reversesDecision: reversed ? { action: reversed.action, decidedAt: reversed.decidedAt } : null,
        ...(request.reversesRow === undefined ? {} : { reverses: request.reversesRow }),
      },
    },
    () =>
      insertDecision(study, {
        roundId: round.id,
        itemId: item.id,
        itemCode: item.code,
        action,
        fromFacetId: standing.facetId,
        toFacetId: toFacet?.id ?? null,
        domainRationale: domain,
        statisticalRationale: statistical,
        statisticsOnly,
        reversesId,
      }),
  );
}

/**
 * Reverses an earlier decision with a new one on the latest round: a drop by a restore, a restore by
 * a drop, a move by a move back. Only a decision still in force can be reversed; a keep changes
 * nothing, so it is withdrawn by dropping or moving the item instead. Returns the new decision id.
 */
export function reverseDecision(
  study: Study,
  decisionId: number,
  rationale: { domainRationale: string; statisticalRationale: string; reversesRow?: number },
): number {
  const d = getDecision(study, decisionId);
  if (!d) throw new RuleError(`there is no item decision ${decisionId} in this study`, 'not-found');
  const view = decisionViews(study).find((v) => v.id === decisionId) as DecisionView;
  if (view.reversedBy !== null) {
    throw new RuleError(`that ${d.action} of item ${d.itemCode} has already been reversed`);
  }
  const standing = standingsOf(listItems(study), listDecisions(study)).get(d.itemId);
  const code = standing?.item.code ?? d.itemCode;
  if (d.action === 'keep') {
    throw new RuleError(
      `keeping item ${code} changed nothing to undo; to take it out, drop it (the drop records that it reverses this keep)`,
    );
  }
  if (d.action === 'drop') {
    if (standing?.droppedBy?.id !== d.id)
      throw new RuleError(`that drop of item ${code} is no longer in force`);
    return decideItem(study, { itemCode: code, action: 'restore', ...rationale });
  }
  if (d.action === 'restore') {
    const lastDropOrRestore = standing?.decisions
      .filter((x) => x.action === 'drop' || x.action === 'restore')
      .at(-1);
    if (lastDropOrRestore?.id !== d.id || standing?.droppedBy) {
      throw new RuleError(`that restore of item ${code} is no longer in force`);
    }
    return decideItem(study, { itemCode: code, action: 'drop', ...rationale });
  }
  if (standing?.movedBy?.id !== d.id) throw new RuleError(`that move of item ${code} is no longer in force`);
  if (d.fromFacetId === null)
    throw new RuleError(`item ${code} had no facet before that move, so there is none to move it back to`);
  return decideItem(study, { itemCode: code, action: 'move', toFacetId: d.fromFacetId, ...rationale });
}

/** An item of the pool as the workbench lists it. */
export interface PoolItemView {
  itemId: number;
  code: string;
  text: string;
  keying: 'forward' | 'reverse';
  facetId: number | null;
  facetName: string | null;
  poolFacetId: number | null;
  status: 'in' | 'dropped' | 'not-in-data';
  droppedBy: DecisionView | null;
}

/** Everything the workbench shows besides one round's detail. */
export function purificationView(study: Study) {
  const pilot = currentPilotDataset(study);
  const facets = listFacets(study, { includeRetired: true });
  const names = new Map(facets.map((f) => [f.id, f.name]));
  const decisions = decisionViews(study);
  const rounds = roundSummaries(study);
  let items: PoolItemView[] = [];
  let next: { items: string[]; respondents: number; excluded: number; pendingDecisions: number } | null =
    null;
  if (pilot) {
    const ws = workingSet(study);
    const inSet = new Set(ws.items.map((it) => it.itemId));
    items = [...ws.standings.values()].map((s) => ({
      itemId: s.item.id,
      code: s.item.code,
      text: s.item.text,
      keying: s.item.keying,
      facetId: s.facetId,
      facetName: s.facetId === null ? null : (names.get(s.facetId) ?? null),
      poolFacetId: s.item.facetId,
      status: inSet.has(s.item.id) ? 'in' : ws.notInData.includes(s.item.code) ? 'not-in-data' : 'dropped',
      droppedBy: s.droppedBy ? (decisions.find((d) => d.id === s.droppedBy?.id) ?? null) : null,
    }));
    const excluded = currentExclusions(study, pilot.id).size;
    const lastRound = listRounds(study).at(-1);
    next = {
      items: ws.items.map((it) => it.code),
      respondents: pilot.respondents - excluded,
      excluded,
      pendingDecisions: lastRound
        ? decisions.filter((d) => d.id > lastDecisionBefore(study, lastRound)).length
        : 0,
    };
  }
  return {
    status: getPhaseStatus(study, PHASE),
    pilot: pilot
      ? {
          id: pilot.id,
          name: pilot.name,
          fileName: pilot.fileName,
          fileSha256: pilot.fileSha256,
          respondents: pilot.respondents,
        }
      : null,
    bounds: declaredBounds(study),
    facets: facets
      .filter((f) => !f.retiredAt)
      .map((f) => ({ id: f.id, name: f.name, definition: f.definition })),
    items,
    next,
    rounds,
    decisions,
    rules: RULES_OF_THUMB,
    criterion: criterionFor(study),
  };
}

/** The id of the last decision taken into account by a round (0 if none). */
function lastDecisionBefore(study: Study, round: RoundRecord): number {
  const run = getRun(study, round.runId);
  const applied = (run?.inputs as { decisionsApplied?: number[] } | undefined)?.decisionsApplied ?? [];
  return applied.length === 0 ? 0 : Math.max(...applied);
}

function plural(n: number, one: string, many = `${one}s`): string {
  return `${n} ${n === 1 ? one : many}`;
}

function checklist(study: Study): ChecklistItem[] {
  const pilot = currentPilotDataset(study);
  const rounds = roundSummaries(study);
  const last = rounds.at(-1);
  const decisions = decisionViews(study);
  const out: ChecklistItem[] = [];

  out.push({
    id: 'round-on-current-data',
    label: 'At least one round on the current pilot data',
    met: last?.onCurrentData === true,
    detail: !pilot
      ? 'no pilot data imported yet'
      : !last
        ? 'no round yet'
        : last.onCurrentData
          ? `round ${last.number} on "${last.datasetName}": ${last.n} respondents analysed after ${plural(last.excluded, 'exclusion')}`
          : `round ${last.number} is out of date: ${last.outOfDate}; run a new round`,
  });

  const lastRound = listRounds(study).at(-1);
  const after = lastRound ? decisions.filter((d) => d.id > lastDecisionBefore(study, lastRound)) : [];
  const changing = after.filter((d) => d.action !== 'keep');
  out.push({
    id: 'final-round-current',
    label: 'The final round includes every drop, move and restore',
    met: last !== undefined && changing.length === 0,
    detail: !last
      ? 'no round yet'
      : changing.length === 0
        ? `round ${last.number} reflects every decision`
        : `${plural(changing.length, 'decision')} since round ${last.number} (${changing.map((d) => `${d.action} ${d.itemCode}`).join(', ')}): run round ${last.number + 1}`,
  });

  const standingDrops = decisions.filter((d) => d.action === 'drop' && d.inForce);
  const statisticsOnly = standingDrops.filter((d) => d.statisticsOnly);
  out.push({
    id: 'drops-have-domain-rationale',
    label: 'Every dropped item has a reason about the construct’s domain',
    met: statisticsOnly.length === 0,
    detail:
      standingDrops.length === 0
        ? 'no item dropped'
        : statisticsOnly.length === 0
          ? `${plural(standingDrops.length, 'item')} dropped, each with a domain rationale`
          : `dropped on statistics only: ${statisticsOnly.map((d) => `${d.itemCode} (round ${d.roundNumber})`).join(', ')}; restore and drop again with the domain reason, or keep the item`,
  });

  out.push({
    id: 'alpha-with-ci',
    label: 'The final round reports alpha with its confidence interval',
    met: last !== undefined,
    detail: last
      ? `α = ${fmt(last.alpha, 3)} (${criterionNote(last, criterionFor(study))}), ${Math.round(last.ci.level * 100)}% CI ${fmt(last.ci.lower, 3)} to ${fmt(last.ci.upper, 3)} (Feldt), n = ${last.n}, ${last.missing} deletion`
      : 'no round yet',
  });

  if (lastRound && last) {
    const detail = roundDetail(study, lastRound.id);
    const undecided = detail.rows
      .filter((row) => row.flags.length > 0 && !row.droppedNow)
      .filter((row) => !decisions.some((d) => d.itemId === row.itemId))
      .map((row) => row.code);
    out.push({
      id: 'flagged-items-decided',
      label: 'Every item flagged in the final round has a decision',
      met: undecided.length === 0,
      detail:
        undecided.length === 0
          ? 'each flagged item was kept, moved or dropped with a reason'
          : `no decision yet on ${undecided.join(', ')}`,
    });
    const thin = detail.facets.filter((f) => f.items.length < ROUND_RULES.minItemsPerFacet);
    out.push({
      id: 'facets-keep-items',
      label: `Every facet keeps at least ${ROUND_RULES.minItemsPerFacet} items (common practice)`,
      met: thin.length === 0,
      detail:
        thin.length === 0
          ? detail.facets.map((f) => `${f.name}: ${f.items.length}`).join('; ')
          : thin.map((f) => `${f.name}: ${plural(f.items.length, 'item')}`).join('; '),
    });
  } else {
    out.push({
      id: 'flagged-items-decided',
      label: 'Every item flagged in the final round has a decision',
      met: false,
      detail: 'no round yet',
    });
  }
  return out;
}

export const purificationRules: PhaseRules = {
  id: PHASE,
  purpose: 'Analyse items and reliability in rounds; keep, move or drop items with reasons.',
  holds(study) {
    const rounds = roundSummaries(study);
    const last = rounds.at(-1);
    if (!last) return [];
    const dropped = decisionViews(study).filter((d) => d.action === 'drop' && d.inForce).length;
    const retained = currentPilotDataset(study) ? workingSet(study).items.length : last.k;
    return [
      plural(rounds.length, 'round'),
      `α = ${fmt(last.alpha, 2)} in round ${last.number} (${last.meetsCriterion ? 'meets' : 'below'} the ${fmt(criterionFor(study).minimum, 2)} criterion)`,
      `${plural(retained, 'item')} retained`,
      ...(dropped > 0 ? [`${dropped} dropped`] : []),
    ];
  },
  checklist,
};
