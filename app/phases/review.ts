import Papa from 'papaparse';
import { getConstruct, listFacets } from '../../db/repos/construct.ts';
import {
  getItem,
  getRevision,
  insertRevision,
  type ItemRecord,
  listItems,
  setItemState,
} from '../../db/repos/items.ts';
import {
  countExpertRatings,
  countRatings,
  type Decision,
  type DecisionRecord,
  deleteExpert,
  type ExpertRecord,
  freezeRoundRevisions,
  getExpert,
  getForm,
  getImport,
  getRound,
  type ImportRecord,
  insertAnalysisRun,
  insertDecision,
  insertExpert,
  insertImport,
  insertRatings,
  insertRound,
  latestRoundRun,
  listDecisions,
  listExperts,
  listImports,
  listRatings,
  listRoundItems,
  listRounds,
  type NewRating,
  type ReviewForm,
  type RoundRecord,
  setForm,
  setRoundItems,
  unfreezeRoundRevisions,
  updateExpert,
  withdrawImport,
} from '../../db/repos/review.ts';
import type { Study } from '../../db/study.ts';
import {
  analyzeContentValidity,
  BENCHMARK_PRECISION,
  type ContentValidityReport,
  type ExpertRating,
  formatRatio,
  ICVI_BENCHMARK_LARGE_PANEL,
  type ItemContentValidity,
  LARGE_PANEL,
  MIN_PANEL_FOR_BENCHMARK,
  RATIO_TOLERANCE,
  SCVI_AVE_BENCHMARK,
} from '../engine/content.ts';
import { ENGINE_VERSION } from '../engine/version.ts';
import { checkItemWording } from '../engine/wording.ts';
import { delimiterName } from '../import/detect-format.ts';
import { TableError } from '../import/parse-table.ts';
import { describeProblem, readRatings } from '../import/ratings.ts';
import { changeInPhase } from './change.ts';
import { RuleError } from './errors.ts';
import { type FileProblem, MAX_ITEM_TEXT, sha256Hex, tableProblem } from './items/index.ts';
import type { ChecklistItem, PhaseRules } from './types.ts';

/** Largest ratings file read in one import (a 40-expert, 200-item long file is well under 1 MiB). */
export const MAX_RATINGS_FILE_BYTES = 8 * 1024 * 1024;

/** Rating rows listed in a preview; the rest are counted. */
export const MAX_PREVIEW_RATINGS = 300;

/** Expert codes: a letter or digit, then up to 39 letters, digits, dots, dashes or underscores. */
export const EXPERT_CODE_PATTERN = /^[A-Za-z0-9][A-Za-z0-9._-]{0,39}$/;

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

const ANALYSIS_KIND = 'content-validity';

/** How the engine's warning about a missing essential column begins; replaced when the form never asked. */
const ENGINE_NO_ESSENTIAL = 'no essential column';

export const DECISION_KIND: Record<Decision, string> = {
  keep: 'kept-after-review',
  revise: 'revised-after-review',
  retire: 'retired-after-review',
};

function requireRound(study: Study, id: number): RoundRecord {
  const round = getRound(study, id);
  if (!round) throw new RuleError(`review round ${id} does not exist in this study`, 'not-found');
  return round;
}

function requireUnrated(study: Study, round: RoundRecord, what: string): void {
  if (countRatings(study, round.id) > 0) {
    throw new RuleError(
      `round ${round.number} already has ratings, so ${what} cannot change now (the experts answered what was sent); start a new round instead`,
    );
  }
}

function countWord(n: number, word: string): string {
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

function roundCandidates(study: Study, scope: RoundScope): ItemRecord[] {
  const kept = listItems(study).filter((it) => it.state === 'kept');
  if (scope === 'kept') return kept;
  const rated = lastRatedRevision(study);
  return kept.filter((it) => rated.get(it.id) !== it.revisionId);
}

/**
 * Starts a review round over the items kept for review (or only those reworded since their last
 * rating). The panel and the rating form are copied from the previous round, if any.
 */
export function addRound(study: Study, input: { label: string; scope: RoundScope }): number {
  const rounds = listRounds(study);
  const previous = rounds.at(-1);
  if (input.scope === 'revised' && !previous) {
    throw new RuleError('there is no earlier round, so no item has been reworded since its rating');
  }
  const items = roundCandidates(study, input.scope);
  if (items.length === 0) {
    throw new RuleError(
      input.scope === 'kept'
        ? "no items are kept for review: in the item pool, mark the items that go to the experts as 'kept for review'"
        : 'no kept item has been reworded since it was last rated',
    );
  }
  const form = previous ? getForm(study, previous.id) : DEFAULT_FORM;
  const panel = previous ? listExperts(study, previous.id) : [];
  const number = rounds.length + 1;
  return changeInPhase(
    study,
    {
      phase: 'review',
      kind: 'round-started',
      target: `round ${number}`,
      detail: {
        label: input.label.trim(),
        scope: input.scope,
        items: items.map((it) => it.code),
        panelCopied: panel.map((e) => e.code),
        form,
      },
    },
    () => {
      const id = insertRound(study, input.label.trim(), form, new Date().toISOString());
      setRoundItems(
        study,
        id,
        items.map((it) => it.id),
      );
      for (const e of panel) insertExpert(study, id, e);
      return id;
    },
  );
}

/** Brings an unrated round's item list up to date with the items now kept for review. */
export function syncRoundItems(study: Study, roundId: number): void {
  const round = requireRound(study, roundId);
  requireUnrated(study, round, 'its item list');
  const kept = listItems(study).filter((it) => it.state === 'kept');
  const before = new Set(listRoundItems(study, roundId).map((ri) => ri.itemId));
  const codes = (ids: Iterable<number>) => [...ids].map((id) => getItem(study, id)?.code ?? String(id));
  const added = kept.filter((it) => !before.has(it.id)).map((it) => it.id);
  const removed = [...before].filter((id) => !kept.some((it) => it.id === id));
  if (added.length === 0 && removed.length === 0) return;
  changeInPhase(
    study,
    {
      phase: 'review',
      kind: 'round-items-updated',
      target: `round ${round.number}`,
      detail: { added: codes(added), removed: codes(removed) },
    },
    () =>
      setRoundItems(
        study,
        roundId,
        kept.map((it) => it.id),
      ),
  );
}

/** Changes what the round's rating form asks; only before any rating has come back. */
export function updateForm(
  study: Study,
  roundId: number,
  form: Omit<ReviewForm, 'relevanceMin' | 'relevanceMax'>,
) {
  const round = requireRound(study, roundId);
  requireUnrated(study, round, 'the rating form');
  const before = getForm(study, roundId);
  const after: ReviewForm = { ...before, ...form, instructions: form.instructions.trim() };
  if (JSON.stringify(before) === JSON.stringify(after)) return;
  changeInPhase(
    study,
    {
      phase: 'review',
      kind: 'form-changed',
      target: `round ${round.number} rating form`,
      detail: { before, after },
    },
    () => setForm(study, roundId, after),
  );
}

export interface ExpertInput {
  code: string;
  role: string;
  name: string;
  nameWithheld: boolean;
}

function checkExpert(study: Study, roundId: number, input: ExpertInput, exceptId?: number): ExpertInput {
  const code = input.code.trim();
  if (!EXPERT_CODE_PATTERN.test(code)) {
    throw new RuleError(
      code === ''
        ? 'an expert needs an id code (e.g. E1); names are optional'
        : `expert code "${code}" cannot be used: start with a letter or digit and use up to 40 letters, digits, dots, dashes or underscores`,
    );
  }
  const clash = listExperts(study, roundId).find(
    (e) => e.code.toLowerCase() === code.toLowerCase() && e.id !== exceptId,
  );
  if (clash) throw new RuleError(`expert ${clash.code} is already on this round's panel`);
  const name = input.name.trim();
  return { code, role: input.role.trim(), name, nameWithheld: name !== '' && input.nameWithheld };
}

/** What the log may say about an expert: code and role, never the name (see migration 0002). */
function publicExpert(e: ExpertInput) {
  return { code: e.code, role: e.role, named: e.name !== '', nameWithheld: e.nameWithheld };
}

/** Adds an expert to a round's panel: an id code, and optionally a role and a name (which can be withheld). */
export function addExpert(study: Study, roundId: number, input: ExpertInput): number {
  const round = requireRound(study, roundId);
  const expert = checkExpert(study, roundId, input);
  return changeInPhase(
    study,
    {
      phase: 'review',
      kind: 'expert-added',
      target: `expert ${expert.code} (round ${round.number})`,
      detail: publicExpert(expert),
    },
    () => insertExpert(study, roundId, expert),
  );
}

function requireExpert(study: Study, id: number): ExpertRecord {
  const expert = getExpert(study, id);
  if (!expert) throw new RuleError(`expert ${id} does not exist in this study`, 'not-found');
  return expert;
}

/** Changes an expert's code, role, name or whether the name is withheld. */
export function editExpert(study: Study, id: number, input: ExpertInput): void {
  const before = requireExpert(study, id);
  const round = requireRound(study, before.roundId);
  const after = checkExpert(study, before.roundId, input, id);
  if (
    before.code === after.code &&
    before.role === after.role &&
    before.name === after.name &&
    before.nameWithheld === after.nameWithheld
  ) {
    return;
  }
  changeInPhase(
    study,
    {
      phase: 'review',
      kind: 'expert-edited',
      target: `expert ${before.code} (round ${round.number})`,
      detail: { before: publicExpert(before), after: publicExpert(after) },
    },
    () => updateExpert(study, id, after),
  );
}

/** Takes an expert off a round's panel; only while the expert has no ratings in it. */
export function removeExpert(study: Study, id: number): void {
  const expert = requireExpert(study, id);
  const round = requireRound(study, expert.roundId);
  const ratings = countExpertRatings(study, id);
  if (ratings > 0) {
    throw new RuleError(
      `expert ${expert.code} has ${countWord(ratings, 'rating')} in round ${round.number}; withdraw the import that brought them before removing the expert`,
    );
  }
  changeInPhase(
    study,
    {
      phase: 'review',
      kind: 'expert-removed',
      target: `expert ${expert.code} (round ${round.number})`,
      detail: publicExpert(expert),
    },
    () => deleteExpert(study, id),
  );
}

interface RoundContext {
  round: RoundRecord;
  form: ReviewForm;
  experts: ExpertRecord[];
  roundItems: ItemRecord[];
}

function roundContext(study: Study, roundId: number): RoundContext {
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

/** One parsed rating, ready to store, named by codes so that it can be shown and analysed. */
interface ParsedRating {
  row: number;
  itemId: number;
  itemCode: string;
  expertCode: string;
  expertId: number | null;
  relevance: number | null;
  essential: boolean | null;
  facetId: number | null;
  facetName: string | null;
  comment: string | null;
}

export interface RatingsPreview {
  roundId: number;
  fileName: string;
  sha256: string;
  layout: 'long' | 'wide' | null;
  delimiter: string;
  header: string[];
  /** Ratings the file holds (rows with a problem left out). */
  ratingCount: number;
  experts: { code: string; onPanel: boolean; ratings: number }[];
  /**
   * Expert codes of the file that are not on the round's panel: each must be confirmed before the
   * file is imported (a typo must not create an expert), with where it first occurs and the panel
   * code it may have been meant as.
   */
  unknownExperts: UnknownExpert[];
  itemCount: number;
  hasEssential: boolean;
  hasFacet: boolean;
  hasComment: boolean;
  /** The first MAX_PREVIEW_RATINGS ratings. */
  rows: {
    row: number;
    item: string;
    expert: string;
    relevance: number | null;
    essential: boolean | null;
    facet: string | null;
    comment: string | null;
  }[];
  problems: FileProblem[];
  warnings: string[];
}

export interface UnknownExpert {
  code: string;
  ratings: number;
  /** First occurrence in the file (header = row 1) and its column. */
  row: number;
  column: string;
  /** A panel code one letter away (a likely typo), if any. */
  closest: string | null;
  /** "row 5, column 'expert': expert code 'E9' is not on the panel …" */
  text: string;
}

/** Edit distance between two short codes, compared without letter case. Cost O(|a|·|b|). */
function editDistance(a: string, b: string): number {
  const x = a.toLowerCase();
  const y = b.toLowerCase();
  let previous = Array.from({ length: y.length + 1 }, (_, j) => j);
  for (let i = 1; i <= x.length; i++) {
    const row = [i];
    for (let j = 1; j <= y.length; j++) {
      row[j] = Math.min(previous[j] + 1, row[j - 1] + 1, previous[j - 1] + (x[i - 1] === y[j - 1] ? 0 : 1));
    }
    previous = row;
  }
  return previous[y.length];
}

interface ParsedRatingsFile {
  preview: RatingsPreview;
  ratings: ParsedRating[];
}

function parseRatingsFile(
  study: Study,
  roundId: number,
  bytes: Uint8Array,
  fileName: string,
): ParsedRatingsFile {
  const ctx = roundContext(study, roundId);
  const sha256 = sha256Hex(bytes);
  const base: RatingsPreview = {
    roundId,
    fileName,
    sha256,
    layout: null,
    delimiter: '',
    header: [],
    ratingCount: 0,
    experts: [],
    unknownExperts: [],
    itemCount: 0,
    hasEssential: false,
    hasFacet: false,
    hasComment: false,
    rows: [],
    problems: [],
    warnings: [],
  };
  if (bytes.length > MAX_RATINGS_FILE_BYTES) {
    const problem = {
      row: 1,
      column: '',
      message: `${fileName} is ${bytes.length} bytes, above the limit of ${MAX_RATINGS_FILE_BYTES} bytes for a ratings file`,
    };
    return { preview: { ...base, problems: [{ ...problem, text: describeProblem(problem) }] }, ratings: [] };
  }
  let file: ReturnType<typeof readRatings>;
  try {
    file = readRatings(bytes, { fileName, scaleMin: ctx.form.relevanceMin, scaleMax: ctx.form.relevanceMax });
  } catch (error) {
    if (error instanceof TableError)
      return { preview: { ...base, problems: [tableProblem(error)] }, ratings: [] };
    throw error;
  }
  const { header } = file;
  const folded = header.map((h) => h.trim().toLowerCase());
  const problem = (row: number, column: string, message: string): FileProblem => ({
    row,
    column,
    message,
    text: describeProblem({ row, column, message }, header),
  });
  const problems: FileProblem[] = file.problems.map((p) => problem(p.row, p.column, p.message));
  const warnings = [...file.warnings];
  const hasComment = file.layout === 'long' && folded.includes('comment');
  const longColumn = (name: string) => header[folded.indexOf(name)] ?? name;
  const itemColumn = file.layout === 'long' ? longColumn('item') : header[0];
  const expertColumn = (expert: string) =>
    file.layout === 'long' ? longColumn('expert') : (header.find((h) => h.trim() === expert) ?? expert);

  if (file.hasEssential && !ctx.form.asksEssential) {
    problems.push(
      problem(
        1,
        longColumn('essential'),
        `the rating form of round ${ctx.round.number} did not ask the essential question; turn it on in the form (before any rating is imported) or remove the column`,
      ),
    );
  }
  if (file.hasFacet && !ctx.form.asksFacet) {
    problems.push(
      problem(
        1,
        longColumn('facet'),
        `the rating form of round ${ctx.round.number} did not ask experts to place items in facets; turn it on in the form or remove the column`,
      ),
    );
  }
  if (ctx.form.asksEssential && !file.hasEssential && problems.length === 0) {
    warnings.push(
      file.layout === 'wide'
        ? 'the wide form carries relevance only: the essential answers the form asked for are not in this file, so CVR is not computed'
        : 'the form asked the essential question, but the file has no essential column: CVR is not computed',
    );
  }
  if (ctx.form.asksFacet && !file.hasFacet && problems.length === 0) {
    warnings.push(
      file.layout === 'wide'
        ? 'the wide form carries relevance only: facet placements are not in this file, so facet agreement is not computed'
        : 'the form asked for facet placements, but the file has no facet column: facet agreement is not computed',
    );
  }
  if (hasComment && !ctx.form.asksComment) {
    warnings.push(
      'the form did not ask for comments, but the file has a comment column: the comments are kept',
    );
  }

  const roundByCode = new Map(ctx.roundItems.map((it) => [it.code.toLowerCase(), it]));
  const poolCodes = new Set(listItems(study).map((it) => it.code.toLowerCase()));
  const panel = new Map(ctx.experts.map((e) => [e.code.toLowerCase(), e]));
  const facets = listFacets(study);
  const facetByName = new Map(facets.map((f) => [f.name.toLowerCase(), f]));
  const stored = listRatings(study, roundId);
  const importOf = new Map(listImports(study, roundId).map((imp) => [imp.id, imp.fileName]));
  const existingFrom = new Map(stored.map((r) => [`${r.itemId}:${r.expertId}`, r.importId]));
  const seen = new Map<string, number>();
  const ratings: ParsedRating[] = [];
  for (const r of file.ratings) {
    const item = roundByCode.get(r.item.toLowerCase());
    if (!item) {
      problems.push(
        problem(
          r.row,
          itemColumn,
          poolCodes.has(r.item.toLowerCase())
            ? `item '${r.item}' is in the pool but not in round ${ctx.round.number} (the round covers ${countWord(ctx.roundItems.length, 'item')})`
            : `item '${r.item}' is not in the item pool`,
        ),
      );
      continue;
    }
    const onPanel = panel.get(r.expert.toLowerCase());
    const expertCode = onPanel?.code ?? r.expert;
    if (!EXPERT_CODE_PATTERN.test(expertCode)) {
      problems.push(
        problem(
          r.row,
          expertColumn(r.expert),
          `expert code '${r.expert}' cannot be used: up to 40 letters, digits, dots, dashes or underscores`,
        ),
      );
      continue;
    }
    const key = `${item.id}:${expertCode.toLowerCase()}`;
    const earlier = seen.get(key);
    if (earlier !== undefined) {
      problems.push(
        problem(
          r.row,
          expertColumn(r.expert),
          `expert '${r.expert}' already rated item '${r.item}' on row ${earlier}`,
        ),
      );
      continue;
    }
    seen.set(key, r.row);
    const earlierImport = onPanel ? existingFrom.get(`${item.id}:${onPanel.id}`) : undefined;
    if (onPanel && earlierImport !== undefined) {
      const from = importOf.get(earlierImport) ?? 'an earlier file';
      problems.push(
        problem(
          r.row,
          expertColumn(r.expert),
          `expert ${onPanel.code} already has a rating for ${item.code} in round ${ctx.round.number} (from "${from}"); withdraw that import to replace it`,
        ),
      );
      continue;
    }
    let facetId: number | null = null;
    let facetName: string | null = null;
    if (r.facet !== null) {
      const facet = facetByName.get(r.facet.toLowerCase());
      if (!facet) {
        problems.push(
          problem(
            r.row,
            longColumn('facet'),
            `'${r.facet}' is not a facet of this study; use one of ${facets.map((f) => f.name).join(', ')}`,
          ),
        );
        continue;
      }
      facetId = facet.id;
      facetName = facet.name;
    }
    if (r.comment !== null && r.comment.length > MAX_ITEM_TEXT * 4) {
      problems.push(
        problem(r.row, longColumn('comment'), `the comment is longer than ${MAX_ITEM_TEXT * 4} characters`),
      );
      continue;
    }
    ratings.push({
      row: r.row,
      itemId: item.id,
      itemCode: item.code,
      expertCode,
      expertId: onPanel?.id ?? null,
      relevance: r.relevance,
      essential: r.essential,
      facetId,
      facetName,
      comment: r.comment,
    });
  }
  const expertCounts = new Map<string, { code: string; onPanel: boolean; ratings: number }>();
  for (const r of ratings) {
    const entry = expertCounts.get(r.expertCode.toLowerCase()) ?? {
      code: r.expertCode,
      onPanel: r.expertId !== null,
      ratings: 0,
    };
    entry.ratings++;
    expertCounts.set(r.expertCode.toLowerCase(), entry);
  }
  const unknownExperts: UnknownExpert[] = [...expertCounts.values()]
    .filter((e) => !e.onPanel)
    .map((e) => {
      const first = ratings.find((r) => r.expertCode.toLowerCase() === e.code.toLowerCase()) as ParsedRating;
      const column = expertColumn(e.code);
      const closest = ctx.experts.find((p) => editDistance(p.code, e.code) <= 1)?.code ?? null;
      const message =
        `expert code '${e.code}' (${countWord(e.ratings, 'rating')}) is not on the panel of round ${ctx.round.number}` +
        (closest ? ` (did you mean ${closest}?)` : '') +
        '; correct the file, or confirm adding the expert to the panel';
      return {
        code: e.code,
        ratings: e.ratings,
        row: first.row,
        column,
        closest,
        text: describeProblem({ row: first.row, column, message }, header),
      };
    });
  const ratedItems = new Set(ratings.map((r) => r.itemId));
  const ratedBefore = new Set(stored.map((r) => r.itemId));
  const unrated = ctx.roundItems.filter((it) => !ratedItems.has(it.id) && !ratedBefore.has(it.id));
  if (unrated.length > 0 && problems.length === 0) {
    warnings.push(
      `${countWord(unrated.length, 'item')} of round ${ctx.round.number} get no rating from this file: ${unrated.map((it) => it.code).join(', ')}`,
    );
  }
  if (ratings.length === 0 && problems.length === 0) {
    problems.push(problem(1, '', 'the file holds no ratings'));
  }
  return {
    preview: {
      ...base,
      layout: file.layout,
      delimiter: delimiterName(file.delimiter),
      header,
      ratingCount: ratings.length,
      experts: [...expertCounts.values()],
      unknownExperts,
      itemCount: ratedItems.size,
      hasEssential: file.hasEssential,
      hasFacet: file.hasFacet,
      hasComment,
      rows: ratings.slice(0, MAX_PREVIEW_RATINGS).map((r) => ({
        row: r.row,
        item: r.itemCode,
        expert: r.expertCode,
        relevance: r.relevance,
        essential: r.essential,
        facet: r.facetName,
        comment: r.comment,
      })),
      problems,
      warnings,
    },
    ratings,
  };
}

/** Reads a ratings file for a round and says what importing it would do; writes nothing. */
export function previewRatings(
  study: Study,
  roundId: number,
  bytes: Uint8Array,
  fileName: string,
): RatingsPreview {
  return parseRatingsFile(study, roundId, bytes, fileName).preview;
}

/** The round's stored ratings in the engine's terms (codes and facet names). */
function storedEngineRatings(study: Study, roundId: number, skipImport?: number): ExpertRating[] {
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

interface RoundAnalysis {
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
function analyzeRound(
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

function storeRun(
  study: Study,
  analysis: RoundAnalysis | null,
  imports: readonly ImportRecord[],
): number | null {
  if (!analysis) return null;
  return insertAnalysisRun(study, {
    phase: 'review',
    kind: ANALYSIS_KIND,
    inputs: {
      ...analysis.inputs,
      files: imports.map((imp) => ({ fileName: imp.fileName, sha256: imp.sha256 })),
    },
    options: analysis.options,
    engineVersion: ENGINE_VERSION,
    results: analysis.report,
    at: new Date().toISOString(),
  });
}

/**
 * Imports a ratings file into a round after reading it again: any problem refuses the whole file
 * and nothing is written. An expert code that is not on the round's panel is refused too (code
 * "unknown-experts") unless `addExperts` confirms it, so a typo never creates an expert; confirmed
 * experts are added to the panel in the same transaction. The revision each item was rated in is
 * fixed; the content-validity statistics are stored as an analysis run that the log row names.
 */
export function importRatings(
  study: Study,
  roundId: number,
  bytes: Uint8Array,
  fileName: string,
  options: { addExperts?: readonly string[] } = {},
): { imported: number; runId: number | null } {
  const { preview, ratings } = parseRatingsFile(study, roundId, bytes, fileName);
  if (preview.problems.length > 0) {
    const more = preview.problems.length > 1 ? ` (and ${preview.problems.length - 1} more)` : '';
    throw new RuleError(`${fileName} was not imported: ${preview.problems[0].text}${more}`, 'file');
  }
  const confirmed = new Set((options.addExperts ?? []).map((c) => c.trim().toLowerCase()));
  const unconfirmed = preview.unknownExperts.filter((e) => !confirmed.has(e.code.toLowerCase()));
  if (unconfirmed.length > 0) {
    const more = unconfirmed.length > 1 ? ` (and ${unconfirmed.length - 1} more)` : '';
    throw new RuleError(`${fileName} was not imported: ${unconfirmed[0].text}${more}`, 'unknown-experts');
  }
  const ctx = roundContext(study, roundId);
  const combined = [
    ...storedEngineRatings(study, roundId),
    ...ratings.map((r) => ({
      item: r.itemCode,
      expert: r.expertCode,
      relevance: r.relevance,
      essential: r.essential,
      facet: r.facetName,
    })),
  ];
  const analysis = analyzeRound(study, ctx, combined);
  const at = new Date().toISOString();
  return study.db.transaction(() => {
    const pending: ImportRecord = {
      id: 0,
      roundId,
      fileName,
      sha256: preview.sha256,
      layout: preview.layout ?? 'long',
      ratings: ratings.length,
      importedAt: at,
      withdrawnAt: null,
    };
    const runId = storeRun(study, analysis, [
      ...listImports(study, roundId).filter((i) => !i.withdrawnAt),
      pending,
    ]);
    changeInPhase(
      study,
      {
        phase: 'review',
        kind: 'ratings-imported',
        target: `round ${ctx.round.number}: file "${fileName}"`,
        runId,
        detail: {
          fileName,
          sha256: preview.sha256,
          layout: preview.layout,
          ratings: ratings.length,
          experts: preview.experts.map((e) => e.code),
          addedToPanel: preview.experts.filter((e) => !e.onPanel).map((e) => e.code),
          items: preview.itemCount,
        },
      },
      () => {
        const importId = insertImport(study, {
          roundId,
          fileName,
          sha256: preview.sha256,
          layout: pending.layout,
          ratings: ratings.length,
          importedAt: at,
        });
        const expertIds = new Map(ctx.experts.map((e) => [e.code.toLowerCase(), e.id]));
        for (const e of preview.experts) {
          if (!expertIds.has(e.code.toLowerCase())) {
            expertIds.set(
              e.code.toLowerCase(),
              insertExpert(study, roundId, { code: e.code, role: '', name: '', nameWithheld: false }),
            );
          }
        }
        const rows: NewRating[] = ratings.map((r) => ({
          expertId: expertIds.get(r.expertCode.toLowerCase()) as number,
          itemId: r.itemId,
          relevance: r.relevance,
          essential: r.essential,
          facetId: r.facetId,
          comment: r.comment,
          sourceRow: r.row,
        }));
        insertRatings(study, roundId, importId, rows);
        freezeRoundRevisions(study, roundId);
      },
    );
    return { imported: ratings.length, runId };
  })();
}

/** Takes an imported file's ratings out of a round (the import stays on record, marked withdrawn). */
export function withdrawRatings(study: Study, importId: number, rationale: string): void {
  const record = getImport(study, importId);
  if (!record) throw new RuleError(`ratings import ${importId} does not exist in this study`, 'not-found');
  if (record.withdrawnAt) throw new RuleError(`the ratings from "${record.fileName}" are already withdrawn`);
  if (rationale.trim() === '')
    throw new RuleError(`say why the ratings from "${record.fileName}" are withdrawn`);
  const ctx = roundContext(study, record.roundId);
  const analysis = analyzeRound(study, ctx, storedEngineRatings(study, record.roundId, importId));
  study.db.transaction(() => {
    const remaining = listImports(study, record.roundId).filter((i) => !i.withdrawnAt && i.id !== importId);
    const runId = storeRun(study, analysis, remaining);
    changeInPhase(
      study,
      {
        phase: 'review',
        kind: 'ratings-withdrawn',
        target: `round ${ctx.round.number}: file "${record.fileName}"`,
        rationale: rationale.trim(),
        runId,
        detail: { importId, fileName: record.fileName, sha256: record.sha256, ratings: record.ratings },
      },
      () => {
        withdrawImport(study, importId, new Date().toISOString());
        if (countRatings(study, record.roundId) === 0) unfreezeRoundRevisions(study, record.roundId);
      },
    );
  })();
}

export interface DecisionInput {
  roundId: number;
  itemId: number;
  decision: Decision;
  rationale: string;
  /** The new wording, for a revise decision. */
  newText?: string;
}

/**
 * Records a decision on an item after a round: keep, revise (with the new wording, which becomes a
 * new revision) or retire; each with its rationale and the statistics it was taken on, in the log.
 * A later decision on the same item in the same round supersedes the earlier one.
 */
export function decideItem(study: Study, input: DecisionInput): number {
  const ctx = roundContext(study, input.roundId);
  const item = ctx.roundItems.find((it) => it.id === input.itemId);
  if (!item) {
    const known = getItem(study, input.itemId);
    throw new RuleError(
      known
        ? `item ${known.code} is not part of round ${ctx.round.number}`
        : `item ${input.itemId} does not exist in this study`,
      known ? 'rule' : 'not-found',
    );
  }
  const rationale = input.rationale.trim();
  if (rationale === '')
    throw new RuleError(
      `say why item ${item.code} is ${input.decision === 'keep' ? 'kept' : `${input.decision}d`}`,
    );
  const analysis = analyzeRound(study, ctx, storedEngineRatings(study, ctx.round.id));
  if (!analysis) {
    throw new RuleError(`round ${ctx.round.number} has no ratings yet; import them before deciding on items`);
  }
  let newText: string | null = null;
  if (input.decision === 'revise') {
    newText = (input.newText ?? '').trim();
    if (newText === '') throw new RuleError(`a revision of item ${item.code} needs the new wording`);
    if (newText.length > MAX_ITEM_TEXT) {
      throw new RuleError(
        `the new wording is ${newText.length} characters, above the limit of ${MAX_ITEM_TEXT}`,
      );
    }
    if (newText === item.text) {
      throw new RuleError(`the new wording of item ${item.code} is the same as its current wording`);
    }
  }
  const stats = analysis.report.items.find((s) => s.item === item.code) ?? null;
  const runId = latestRoundRun(study, ANALYSIS_KIND, ctx.round.id);
  return changeInPhase(
    study,
    {
      phase: 'review',
      kind: DECISION_KIND[input.decision],
      target: `item ${item.code}`,
      rationale,
      runId,
      detail: {
        round: ctx.round.number,
        decision: input.decision,
        stats: stats && {
          iCvi: stats.iCvi,
          modifiedKappa: stats.modifiedKappa,
          kappaBand: stats.kappaBand,
          cvr: stats.cvr,
          aikenV: stats.aikenV,
          facetAgreement: stats.facetAgreement,
          flags: stats.flags,
        },
        ...(newText !== null ? { before: item.text, after: newText } : {}),
      },
    },
    () => {
      const at = new Date().toISOString();
      const revisionId =
        newText === null
          ? null
          : insertRevision(study, item.id, newText, 'revised-after-review', ctx.round.id, at);
      setItemState(study, item.id, input.decision === 'retire' ? 'retired' : 'kept');
      return insertDecision(study, {
        itemId: item.id,
        roundId: ctx.round.id,
        decision: input.decision,
        rationale,
        revisionId,
        runId,
        decidedAt: at,
      });
    },
  );
}

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

function roundView(study: Study, round: RoundRecord): RoundView {
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

/**
 * The blank ratings sheet of a round, in long form (one row per expert and item, items in the
 * packet's order), with the columns its rating form asks for. Reading it changes nothing, so it stays
 * available after the phase is signed off (a late expert, a lost copy).
 */
export function blankRatingsSheet(study: Study, roundId: number): { fileName: string; text: string } {
  const round = roundView(study, requireRound(study, roundId));
  const columns = ['item', 'expert', 'relevance'];
  if (round.form.asksEssential) columns.push('essential');
  if (round.form.asksFacet) columns.push('facet');
  if (round.form.asksComment) columns.push('comment');
  const experts = round.experts.length > 0 ? round.experts.map((e) => e.code) : ['E1', 'E2', 'E3'];
  const inPacketOrder = [...round.items].sort((a, b) => a.packetNumber - b.packetNumber);
  const rows = experts.flatMap((expert) =>
    inPacketOrder.map((it) => [it.code, expert, ...columns.slice(2).map(() => '')]),
  );
  return {
    fileName: `ratings-sheet-round-${round.number}.csv`,
    text: `${Papa.unparse({ fields: columns, data: rows }, { newline: '\r\n' })}\r\n`,
  };
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
function packetSections<T extends { facetId: number | null }>(
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

/** Each round item's number in the printed packet, by item id. */
function packetNumbers(study: Study, ctx: RoundContext): Map<number, number> {
  const out = new Map<number, number>();
  for (const section of packetSections(study, ctx, ctx.roundItems)) {
    for (const it of section.items) out.set(it.id, out.size + 1);
  }
  return out;
}

/**
 * What the printable review packet of a round shows: the construct and facet definitions, the
 * rating scale and questions of the form, and the items in the wording the experts rate. When the
 * form asks experts to place items in facets, the items are listed in one interleaved sequence so
 * the packet does not reveal the intended facet; otherwise they are grouped under their facets.
 */
export function reviewPacket(study: Study, roundId: number) {
  const ctx = roundContext(study, roundId);
  const construct = getConstruct(study);
  const facets = listFacets(study);
  const frozen = new Map(listRoundItems(study, roundId).map((ri) => [ri.itemId, ri.revisionId]));
  const items = ctx.roundItems.map((it) => {
    const revisionId = frozen.get(it.id) ?? null;
    return {
      code: it.code,
      text: revisionId === null ? it.text : (getRevision(study, revisionId)?.text ?? it.text),
      facetId: it.facetId,
    };
  });
  const anchors = Array.from({ length: ctx.form.relevanceMax - ctx.form.relevanceMin + 1 }, (_, i) => ({
    value: ctx.form.relevanceMin + i,
    label: RELEVANCE_ANCHORS[i] ?? '',
  }));
  const sections = packetSections(study, ctx, items);
  let number = 0;
  return {
    studyTitle: study.meta('title') ?? '',
    construct: { name: construct.name, definition: construct.definition, population: construct.population },
    round: { id: ctx.round.id, number: ctx.round.number, label: ctx.round.label },
    form: ctx.form,
    anchors,
    essentialAnswers: ESSENTIAL_ANSWERS,
    /** Item codes often carry the facet (TR01), so they are left off when experts place items in facets. */
    showCodes: !ctx.form.asksFacet,
    facets: facets.map((f) => ({ name: f.name, definition: f.definition })),
    sections: sections.map((s) => ({
      facet: s.facet,
      items: s.items.map((it) => ({ number: ++number, code: it.code, text: it.text })),
    })),
    experts: ctx.experts.length,
  };
}

/** For each item, the latest round that rated it, and whether it was flagged there. */
function latestAssessments(study: Study) {
  const out = new Map<string, { round: RoundView; item: RoundItemView }>();
  for (const round of listRounds(study).map((r) => roundView(study, r))) {
    if (!round.report) continue;
    for (const it of round.items)
      if (it.stats?.iCvi !== null && it.stats) out.set(it.code, { round, item: it });
  }
  return out;
}

export const reviewRules: PhaseRules = {
  id: 'review',
  purpose: 'Have experts rate each item; compute content-validity statistics and decide.',
  holds(study) {
    const rounds = listRounds(study).map((r) => roundView(study, r));
    const out = [countWord(rounds.length, 'review round')];
    for (const r of rounds) {
      if (!r.report) continue;
      out.push(
        `round ${r.number}: ${countWord(r.report.experts.length, 'expert')}, ${countWord(r.items.length, 'item')}, S-CVI/Ave ${formatRatio(r.report.sCviAve)}`,
      );
    }
    const decisions = rounds.reduce((n, r) => n + r.items.filter((it) => it.decision).length, 0);
    out.push(countWord(decisions, 'decision'));
    return out;
  },
  checklist(study) {
    const rounds = listRounds(study).map((r) => roundView(study, r));
    const panelSizes = rounds.map((r) => r.report?.experts.length ?? 0);
    const largest = Math.max(0, ...panelSizes);
    const assessed = latestAssessments(study);
    const flagged = [...assessed.values()].filter(({ item }) => (item.stats?.flags.length ?? 0) > 0);
    const undecided = flagged.filter(({ item }) => item.decision === null);
    const lastRated = rounds.filter((r) => r.report).at(-1);
    const unrated = lastRated
      ? lastRated.items.filter((it) => it.stats === null || it.stats.iCvi === null)
      : [];
    const items: ChecklistItem[] = [
      {
        id: 'panel',
        label: `A round has relevance ratings from at least ${MIN_PANEL_FOR_BENCHMARK} experts (the smallest panel with an I-CVI benchmark; Lynn 1986)`,
        met: largest >= MIN_PANEL_FOR_BENCHMARK,
        detail:
          rounds.length === 0
            ? 'no review round yet'
            : largest === 0
              ? 'no ratings yet'
              : `${countWord(largest, 'expert')}`,
      },
      {
        id: 'rated',
        label: 'Every item of the latest rated round has relevance ratings',
        met: lastRated !== undefined && unrated.length === 0,
        detail: !lastRated
          ? 'no ratings yet'
          : unrated.length === 0
            ? `round ${lastRated.number}: all ${lastRated.items.length} rated`
            : `round ${lastRated.number}, not rated: ${unrated.map((it) => it.code).join(', ')}`,
      },
      {
        id: 'decided',
        label:
          'Every item flagged in its latest rating has a decision (keep, revise or retire) with a rationale',
        met: lastRated !== undefined && undecided.length === 0,
        detail: !lastRated
          ? 'no ratings yet'
          : flagged.length === 0
            ? 'no item flagged'
            : undecided.length === 0
              ? `${countWord(flagged.length, 'flagged item')}, all decided`
              : `undecided: ${undecided.map(({ item, round }) => `${item.code} (round ${round.number})`).join(', ')}`,
      },
    ];
    return items;
  },
};
