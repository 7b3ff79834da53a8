import type { DatasetSummary } from '../../../db/repos/datasets.ts';
import type { Study } from '../../../db/study.ts';
import { type IccResult, iccMeasurementError, intraclassCorrelations } from '../../engine/icc.ts';
import type { MeasurementError } from '../../engine/reliability/sem.ts';
import { scaleScores } from '../../engine/validity/scores.ts';
import { currentDataset } from '../analysis-data.ts';
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

function totals(study: Study, dataset: DatasetSummary, items: string[], reverse: string[]) {
  const answers = itemAnswers(study, dataset, items);
  const total = scaleScores(
    items,
    answers.data,
    [{ name: 'total', items, reverse }],
    'sum',
    answers.bounds,
  ).total;
  return { answers, total };
}

/**
 * Test–retest reliability of the total score: the current retest dataset's respondents linked to
 * the first occasion by respondent id (or, where the first dataset has one, its retest-link
 * column), first the current validation data and, when it links no one, the current pilot data (the
 * run says which). The six Shrout–Fleiss forms with their McGraw–Wong intervals, and SEM and MDC95
 * from ICC(2,1). Registry: `icc.shrout-fleiss`, `icc.mcgraw-wong-ci`, `icc.sem`, `icc.mdc95`.
 */
export function runRetest(study: Study): number {
  requireOpen(study, PHASE);
  const retest = currentDataset(study, 'retest');
  if (!retest) throw new RuleError('no retest data is current; import the retest responses first', 'no-data');
  const items = modelInForce(study).model.factors.flatMap((f) => f.items);
  const keying = new Map(retainedItems(study).items.map((it) => [it.code, it.keying]));
  const reverse = items.filter((c) => keying.get(c) === 'reverse');
  const second = totals(study, retest, items, reverse);
  const secondById = new Map(second.answers.respondentIds.map((id, i) => [id.trim(), second.total[i]]));
  let best: {
    first: DatasetSummary;
    linkedBy: RetestResults['linkedBy'];
    pairs: [number | null, number | null][];
    source: DataSource;
  } | null = null;
  for (const role of ['validation', 'pilot'] as const) {
    const first = currentDataset(study, role);
    if (!first) continue;
    const t1 = totals(study, first, items, reverse);
    const side = sideColumns(study, first.id);
    for (const [linkedBy, keys] of [
      ['retest link', side.retestLinks],
      ['respondent id', t1.answers.respondentIds],
    ] as const) {
      if (!keys) continue;
      const pairs: [number | null, number | null][] = [];
      keys.forEach((key, i) => {
        const k = key?.trim();
        if (k && secondById.has(k)) pairs.push([t1.total[i], secondById.get(k) ?? null]);
      });
      if (pairs.length > 0 && (!best || pairs.length > best.pairs.length))
        best = { first, linkedBy, pairs, source: t1.answers.source };
    }
    if (best) break;
  }
  if (!best) {
    throw new RuleError(
      `no respondent of the retest data "${retest.name}" links to the current validation or pilot data by respondent id or retest link`,
    );
  }
  const complete = best.pairs.filter((p): p is [number, number] => p[0] !== null && p[1] !== null);
  if (complete.length < 3)
    throw new RuleError(`only ${complete.length} linked respondents answered every item on both occasions`);
  const icc = intraclassCorrelations(complete);
  const form = icc.forms.find((f) => f.form === RETEST_FORM);
  if (!form) throw new RuleError(`${RETEST_FORM} is missing from the result`);
  const error = iccMeasurementError(complete, Math.max(form.value, 0));
  const results: RetestResults = {
    icc,
    form: RETEST_FORM,
    sem: error.sem,
    mdc95: error.mdc95,
    measurementError: error,
    pairs: complete.length,
    unmatched: second.answers.respondentIds.length - best.pairs.length,
    incomplete: best.pairs.length - complete.length,
    first: { datasetId: best.first.id, name: best.first.name, role: best.first.role },
    linkedBy: best.linkedBy,
    points: complete.slice(0, 2_000),
  };
  return recordRun(study, {
    phase: PHASE,
    kind: 'retest',
    label: `Retest: "${best.first.name}" with "${retest.name}" (${complete.length} pairs)`,
    inputs: {
      first: best.source,
      second: second.answers.source,
      items,
      reverse,
      model: modelInForce(study).model,
    },
    options: {
      score: 'sum of the retained items, reverse keys applied',
      level: icc.level,
      semFrom: RETEST_FORM,
    },
    seed: null,
    results,
  });
}
