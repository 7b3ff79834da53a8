import { listFacets } from '../../../db/repos/construct.ts';
import { type ItemRecord, listItems } from '../../../db/repos/items.ts';
import {
  countRatings,
  type Decision,
  type ExpertRecord,
  getForm,
  getRound,
  listExperts,
  listImports,
  listRatings,
  listRoundItems,
  listRounds,
  type ReviewForm,
  type RoundRecord,
} from '../../../db/repos/review.ts';
import type { Study } from '../../../db/study.ts';
import {
  analyzeContentValidity,
  type ContentValidityReport,
  type ExpertRating,
} from '../../engine/content.ts';
import type { RoundRatings } from '../../import/ratings/index.ts';
import { RuleError } from '../errors.ts';
import { MAX_ITEM_TEXT } from '../items/index.ts';

/**
 * The four relevance anchors commonly printed with the CVI rating (common practice in content
 * validity studies; Lynn 1986 and Polit & Beck 2006 use a 4-point relevance scale).
 */
export const RELEVANCE_ANCHORS = ['not relevant', 'somewhat relevant', 'quite relevant', 'highly relevant'];

/** Lawshe's (1975) three answers to the essential question. */
export const ESSENTIAL_ANSWERS = ['essential', 'useful but not essential', 'not necessary'];

export const DEFAULT_FORM: ReviewForm = {
  relevanceMin: 1,
  relevanceMax: 4,
  asksEssential: false,
  asksFacet: true,
  asksComment: true,
  instructions:
    'Please rate how relevant each item is to the construct defined above, for the population named. Where asked, also say which facet you think the item belongs to, and add any comment on its wording.',
};

export const ANALYSIS_KIND = 'content-validity';

/** How the engine's warning about a missing essential column begins; replaced when the form never asked. */
const ENGINE_NO_ESSENTIAL = 'no essential column';

export const DECISION_KIND: Record<Decision, string> = {
  keep: 'kept-after-review',
  revise: 'revised-after-review',
  retire: 'retired-after-review',
};

export function requireRound(study: Study, id: number): RoundRecord {
  const round = getRound(study, id);
  if (!round) throw new RuleError(`review round ${id} does not exist in this study`, 'not-found');
  return round;
}

export function requireUnrated(study: Study, round: RoundRecord, what: string): void {
  if (countRatings(study, round.id) > 0) {
    throw new RuleError(
      `round ${round.number} already has ratings, so ${what} cannot change now (the experts answered what was sent); start a new round instead`,
    );
  }
}

export function countWord(n: number, word: string): string {
  return `${n} ${word}${n === 1 ? '' : 's'}`;
}

/** The items a new round covers: every item kept for review, or only those reworded since they were last rated. */
export type RoundScope = 'kept' | 'revised';

function lastRatedRevision(study: Study): Map<number, number> {
  const out = new Map<number, number>();
  for (const round of listRounds(study)) {
    for (const ri of listRoundItems(study, round.id)) {
      if (ri.revisionId !== null) out.set(ri.itemId, ri.revisionId);
    }
  }
  return out;
}

export function roundCandidates(study: Study, scope: RoundScope): ItemRecord[] {
  const kept = listItems(study).filter((it) => it.state === 'kept');
  if (scope === 'kept') return kept;
  const rated = lastRatedRevision(study);
  return kept.filter((it) => rated.get(it.id) !== it.revisionId);
}

export interface RoundContext {
  round: RoundRecord;
  form: ReviewForm;
  experts: ExpertRecord[];
  roundItems: ItemRecord[];
}

export function roundContext(study: Study, roundId: number): RoundContext {
  const round = requireRound(study, roundId);
  const ids = listRoundItems(study, roundId).map((ri) => ri.itemId);
  const items = new Map(listItems(study).map((it) => [it.id, it]));
  return {
    round,
    form: getForm(study, roundId),
    experts: listExperts(study, roundId),
    roundItems: ids.map((id) => items.get(id)).filter((it): it is ItemRecord => it !== undefined),
  };
}

/** The round's data a ratings file is matched against. */
export function roundRatings(study: Study, roundId: number): RoundRatings {
  const ctx = roundContext(study, roundId);
  return {
    ...ctx,
    roundId,
    poolCodes: listItems(study).map((it) => it.code),
    facets: listFacets(study),
    stored: listRatings(study, roundId),
    importNames: new Map(listImports(study, roundId).map((imp) => [imp.id, imp.fileName])),
    maxComment: MAX_ITEM_TEXT * 4,
  };
}

/** The round's stored ratings in the engine's terms (codes and facet names). */
export function storedEngineRatings(study: Study, roundId: number, skipImport?: number): ExpertRating[] {
  const experts = new Map(listExperts(study, roundId).map((e) => [e.id, e.code]));
  const items = new Map(listItems(study).map((it) => [it.id, it.code]));
  const facets = new Map(listFacets(study, { includeRetired: true }).map((f) => [f.id, f.name]));
  return listRatings(study, roundId)
    .filter((r) => r.importId !== skipImport)
    .map((r) => ({
      item: items.get(r.itemId) ?? String(r.itemId),
      expert: experts.get(r.expertId) ?? String(r.expertId),
      relevance: r.relevance,
      essential: r.essential,
      facet: r.facetId === null ? null : (facets.get(r.facetId) ?? null),
    }));
}

export interface RoundAnalysis {
  report: ContentValidityReport;
  inputs: Record<string, unknown>;
  options: Record<string, unknown>;
}

function intendedFacets(study: Study, items: readonly ItemRecord[]): Record<string, string> {
  const facets = new Map(listFacets(study, { includeRetired: true }).map((f) => [f.id, f.name]));
  const out: Record<string, string> = {};
  for (const it of items) {
    const name = it.facetId === null ? undefined : facets.get(it.facetId);
    if (name !== undefined) out[it.code] = name;
  }
  return out;
}

/** Runs the content-validity engine over a round's ratings; null when there are none to analyse. */
export function analyzeRound(
  study: Study,
  ctx: RoundContext,
  ratings: readonly ExpertRating[],
): RoundAnalysis | null {
  if (!ratings.some((r) => r.relevance !== null)) return null;
  const options = {
    scale: { min: ctx.form.relevanceMin, max: ctx.form.relevanceMax },
    hasEssential:
      ctx.form.asksEssential && ratings.some((r) => r.essential !== null && r.essential !== undefined),
    intendedFacets: intendedFacets(study, ctx.roundItems),
  };
  const report = analyzeContentValidity({ ratings, ...options });
  if (!ctx.form.asksEssential) {
    report.warnings = [
      `the rating form of round ${ctx.round.number} did not ask the essential question, so CVR is not computed (Lawshe 1975)`,
      ...report.warnings.filter((w) => !w.startsWith(ENGINE_NO_ESSENTIAL)),
    ];
  }
  const order = new Map(ctx.roundItems.map((it, i) => [it.code, i]));
  report.items.sort((a, b) => (order.get(a.item) ?? 0) - (order.get(b.item) ?? 0));
  return {
    report,
    options,
    inputs: {
      roundId: ctx.round.id,
      round: ctx.round.number,
      ratings: ratings.length,
      experts: report.experts,
    },
  };
}

/** Interleaves items across facets so that the order of a packet does not give away the intended facet. */
function interleave<T extends { facetId: number | null }>(items: readonly T[]): T[] {
  const groups = new Map<number | null, T[]>();
  for (const it of items) {
    const list = groups.get(it.facetId) ?? [];
    list.push(it);
    groups.set(it.facetId, list);
  }
  const out: T[] = [];
  const lists = [...groups.values()];
  for (let i = 0; out.length < items.length; i++) {
    for (const list of lists) if (i < list.length) out.push(list[i]);
  }
  return out;
}

/** The packet's sections: one interleaved list when experts place items in facets, otherwise one section per facet. */
export function packetSections<T extends { facetId: number | null }>(
  study: Study,
  ctx: RoundContext,
  items: readonly T[],
): { facet: string | null; items: T[] }[] {
  const facets = listFacets(study);
  if (ctx.form.asksFacet) return [{ facet: null, items: interleave(items) }];
  return [
    ...facets.map((f) => ({ facet: f.name, items: items.filter((it) => it.facetId === f.id) })),
    {
      facet: null,
      items: items.filter((it) => it.facetId === null || !facets.some((f) => f.id === it.facetId)),
    },
  ].filter((s) => s.items.length > 0);
}
