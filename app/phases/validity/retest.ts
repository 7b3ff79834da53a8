import type { DatasetSummary } from '../../../db/repos/datasets.ts';
import type { Study } from '../../../db/study.ts';
import {
  DEFAULT_ICC_LEVEL,
  type IccResult,
  iccMeasurementError,
  intraclassCorrelations,
} from '../../engine/icc.ts';
import type { MeasurementError } from '../../engine/reliability/sem.ts';
import type { ScaleBounds } from '../../engine/scoring.ts';
import { scaleScores } from '../../engine/validity/scores.ts';
import { currentDataset, declaredBounds } from '../analysis-data.ts';
import { recordRun, requireOpen } from '../change.ts';
import { RuleError } from '../errors.ts';
import { type DataSource, itemAnswers, PHASE, retainedItems, sideColumns } from './data.ts';
import { modelInForce } from './model.ts';

/** The ICC form whose SEM and MDC are reported: agreement of single scores, two-way random (common practice). */
export const RETEST_FORM = 'ICC(2,1)';

export interface RetestResults {
  icc: IccResult;
  form: string;
  sem: number;
  mdc95: number;
  /** The measurement error as the engine gives it (basis, reliability, SD, SEM, MDC95). */
  measurementError: MeasurementError;
  pairs: number;
  /** Retest respondents with no first occasion, or a missing answer on either occasion. */
  unmatched: number;
  incomplete: number;
  /** The dataset of the first occasion (the current validation data, else the current pilot data). */
  first: { datasetId: number; name: string; role: string };
  /** How the occasions were linked: by respondent id, or by the first dataset's retest-link column. */
  linkedBy: 'respondent id' | 'retest link';
  points: [number, number][];
}

/** How the total score of each occasion is made: the items, those reverse-keyed, the declared bounds. */
export interface RetestScore {
  items: string[];
  reverse: string[];
  bounds: ScaleBounds;
}

/** One occasion's respondents with their total scores. */
export interface Occasion {
  dataset: DatasetSummary;
  source: DataSource;
  respondentIds: string[];
  total: (number | null)[];
}

/** The total score of every respondent of a dataset (its current exclusions left out). */
export function occasion(study: Study, dataset: DatasetSummary, score: RetestScore): Occasion {
  const answers = itemAnswers(study, dataset, score.items);
  const total = scaleScores(
    score.items,
    answers.data,
    [{ name: 'total', items: score.items, reverse: score.reverse }],
    'sum',
    score.bounds,
  ).total;
  return { dataset, source: answers.source, respondentIds: answers.respondentIds, total };
}

/** The first occasion's respondents paired with their retest totals. */
export interface RetestLink {
  first: Occasion;
  linkedBy: RetestResults['linkedBy'];
  pairs: [number | null, number | null][];
}

/**
 * Pairs a first-occasion dataset's respondents with the retest's, by its retest-link column (when
 * it has one) or by respondent id, whichever links more; null when neither links anyone.
 */
export function linkOccasions(
  study: Study,
  dataset: DatasetSummary,
  score: RetestScore,
  second: Occasion,
): RetestLink | null {
  const secondById = new Map(second.respondentIds.map((id, i) => [id.trim(), second.total[i]]));
  const first = occasion(study, dataset, score);
  const side = sideColumns(study, dataset.id);
  let best: RetestLink | null = null;
  for (const [linkedBy, keys] of [
    ['retest link', side.retestLinks],
    ['respondent id', first.respondentIds],
  ] as const) {
    if (!keys) continue;
    const pairs: [number | null, number | null][] = [];
    keys.forEach((key, i) => {
      const k = key?.trim();
      if (k && secondById.has(k)) pairs.push([first.total[i], secondById.get(k) ?? null]);
    });
    if (pairs.length > 0 && (!best || pairs.length > best.pairs.length)) best = { first, linkedBy, pairs };
  }
  return best;
}

/**
 * The retest statistics of linked occasions: the six Shrout–Fleiss forms with their McGraw–Wong
 * intervals at `level`, and SEM and MDC95 from ICC(2,1). The one computation behind the action
 * and its re-run. Registry: `icc.shrout-fleiss`, `icc.mcgraw-wong-ci`, `icc.sem`, `icc.mdc95`.
 */
export function retestAnalysis(link: RetestLink, second: Occasion, level: number): RetestResults {
  const complete = link.pairs.filter((p): p is [number, number] => p[0] !== null && p[1] !== null);
  if (complete.length < 3)
    throw new RuleError(`only ${complete.length} linked respondents answered every item on both occasions`);
  const icc = intraclassCorrelations(complete, level);
  const form = icc.forms.find((f) => f.form === RETEST_FORM);
  if (!form) throw new RuleError(`${RETEST_FORM} is missing from the result`);
  const error = iccMeasurementError(complete, Math.max(form.value, 0));
  const first = link.first.dataset;
  return {
    icc,
    form: RETEST_FORM,
    sem: error.sem,
    mdc95: error.mdc95,
    measurementError: error,
    pairs: complete.length,
    unmatched: second.respondentIds.length - link.pairs.length,
    incomplete: link.pairs.length - complete.length,
    first: { datasetId: first.id, name: first.name, role: first.role },
    linkedBy: link.linkedBy,
    points: complete.slice(0, 2_000),
  };
}

/**
 * Test–retest reliability of the total score: the current retest dataset's respondents linked to
 * the first occasion by respondent id (or, where the first dataset has one, its retest-link
 * column), first the current validation data and, when it links no one, the current pilot data (the
 * run says which); see retestAnalysis. Stored as one run with its log row; its inputs hold what
 * the analysis needs to compute it again.
 */
export function runRetest(study: Study): number {
  requireOpen(study, PHASE);
  const retest = currentDataset(study, 'retest');
  if (!retest) throw new RuleError('no retest data is current; import the retest responses first', 'no-data');
  const model = modelInForce(study).model;
  const items = model.factors.flatMap((f) => f.items);
  const keying = new Map(retainedItems(study).items.map((it) => [it.code, it.keying]));
  const score: RetestScore = {
    items,
    reverse: items.filter((c) => keying.get(c) === 'reverse'),
    bounds: declaredBounds(study),
  };
  const second = occasion(study, retest, score);
  let link: RetestLink | null = null;
  for (const role of ['validation', 'pilot'] as const) {
    const first = currentDataset(study, role);
    link = first ? linkOccasions(study, first, score, second) : null;
    if (link) break;
  }
  if (!link) {
    throw new RuleError(
      `no respondent of the retest data "${retest.name}" links to the current validation or pilot data by respondent id or retest link`,
    );
  }
  const results = retestAnalysis(link, second, DEFAULT_ICC_LEVEL);
  return recordRun(study, {
    phase: PHASE,
    kind: 'retest',
    label: `Retest: "${link.first.dataset.name}" with "${retest.name}" (${results.pairs} pairs)`,
    inputs: {
      first: link.first.source,
      second: second.source,
      items,
      reverse: score.reverse,
      bounds: score.bounds,
      model,
    },
    options: {
      score: 'sum of the retained items, reverse keys applied',
      level: results.icc.level,
      semFrom: RETEST_FORM,
    },
    seed: null,
    results,
  });
}
