import { canonicalJson } from '../../../../db/canonical-json.ts';
import { listFacets } from '../../../../db/repos/construct.ts';
import { insertRound, listDecisions, listRounds, type RoundItem } from '../../../../db/repos/purification.ts';
import type { Study } from '../../../../db/study.ts';
import { BOUND_TOLERANCE, type MissingMethod } from '../../../engine/item-stats.ts';
import { DEFAULT_CI_LEVEL } from '../../../engine/reliability.ts';
import { MIN_BOOTSTRAP_RESAMPLES } from '../../../engine/reliability/bootstrap.ts';
import { reverseScore, type ScaleBounds } from '../../../engine/scoring.ts';
import { JOBS, type RoundJobInput, type RoundJobOutput } from '../../../workers/jobs.ts';
import { analysisData } from '../../analysis-data.ts';
import { recordRun, requireOpen } from '../../change.ts';
import { declaredBounds } from '../../analysis-data.ts';
import { RuleError } from '../../errors.ts';
import { PHASE, workingSet } from '../standing.ts';
import { flagItem, type ItemFlag, ROUND_RULES } from '../rules/flags.ts';
import { type RoundSummary, roundSummaries } from '../views/rounds.ts';
import type { ItemDistribution, RoundResults } from '../results.ts';
import {
  type FacetFactorRow,
  type FactorRequest,
  factorFlags,
  factorRequestFor,
  LOADING_RULES,
} from '../rules/factor.ts';

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
  /** The round's factor analysis; null: none. Left out, it runs with its defaults. */
  factor?: FactorRequest | null;
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
  /** Why the round runs no factor analysis (null when it runs one). */
  factorNote: string | null;
  /** What the round depends on, to check nothing changed while it ran. */
  fingerprint: string;
}

export type { ItemDistribution, RoundResults } from '../results.ts';

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
  const factor = factorRequestFor(request.factor, {
    items: ws.items.length,
    facets: facetGroups.length,
    missing: options.missing,
    round: number,
  });
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
      ...(factor.request ? { factor: factor.request } : {}),
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
    options: {
      ...options,
      factor: factor.request,
      rules: { ...ROUND_RULES, ...(factor.request ? LOADING_RULES : {}) },
    },
    factorNote: factor.note,
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

/**
 * What a round stores as its results: the job's output, the item distributions, the rule-of-thumb
 * flags (item analysis and, with a factor analysis, the loading flags), the facet-by-factor table, and
 * why there is no factor analysis. `facetNames` are the names stored with the round's inputs. The one
 * assembly for storing a round and for re-running it.
 */
export function roundResults(
  result: RoundJobOutput,
  items: RoundItem[],
  facetNames: Map<number, string>,
  distributions: Record<string, ItemDistribution>,
  factorNote: string | null,
): RoundResults {
  const flags: Record<string, ItemFlag[]> = {};
  for (const item of result.scale.items) flags[item.name] = flagItem(item, result.scale);
  let correspondence: FacetFactorRow[] = [];
  if (result.factor) {
    const loading = factorFlags(result.factor, items, facetNames);
    correspondence = loading.correspondence;
    for (const [code, extra] of Object.entries(loading.flags))
      flags[code] = [...(flags[code] ?? []), ...extra];
  }
  return {
    ...result,
    distributions,
    flags,
    correspondence,
    factorNote: result.factorRefused
      ? `the factor analysis could not run: ${result.factorRefused}`
      : factorNote,
  };
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
  const facetNames = new Map(
    (prepared.inputs.facets as { facetId: number; name: string }[]).map((f) => [f.facetId, f.name]),
  );
  const results = roundResults(
    result,
    prepared.items,
    facetNames,
    prepared.distributions,
    prepared.factorNote,
  );
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
