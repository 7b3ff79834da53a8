import { delimiterName } from '../detect-format.ts';
import { type FileProblem, tableProblem } from '../file-problem.ts';
import { TableError } from '../parse-table.ts';
import { sha256Hex } from '../sha256.ts';
import { describeProblem, readRatings } from './read.ts';

/**
 * Matching a ratings file to a review round: every rating's item must be in the round, every expert
 * code usable, no expert may rate an item twice (in the file or across imports), and facets must be
 * the study's. Writes nothing; the review phase gathers the round's data and stores what is matched.
 */

/** Largest ratings file read in one import (a 40-expert, 200-item long file is well under 1 MiB). */
export const MAX_RATINGS_FILE_BYTES = 8 * 1024 * 1024;

/** Ratings listed in a preview (the rest are counted). */
export const MAX_PREVIEW_RATINGS = 300;

/** Expert codes: a letter or digit, then up to 39 letters, digits, dots, dashes or underscores. */
export const EXPERT_CODE_PATTERN = /^[A-Za-z0-9][A-Za-z0-9._-]{0,39}$/;

/** What a ratings file is matched against: the round, its form and panel, the study's pool and facets. */
export interface RoundRatings {
  roundId: number;
  round: { number: number };
  form: {
    relevanceMin: number;
    relevanceMax: number;
    asksEssential: boolean;
    asksFacet: boolean;
    asksComment: boolean;
  };
  experts: readonly { id: number; code: string }[];
  roundItems: readonly { id: number; code: string }[];
  /** Every item code of the pool, for telling "not in this round" from "not in the pool". */
  poolCodes: readonly string[];
  facets: readonly { id: number; name: string }[];
  /** Ratings already stored for the round, with the import each came from. */
  stored: readonly { itemId: number; expertId: number; importId: number }[];
  /** File names of the round's earlier imports, by import id. */
  importNames: ReadonlyMap<number, string>;
  /** Longest comment accepted (characters). */
  maxComment: number;
}

function countWord(n: number, word: string): string {
  return `${n} ${word}${n === 1 ? '' : 's'}`;
}

/** One parsed rating, ready to store, named by codes so that it can be shown and analysed. */
export interface ParsedRating {
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

export interface ParsedRatingsFile {
  preview: RatingsPreview;
  ratings: ParsedRating[];
}

export function matchRatingsFile(ctx: RoundRatings, bytes: Uint8Array, fileName: string): ParsedRatingsFile {
  const roundId = ctx.roundId;
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
  const poolCodes = new Set(ctx.poolCodes.map((code) => code.toLowerCase()));
  const panel = new Map(ctx.experts.map((e) => [e.code.toLowerCase(), e]));
  const facets = ctx.facets;
  const facetByName = new Map(facets.map((f) => [f.name.toLowerCase(), f]));
  const stored = ctx.stored;
  const importOf = ctx.importNames;
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
    if (r.comment !== null && r.comment.length > ctx.maxComment) {
      problems.push(
        problem(r.row, longColumn('comment'), `the comment is longer than ${ctx.maxComment} characters`),
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
