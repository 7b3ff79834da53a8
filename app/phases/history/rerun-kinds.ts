import { listFacets } from '../../../db/repos/construct.ts';
import { getDatasetSummary, loadEncodedDataset } from '../../../db/repos/datasets.ts';
import { listItems } from '../../../db/repos/items.ts';
import { getForm, listExperts, listImports, listRatings } from '../../../db/repos/review.ts';
import type { Study } from '../../../db/study.ts';
import { decodeColumn } from '../../engine/columnar.ts';
import { analyzeContentValidity, type ExpertRating } from '../../engine/content.ts';
import type { MissingMethod } from '../../engine/item-stats.ts';
import { type ScreeningOptions, screenRespondents } from '../../engine/screening.ts';
import { reverseScore, type ScaleBounds } from '../../engine/scoring.ts';
import { JOBS } from '../../workers/jobs.ts';
import { RuleError } from '../errors.ts';
import { distributionOf, type ItemFactorRequestStored, roundResults } from '../purification/index.ts';
import { VALIDITY_RERUNS } from '../validity/rerun.ts';
import { InputsGone, type RerunKind } from './rerun-kind.ts';

/** The stored dataset a run read, by id; a break when the study no longer holds it. */
function storedDataset(study: Study, datasetId: unknown) {
  const id = Number(datasetId);
  const summary = getDatasetSummary(study, id);
  const encoded = loadEncodedDataset(study, id);
  if (!summary || !encoded) throw new RuleError(`dataset ${String(datasetId)} is no longer in the study`);
  return { summary, encoded };
}

interface StoredRoundInputs {
  dataset: { id: number; excludedRespondents: number[] };
  items: { itemId?: number; code: string; facetId?: number | null; keying: 'forward' | 'reverse' }[];
  reverseKeyed: string[];
  bounds: ScaleBounds;
  facets: { facetId: number; name?: string; items: string[] }[];
}

interface StoredRoundOptions {
  missing: MissingMethod;
  ciLevel: number;
  bootstrap: { resamples: number; seed: number } | null;
  /** Absent in rounds stored before rounds ran a factor analysis. */
  factor?: ItemFactorRequestStored | null;
}

/**
 * A round stored before rounds ran a factor analysis and reported Guttman's lambdas: its re-run is
 * compared without those parts, which the round never had.
 */
function withoutFactorParts(results: Record<string, unknown>): Record<string, unknown> {
  const { factor: _f, factorRefused: _r, correspondence: _c, factorNote: _n, ...rest } = results;
  const strip = (a: Record<string, unknown>) => {
    const { lambda2: _l2, lambda6: _l6, ...other } = a;
    return other;
  };
  const scale = strip(rest.scale as Record<string, unknown>);
  const facets = (rest.facets as { facetId: number; analysis: Record<string, unknown> }[]).map((f) => ({
    ...f,
    analysis: strip(f.analysis),
  }));
  return { ...rest, scale, facets };
}

/**
 * A purification round: the stored pilot rows of the round's items, minus the respondents the round
 * recorded as excluded (not today's exclusions), reverse-scored with the stored keys and bounds,
 * through the same job the round ran, with its stored options and bootstrap seed; then the item
 * distributions and the rule-of-thumb flags the round stored beside the analysis.
 */
const purificationRound: RerunKind = {
  title: 'purification round',
  rerun(study, run) {
    const inputs = run.inputs as unknown as StoredRoundInputs;
    const options = run.options as unknown as StoredRoundOptions;
    const { summary, encoded } = storedDataset(study, inputs.dataset.id);
    const byCode = new Map(
      encoded.columns
        .filter((c) => c.role === 'item' && c.itemCode)
        .map((c) => [(c.itemCode as string).toLowerCase(), c]),
    );
    const names = inputs.items.map((it) => it.code);
    const columns = names.map((code) => {
      const column = byCode.get(code.toLowerCase());
      if (!column) throw new RuleError(`dataset "${summary.name}" has no column for item ${code}`);
      return decodeColumn(column.encoded);
    });
    const excluded = new Set(inputs.dataset.excludedRespondents);
    const raw: (number | null)[][] = [];
    for (let r = 0; r < encoded.n; r++) {
      if (excluded.has(r)) continue;
      raw.push(columns.map((values) => (Number.isNaN(values[r]) ? null : values[r])));
    }
    const scored = reverseScore(raw, names, inputs.reverseKeyed, inputs.bounds);
    const result = JOBS['purification.round'](
      {
        names,
        data: scored,
        missing: options.missing,
        ciLevel: options.ciLevel,
        bounds: inputs.bounds,
        bootstrap: options.bootstrap ?? undefined,
        facets: inputs.facets
          .filter((f) => f.items.length >= 2)
          .map(({ facetId, items }) => ({ facetId, items })),
        ...(options.factor ? { factor: options.factor } : {}),
      },
      { progress: () => undefined, shouldStop: () => false },
    );
    const distributions: Record<string, ReturnType<typeof distributionOf>> = {};
    names.forEach((name, c) => {
      distributions[name] = distributionOf(
        scored.map((row) => row[c]),
        inputs.bounds,
      );
    });
    const stored = run.results as Record<string, unknown>;
    const facetNames = new Map(inputs.facets.map((f) => [f.facetId, f.name ?? `facet ${f.facetId}`]));
    const out = roundResults(
      result,
      inputs.items.map((it) => ({
        itemId: it.itemId ?? 0,
        code: it.code,
        facetId: it.facetId ?? null,
        keying: it.keying,
      })),
      facetNames,
      distributions,
      (stored.factorNote as string | null | undefined) ?? null,
    );
    if (!('factor' in stored)) return withoutFactorParts(out as unknown as Record<string, unknown>);
    return out;
  },
};

/**
 * Respondent screening: every respondent of the stored dataset (excluded or not, as screening
 * covers the whole file), the raw answers of its item columns, its duration column and attention
 * checks, with the stored thresholds.
 */
const screening: RerunKind = {
  title: 'respondent screening',
  rerun(study, run) {
    const { encoded } = storedDataset(study, run.inputs.datasetId);
    const items = encoded.columns.filter((c) => c.role === 'item');
    const duration = encoded.columns.find((c) => c.role === 'duration');
    const { mahalanobis: _described, ...options } = run.options as ScreeningOptions & {
      mahalanobis?: string;
    };
    return screenRespondents(
      {
        ids: encoded.ids,
        items: items.map((c) => ({ name: c.itemCode ?? c.name, values: decodeColumn(c.encoded) })),
        ...(duration ? { durations: decodeColumn(duration.encoded) } : {}),
        attention: encoded.attention.map((a) => ({ name: a.name, outcomes: a.outcomes })),
        rowNumbers: encoded.rowNumbers,
      },
      options,
    );
  },
};

/** The log row that recorded a run (the first citing it); the newest row when none does. */
function recordedAt(study: Study, runId: number): number {
  const row = study.db
    .prepare(
      'SELECT coalesce((SELECT min(seq) FROM decision_log WHERE run_id = ?), (SELECT max(seq) FROM decision_log)) AS seq',
    )
    .get(runId) as { seq: number | null };
  return row.seq ?? 0;
}

/**
 * Names by id as they stood at log row `seq`: the current ones, with every rename logged after
 * that row undone (newest first), from the rename rows' `before` values.
 */
function namesAt(
  study: Study,
  seq: number,
  kind: 'item-edited' | 'facet-renamed',
  idKey: 'itemId' | 'facetId',
  field: 'code' | 'name',
  current: readonly { id: number; code: string }[],
): Map<number, string> {
  const names = new Map(current.map((c) => [c.id, c.code]));
  const rows = study.db
    .prepare('SELECT detail FROM decision_log WHERE kind = ? AND seq > ? ORDER BY seq DESC')
    .all(kind, seq) as { detail: string }[];
  for (const row of rows) {
    const detail = JSON.parse(row.detail) as Record<string, unknown>;
    const change = detail[field] as { before?: unknown } | undefined;
    const id = detail[idKey];
    if (typeof id === 'number' && typeof change?.before === 'string') names.set(id, change.before);
  }
  return names;
}

interface StoredReviewInputs {
  roundId: number;
  round: number;
  ratings: number;
  files: { fileName: string; sha256: string }[];
}

interface StoredReviewOptions {
  scale: { min: number; max: number };
  hasEssential: boolean;
  intendedFacets: Record<string, string>;
}

/** The engine's warning that the stored run replaced when the form did not ask the essential question. */
const ENGINE_NO_ESSENTIAL = 'no essential column';

/**
 * Content-validity statistics of an expert-review round: the stored ratings of the files the run
 * lists (by name and SHA-256), with the stored scale and intended facets; items in the stored
 * order. Ratings of a file withdrawn from the round after the run are no longer stored, so such a
 * run cannot be re-run (InputsGone), which the withdrawal's own log row explains.
 */
const contentValidity: RerunKind = {
  title: 'content-validity statistics',
  rerun(study, run) {
    const inputs = run.inputs as unknown as StoredReviewInputs;
    const options = run.options as unknown as StoredReviewOptions;
    const imports = listImports(study, inputs.roundId);
    const importIds = new Set<number>();
    for (const file of inputs.files) {
      const found = imports.find((i) => i.fileName === file.fileName && i.sha256 === file.sha256);
      if (!found) throw new RuleError(`the ratings file "${file.fileName}" is no longer on record`);
      if (found.withdrawnAt) {
        throw new InputsGone(
          `the ratings from "${file.fileName}" were withdrawn from review round ${inputs.round} on ${found.withdrawnAt.slice(0, 10)}, after this run; they are no longer stored`,
        );
      }
      importIds.add(found.id);
    }
    const experts = new Map(listExperts(study, inputs.roundId).map((e) => [e.id, e.code]));
    // Item codes and facet names as they were when the run was stored: renames since then undone.
    const seq = recordedAt(study, run.id);
    const items = namesAt(study, seq, 'item-edited', 'itemId', 'code', listItems(study));
    const facets = namesAt(
      study,
      seq,
      'facet-renamed',
      'facetId',
      'name',
      listFacets(study, { includeRetired: true }).map((f) => ({ id: f.id, code: f.name })),
    );
    const ratings: ExpertRating[] = listRatings(study, inputs.roundId)
      .filter((r) => importIds.has(r.importId))
      .map((r) => ({
        item: items.get(r.itemId) ?? String(r.itemId),
        expert: experts.get(r.expertId) ?? String(r.expertId),
        relevance: r.relevance,
        essential: r.essential,
        facet: r.facetId === null ? null : (facets.get(r.facetId) ?? null),
      }));
    const report = analyzeContentValidity({ ratings, ...options });
    if (!getForm(study, inputs.roundId).asksEssential) {
      report.warnings = [
        `the rating form of round ${inputs.round} did not ask the essential question, so CVR is not computed (Lawshe 1975)`,
        ...report.warnings.filter((w) => !w.startsWith(ENGINE_NO_ESSENTIAL)),
      ];
    }
    const stored = (run.results as { items?: { item: string }[] }).items ?? [];
    const order = new Map(stored.map((it, i) => [it.item, i]));
    report.items.sort((a, b) => (order.get(a.item) ?? stored.length) - (order.get(b.item) ?? stored.length));
    return report;
  },
};

/**
 * Every kind of stored analysis run that `project verify` re-runs, by the `kind` the phase stored
 * it under. A phase that stores a new kind of run adds its entry here (see DEVELOPERS.md); a kind
 * without one is listed by verify as not re-run.
 */
export const RERUN_KINDS: Readonly<Record<string, RerunKind>> = {
  'purification-round': purificationRound,
  screening,
  'content-validity': contentValidity,
  ...VALIDITY_RERUNS,
};
