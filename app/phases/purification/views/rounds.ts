import { canonicalJson } from '../../../../db/canonical-json.ts';
import { getRun } from '../../../../db/repos/analysis-runs.ts';
import { listFacets } from '../../../../db/repos/construct.ts';
import {
  currentDatasetChoice,
  currentExclusions,
  type DatasetSummary,
} from '../../../../db/repos/datasets.ts';
import { listItems } from '../../../../db/repos/items.ts';
import { getRound, listDecisions, listRounds, type RoundRecord } from '../../../../db/repos/purification.ts';
import type { Study } from '../../../../db/study.ts';
import type { MissingMethod } from '../../../engine/item-stats.ts';
import type { ItemAnalysis, ItemResult } from '../../../engine/reliability.ts';
import { meetsCriterion, type ReliabilityCriterion } from '../../../engine/reliability/criterion.ts';
import type { ScaleBounds } from '../../../engine/scoring.ts';
import { currentPilotDataset } from '../../analysis-data.ts';
import { RuleError } from '../../errors.ts';
import { standingsOf } from '../standing.ts';
import { type RoundFactorView, roundFactorView } from './factor.ts';
import {
  criterionFor,
  type ItemFlag,
  ROUND_RULES,
  type RuleOfThumb,
  RULES_OF_THUMB,
} from '../rules/flags.ts';
import type { ItemDistribution, RoundResults } from '../results.ts';
import { type DecisionView, decisionViews } from './decisions.ts';

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

export interface StoredInputs {
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

export function storedRound(study: Study, round: RoundRecord) {
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
  /** The round's factor analysis (null: none, and `factorNote` says why). */
  factor: RoundFactorView | null;
  factorNote: string | null;
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
    ...roundFactorView(
      results,
      round.items,
      new Map([...facets.values()].map((f) => [f.id, f.name])),
      (run.options as { rules?: Record<string, number> }).rules ?? {},
    ),
  };
}
