import { listFacets } from '../../../db/repos/construct.ts';
import { getRevision, type ItemRecord, listItems } from '../../../db/repos/items.ts';
import {
  type DecisionRecord,
  type ExpertRecord,
  type ImportRecord,
  latestRoundRun,
  listDecisions,
  listImports,
  listRatings,
  listRoundItems,
  listRounds,
  type ReviewForm,
  type RoundRecord,
} from '../../../db/repos/review.ts';
import type { Study } from '../../../db/study.ts';
import {
  BENCHMARK_PRECISION,
  type ContentValidityReport,
  formatRatio,
  ICVI_BENCHMARK_LARGE_PANEL,
  type ItemContentValidity,
  LARGE_PANEL,
  MIN_PANEL_FOR_BENCHMARK,
  RATIO_TOLERANCE,
  SCVI_AVE_BENCHMARK,
} from '../../engine/content.ts';
import { checkItemWording } from '../../engine/wording.ts';
import { MAX_RATINGS_FILE_BYTES } from '../../import/ratings/index.ts';

import {
  ANALYSIS_KIND,
  RELEVANCE_ANCHORS,
  type RoundContext,
  analyzeRound,
  packetSections,
  roundCandidates,
  roundContext,
  storedEngineRatings,
} from './round-data.ts';

export interface RoundItemView {
  /** The content-validity benchmarks the item meets in this round, each with its source. */
  benchmarksMet: string[];
  /** Wording checks that flag the rated wording (common practice in item writing); they stand whatever the ratings. */
  wordingFlags: string[];
  itemId: number;
  code: string;
  /** The wording the experts rated (or will rate, until ratings arrive). */
  text: string;
  revision: number;
  /** True when the item has been reworded since this round's wording. */
  rewordedSince: boolean;
  facetName: string | null;
  state: ItemRecord['state'];
  stats: ItemContentValidity | null;
  /** The item's number in the printed review packet. */
  packetNumber: number;
  decision: (DecisionRecord & { newText: string | null }) | null;
  comments: { expert: string; text: string }[];
}

export interface RoundView {
  id: number;
  number: number;
  label: string;
  createdAt: string;
  form: ReviewForm;
  experts: (ExpertRecord & { ratings: number })[];
  imports: ImportRecord[];
  ratingCount: number;
  items: RoundItemView[];
  report: Omit<ContentValidityReport, 'items'> | null;
  runId: number | null;
  flagged: number;
  decided: number;
}

export function roundView(study: Study, round: RoundRecord): RoundView {
  const ctx = roundContext(study, round.id);
  const analysis = analyzeRound(study, ctx, storedEngineRatings(study, round.id));
  const decisions = new Map<number, DecisionRecord>();
  for (const d of listDecisions(study, round.id)) decisions.set(d.itemId, d);
  const ratings = listRatings(study, round.id);
  const expertCode = new Map(ctx.experts.map((e) => [e.id, e.code]));
  const facetNames = new Map(listFacets(study, { includeRetired: true }).map((f) => [f.id, f.name]));
  const frozen = new Map(listRoundItems(study, round.id).map((ri) => [ri.itemId, ri.revisionId]));
  const numbers = packetNumbers(study, ctx);
  const items: RoundItemView[] = ctx.roundItems.map((it) => {
    const revisionId = frozen.get(it.id) ?? null;
    const rated = revisionId === null ? null : getRevision(study, revisionId);
    const decision = decisions.get(it.id) ?? null;
    const stats = analysis?.report.items.find((s) => s.item === it.code) ?? null;
    const text = rated?.text ?? it.text;
    return {
      benchmarksMet: stats ? benchmarksMet(stats) : [],
      wordingFlags: checkItemWording(text).flags.map((f) => f.check),
      itemId: it.id,
      code: it.code,
      text,
      revision: rated?.number ?? it.revision,
      rewordedSince: rated !== null && rated !== undefined && rated.id !== it.revisionId,
      facetName: it.facetId === null ? null : (facetNames.get(it.facetId) ?? null),
      state: it.state,
      stats,
      packetNumber: numbers.get(it.id) ?? 0,
      decision: decision && {
        ...decision,
        newText:
          decision.revisionId === null ? null : (getRevision(study, decision.revisionId)?.text ?? null),
      },
      comments: ratings
        .filter((r) => r.itemId === it.id && r.comment !== null)
        .map((r) => ({ expert: expertCode.get(r.expertId) ?? '', text: r.comment as string })),
    };
  });
  const perExpert = new Map<number, number>();
  for (const r of ratings) perExpert.set(r.expertId, (perExpert.get(r.expertId) ?? 0) + 1);
  const flaggedItems = items.filter((it) => (it.stats?.flags.length ?? 0) > 0);
  let report: RoundView['report'] = null;
  if (analysis) {
    const { items: _items, ...rest } = analysis.report;
    report = rest;
  }
  return {
    ...round,
    form: ctx.form,
    experts: ctx.experts.map((e) => ({ ...e, ratings: perExpert.get(e.id) ?? 0 })),
    imports: listImports(study, round.id),
    ratingCount: ratings.length,
    items,
    report,
    runId: analysis ? latestRoundRun(study, ANALYSIS_KIND, round.id) : null,
    flagged: flaggedItems.length,
    decided: flaggedItems.filter((it) => it.decision !== null).length,
  };
}

/**
 * The benchmarks an item's content-validity statistics reach, in words with their sources: the
 * I-CVI benchmark for the panel's size (Lynn 1986; Polit & Beck 2006), a modified kappa rated good or
 * excellent (Polit, Beck & Owen 2007), a CVR at or above its exact critical value (Wilson, Pan &
 * Schumsky 2012). A statistic the panel could not support is left out.
 */
export function benchmarksMet(stats: ItemContentValidity): string[] {
  const out: string[] = [];
  if (stats.iCvi !== null && stats.rated >= MIN_PANEL_FOR_BENCHMARK) {
    if (stats.rated < LARGE_PANEL) {
      if (stats.iCvi >= 1 - BENCHMARK_PRECISION)
        out.push(
          `I-CVI ${formatRatio(stats.iCvi)} = 1.00 (${MIN_PANEL_FOR_BENCHMARK}–${LARGE_PANEL - 1} experts; Lynn 1986)`,
        );
    } else if (stats.iCvi >= ICVI_BENCHMARK_LARGE_PANEL - BENCHMARK_PRECISION) {
      out.push(
        `I-CVI ${formatRatio(stats.iCvi)} ≥ ${formatRatio(ICVI_BENCHMARK_LARGE_PANEL)} (${LARGE_PANEL}+ experts; Polit & Beck 2006)`,
      );
    }
  }
  if (stats.modifiedKappa !== null && (stats.kappaBand === 'excellent' || stats.kappaBand === 'good'))
    out.push(
      `modified kappa ${formatRatio(stats.modifiedKappa)} ${stats.kappaBand} (Polit, Beck & Owen 2007)`,
    );
  if (stats.cvr !== null && stats.cvrCritical !== null && stats.cvr >= stats.cvrCritical - RATIO_TOLERANCE)
    out.push(
      `CVR ${formatRatio(stats.cvr)} ≥ critical ${formatRatio(stats.cvrCritical, 3)} (Wilson, Pan & Schumsky 2012)`,
    );
  return out;
}

/** Every round with its panel, form, ratings, statistics and decisions, plus a round-by-round comparison. */
export function reviewView(study: Study) {
  const rounds = listRounds(study).map((r) => roundView(study, r));
  return {
    facets: listFacets(study),
    keptItems: listItems(study).filter((it) => it.state === 'kept').length,
    rewordedSinceRated: roundCandidates(study, 'revised').length,
    maxFileBytes: MAX_RATINGS_FILE_BYTES,
    relevanceAnchors: RELEVANCE_ANCHORS,
    benchmarks: { sCviAve: SCVI_AVE_BENCHMARK, precision: BENCHMARK_PRECISION },
    rounds,
    comparison: compareRounds(rounds),
  };
}

/** One item across the rated rounds: its statistics in each round it was part of. */
export interface ComparedItem {
  code: string;
  /** By round number; absent where the item was not part of the round. */
  cells: Record<number, ItemContentValidity | null>;
  /** The first rated round the item appears in. */
  firstRound: number;
  /** True when the item is in the latest rated round and was in no rated round before it. */
  newInLatest: boolean;
}

/**
 * The rated rounds side by side: one row per item that any rated round holds (in the order of first
 * appearance, an item added later at the end of its first round's place), and the scale-level
 * S-CVI of each round, keyed by round number so that a value can only sit under its own round.
 */
export function compareRounds(
  rounds: readonly {
    number: number;
    items: readonly { code: string; stats: ItemContentValidity | null }[];
    report: { sCviAve: number; sCviUa: number } | null;
  }[],
) {
  const rated = rounds.filter((r) => r.report !== null).sort((a, b) => a.number - b.number);
  const latest = rated.at(-1)?.number;
  const rows = new Map<string, ComparedItem>();
  for (const round of rated) {
    for (const it of round.items) {
      let row = rows.get(it.code);
      if (!row) {
        row = { code: it.code, cells: {}, firstRound: round.number, newInLatest: false };
        rows.set(it.code, row);
      }
      row.cells[round.number] = it.stats;
    }
  }
  for (const row of rows.values()) row.newInLatest = rated.length > 1 && row.firstRound === latest;
  return {
    rounds: rated.map((r) => r.number),
    rows: [...rows.values()],
    scale: [
      {
        label: 'S-CVI/Ave',
        values: Object.fromEntries(rated.map((r) => [r.number, r.report?.sCviAve ?? null])) as Record<
          number,
          number | null
        >,
      },
      {
        label: 'S-CVI/UA',
        values: Object.fromEntries(rated.map((r) => [r.number, r.report?.sCviUa ?? null])) as Record<
          number,
          number | null
        >,
      },
    ],
  };
}

/** Each round item's number in the printed packet, by item id. */
function packetNumbers(study: Study, ctx: RoundContext): Map<number, number> {
  const out = new Map<number, number>();
  for (const section of packetSections(study, ctx, ctx.roundItems)) {
    for (const it of section.items) out.set(it.id, out.size + 1);
  }
  return out;
}
