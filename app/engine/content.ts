import { binomialCoefficient, binomialSf } from './distributions.ts';
import { EngineError } from './errors.ts';
import { ruleThreshold } from './methods/index.ts';

/**
 * Content validity from an expert panel: item and scale content validity indices, the modified
 * kappa, Lawshe's content validity ratio with its exact critical value, Aiken's V, and agreement on
 * which facet an item belongs to. Every benchmark is returned as a flag that names its source; the
 * flags advise, the researcher decides.
 */

/** The relevance scale the experts used, e.g. 1 (not relevant) to 4 (highly relevant). */
export interface RelevanceScale {
  min: number;
  max: number;
}

/** One expert's judgement of one item. `null` marks an answer the expert left blank. */
export interface ExpertRating {
  item: string;
  expert: string;
  relevance: number | null;
  /** Lawshe's judgement: true = essential, false = useful or not necessary. */
  essential?: boolean | null;
  /** The facet this expert places the item in. */
  facet?: string | null;
}

/** Modified kappa bands of Polit, Beck & Owen (2007). */
export type KappaBand = 'excellent' | 'good' | 'fair' | 'poor';

/**
 * Chance that one expert rates an item relevant (modified kappa) or essential (critical CVR) when
 * judging at random: the ½ of Polit, Beck & Owen's (2007) Pc and of the exact binomial test.
 */
export const CHANCE_PROBABILITY = 0.5;

/** Significance level of the one-tailed exact binomial test behind the critical CVR (Lawshe 1975). */
export const CVR_ALPHA = ruleThreshold('content.cvr-significance', 'alpha');

/** Benchmark I-CVI for panels of six or more experts (Polit & Beck 2006; Lynn 1986). */
export const ICVI_BENCHMARK_LARGE_PANEL = ruleThreshold('content.i-cvi-benchmark', 'largePanelMinimum');

/** Smallest panel for which Lynn (1986) gives an I-CVI benchmark (1.00 for 3 to 5 experts). */
export const MIN_PANEL_FOR_BENCHMARK = ruleThreshold('content.i-cvi-benchmark', 'minimumPanel');

/** Smallest panel size that gets the .78 benchmark rather than 1.00. */
export const LARGE_PANEL = ruleThreshold('content.i-cvi-benchmark', 'largePanelFrom');

/** Benchmark S-CVI/Ave (Polit & Beck 2006). */
export const SCVI_AVE_BENCHMARK = ruleThreshold('content.s-cvi-ave-benchmark', 'minimum');

/**
 * Published benchmarks are stated to two decimals; a value meets a benchmark when it reaches it at
 * that precision (7 of 9 experts give I-CVI .778, reported as .78, which Lynn's table accepts).
 */
export const BENCHMARK_PRECISION = 0.005;

/** Slack for comparing two exact ratios computed in floating point (e.g. CVR against its critical value). */
export const RATIO_TOLERANCE = 1e-12;

const KAPPA_EXCELLENT_ABOVE = ruleThreshold('content.modified-kappa-bands', 'excellentAbove');
const KAPPA_GOOD_FROM = ruleThreshold('content.modified-kappa-bands', 'goodFrom');
const KAPPA_FAIR_FROM = ruleThreshold('content.modified-kappa-bands', 'fairFrom');

function checkScale(scale: RelevanceScale): void {
  if (!Number.isInteger(scale.min) || !Number.isInteger(scale.max)) {
    throw new EngineError(
      `relevance scale bounds must be whole numbers (got ${scale.min} to ${scale.max})`,
      'scale',
    );
  }
  if (scale.min >= scale.max) {
    throw new EngineError(
      `relevance scale needs min below max (got min ${scale.min}, max ${scale.max})`,
      'scale',
    );
  }
}

function checkRatings(ratings: readonly number[], scale: RelevanceScale, what: string): void {
  if (ratings.length === 0) throw new EngineError(`${what} requires at least one rating`, 'empty');
  for (const r of ratings) {
    if (!Number.isInteger(r) || r < scale.min || r > scale.max) {
      throw new EngineError(
        `${what} requires whole-number ratings from ${scale.min} to ${scale.max} (got ${r})`,
        'range',
      );
    }
  }
}

/**
 * Whether a relevance rating counts as "relevant": the upper half of the scale, r > (min + max) / 2.
 * On the usual 1–4 scale that is 3 or 4 (Lynn 1986; Polit & Beck 2006); on 1–5 it is 4 or 5 (the
 * midpoint 3 is not relevant); on 0–3 it is 2 or 3.
 *
 * Registry: content.relevant-ratings.
 * Cost: O(1). Throws EngineError when the scale bounds are not whole numbers with min below max.
 */
export function isRelevant(rating: number, scale: RelevanceScale): boolean {
  checkScale(scale);
  return rating > (scale.min + scale.max) / 2;
}

/**
 * Item-level content validity index (Lynn 1986; Polit & Beck 2006): the share of experts rating the
 * item relevant. Example: ratings [4, 3, 4, 2, 4, 3] on 1–4 give 5/6 = .83.
 *
 * Registry: content.i-cvi.
 * Cost: O(N) for N ratings. Throws EngineError on an empty list or a rating off the scale.
 */
export function itemCvi(ratings: readonly number[], scale: RelevanceScale): number {
  checkScale(scale);
  checkRatings(ratings, scale, 'I-CVI');
  let relevant = 0;
  for (const r of ratings) if (isRelevant(r, scale)) relevant++;
  return relevant / ratings.length;
}

/**
 * Band for a modified kappa (Polit, Beck & Owen 2007): above .74 excellent, .60–.74 good, .40–.59
 * fair, below .40 poor.
 *
 * Registry: content.modified-kappa-bands.
 * Cost: O(1). Throws EngineError when kappa is not a finite number.
 */
export function kappaBand(kappa: number): KappaBand {
  if (!Number.isFinite(kappa)) throw new EngineError('kappa band requires a finite kappa', 'value');
  if (kappa > KAPPA_EXCELLENT_ABOVE) return 'excellent';
  if (kappa >= KAPPA_GOOD_FROM) return 'good';
  if (kappa >= KAPPA_FAIR_FROM) return 'fair';
  return 'poor';
}

/**
 * Modified kappa for one item (Polit, Beck & Owen 2007): the I-CVI adjusted for chance agreement on
 * relevance. Pc = C(N, A)·.5ᴺ and k* = (I-CVI − Pc) / (1 − Pc). Worked example in that paper: N = 6,
 * A = 5 give I-CVI .83, Pc .094, k* .82 (excellent).
 *
 * Registry: content.modified-kappa.
 * Cost: O(min(A, N − A)) for the binomial coefficient. Throws EngineError when N is not a positive
 * whole number or A is not a whole number from 0 to N.
 */
export function modifiedKappa(
  experts: number,
  agreeing: number,
): { iCvi: number; pc: number; kappa: number; band: KappaBand } {
  if (!Number.isInteger(experts) || experts < 1) {
    throw new EngineError(`modified kappa requires at least one expert (got ${experts})`, 'count');
  }
  if (!Number.isInteger(agreeing) || agreeing < 0 || agreeing > experts) {
    throw new EngineError(
      `modified kappa requires 0 to ${experts} agreeing experts (got ${agreeing})`,
      'count',
    );
  }
  const iCvi = agreeing / experts;
  const pc = binomialCoefficient(experts, agreeing) * CHANCE_PROBABILITY ** experts;
  const kappa = (iCvi - pc) / (1 - pc);
  return { iCvi, pc, kappa, band: kappaBand(kappa) };
}

/**
 * Lawshe's (1975) content validity ratio: CVR = (nₑ − N/2) / (N/2), from −1 (no expert calls the item
 * essential) to 1 (all do). Example: 8 of 10 experts give .60.
 *
 * Registry: content.cvr.
 * Cost: O(1). Throws EngineError when N is not a positive whole number or nₑ is not from 0 to N.
 */
export function contentValidityRatio(essential: number, experts: number): number {
  if (!Number.isInteger(experts) || experts < 1) {
    throw new EngineError(`CVR requires at least one expert (got ${experts})`, 'count');
  }
  if (!Number.isInteger(essential) || essential < 0 || essential > experts) {
    throw new EngineError(`CVR requires 0 to ${experts} essential judgements (got ${essential})`, 'count');
  }
  const half = experts / 2;
  return (essential - half) / half;
}

/**
 * Critical CVR from the exact one-tailed binomial test (Wilson, Pan & Schumsky 2012; Ayre & Scally
 * 2014): the smallest nₑ with P(X ≥ nₑ) ≤ α for X ~ Binomial(N, ½), converted with Lawshe's formula.
 * N = 5, 6, 7 → 1.00; 8 → .750; 9 → .778; 10 → .800; 11 → .636; 12 → .667 at α = .05. Returns null
 * when no nₑ reaches α (at α = .05, panels of fewer than five experts).
 *
 * Registry: content.cvr-critical, content.cvr-significance.
 * Cost: O(N·√N): at most N/2 binomial tails of O(√N) each. Throws EngineError when N is not a positive whole number
 * or α is not strictly between 0 and 1.
 */
export function criticalCvr(
  experts: number,
  alpha: number = CVR_ALPHA,
): { essentialNeeded: number; cvr: number; tailProbability: number } | null {
  if (!Number.isInteger(experts) || experts < 1) {
    throw new EngineError(`critical CVR requires at least one expert (got ${experts})`, 'count');
  }
  if (!(alpha > 0 && alpha < 1)) {
    throw new EngineError(`critical CVR requires a significance level between 0 and 1 (got ${alpha})`);
  }
  for (let needed = Math.floor(experts / 2) + 1; needed <= experts; needed++) {
    const tail = binomialSf(needed, experts, CHANCE_PROBABILITY);
    if (tail <= alpha) {
      return { essentialNeeded: needed, cvr: contentValidityRatio(needed, experts), tailProbability: tail };
    }
  }
  return null;
}

/**
 * Aiken's (1985) V for one item: V = Σ(r − lo) / (N(c − 1)), with lo the lowest rating and c the number
 * of categories, so V runs from 0 (every expert gave the lowest rating) to 1 (every expert gave the
 * highest). Example: ratings [4, 4, 3] on 1–4 give (3 + 3 + 2) / (3·3) = .889.
 *
 * Registry: content.aiken-v.
 * Cost: O(N). Throws EngineError on an empty list or a rating off the scale.
 */
export function aikenV(ratings: readonly number[], scale: RelevanceScale): number {
  checkScale(scale);
  checkRatings(ratings, scale, "Aiken's V");
  const categories = scale.max - scale.min + 1;
  let sum = 0;
  for (const r of ratings) sum += r - scale.min;
  return sum / (ratings.length * (categories - 1));
}

/**
 * Scale-level content validity indices (Polit & Beck 2006): S-CVI/Ave, the mean of the item I-CVIs,
 * and S-CVI/UA, the share of items every expert rated relevant (I-CVI = 1).
 *
 * Registry: content.s-cvi, content.s-cvi-ave-benchmark.
 * Cost: O(k) for k items. Throws EngineError on an empty list or an I-CVI outside 0–1.
 */
export function scaleCvi(itemCvis: readonly number[]): { average: number; universal: number } {
  if (itemCvis.length === 0) throw new EngineError('S-CVI requires at least one item', 'empty');
  let sum = 0;
  let universal = 0;
  for (const v of itemCvis) {
    if (!(v >= 0 && v <= 1)) throw new EngineError(`S-CVI requires I-CVIs between 0 and 1 (got ${v})`);
    sum += v;
    if (v === 1) universal++;
  }
  return { average: sum / itemCvis.length, universal: universal / itemCvis.length };
}

/**
 * Fleiss' (1971) kappa for many raters sorting subjects into categories. `counts[i][j]` is how many
 * raters put subject i in category j; every subject needs the same number n ≥ 2 of raters.
 * κ = (P̄ − P̄ₑ) / (1 − P̄ₑ) with Pᵢ = (Σⱼ nᵢⱼ² − n) / (n(n − 1)) and P̄ₑ = Σⱼ pⱼ².
 *
 * Registry: agreement.fleiss-kappa.
 * Cost: O(S·C) for S subjects and C categories. Throws EngineError with fewer than two subjects,
 * unequal or fewer than two raters per subject, negative counts, or when every rating falls in one
 * category (chance agreement 1 leaves kappa undefined).
 */
export function fleissKappa(counts: readonly (readonly number[])[]): number {
  if (counts.length < 2) throw new EngineError("Fleiss' kappa requires at least two subjects", 'count');
  const categories = counts[0].length;
  if (categories < 1) throw new EngineError("Fleiss' kappa requires at least one category", 'count');
  let raters = -1;
  const totals = new Array<number>(categories).fill(0);
  let sumP = 0;
  for (let i = 0; i < counts.length; i++) {
    const row = counts[i];
    if (row.length !== categories) {
      throw new EngineError(
        `Fleiss' kappa requires ${categories} category counts for every subject (subject ${i + 1} has ${row.length})`,
      );
    }
    let n = 0;
    let squares = 0;
    for (let j = 0; j < categories; j++) {
      const c = row[j];
      if (!Number.isInteger(c) || c < 0) {
        throw new EngineError(
          `Fleiss' kappa requires whole, non-negative counts (subject ${i + 1} has ${c})`,
        );
      }
      n += c;
      squares += c * c;
      totals[j] += c;
    }
    if (raters === -1) raters = n;
    if (n !== raters) {
      throw new EngineError(
        `Fleiss' kappa requires the same number of raters for every subject (subject 1 has ${raters}, subject ${i + 1} has ${n})`,
      );
    }
    if (n < 2) throw new EngineError("Fleiss' kappa requires at least two raters per subject", 'count');
    sumP += (squares - n) / (n * (n - 1));
  }
  const all = counts.length * raters;
  let chance = 0;
  for (const t of totals) chance += (t / all) ** 2;
  if (chance >= 1 - RATIO_TOLERANCE) {
    throw new EngineError("Fleiss' kappa is undefined when every rating falls in one category", 'undefined');
  }
  const observed = sumP / counts.length;
  return (observed - chance) / (1 - chance);
}

/**
 * Cohen's (1960) kappa for two raters assigning the same subjects to nominal categories:
 * κ = (pₒ − pₑ) / (1 − pₑ), with pₑ from the two raters' marginal shares.
 *
 * Registry: agreement.cohen-kappa.
 * Cost: O(S + C²) for S subjects and C categories. Throws EngineError when the lists differ in
 * length, are empty, or both raters use one and the same category throughout (kappa undefined).
 */
export function cohenKappa(a: readonly string[], b: readonly string[]): number {
  if (a.length !== b.length) {
    throw new EngineError(`Cohen's kappa requires two ratings per subject (got ${a.length} and ${b.length})`);
  }
  if (a.length === 0) throw new EngineError("Cohen's kappa requires at least one subject", 'empty');
  const countA = new Map<string, number>();
  const countB = new Map<string, number>();
  let agree = 0;
  for (let i = 0; i < a.length; i++) {
    countA.set(a[i], (countA.get(a[i]) ?? 0) + 1);
    countB.set(b[i], (countB.get(b[i]) ?? 0) + 1);
    if (a[i] === b[i]) agree++;
  }
  const n = a.length;
  let chance = 0;
  for (const [label, ca] of countA) chance += (ca / n) * ((countB.get(label) ?? 0) / n);
  if (chance >= 1 - RATIO_TOLERANCE) {
    throw new EngineError("Cohen's kappa is undefined when both raters use a single category", 'undefined');
  }
  return (agree / n - chance) / (1 - chance);
}

/**
 * Formats a ratio the way the trade reports it: no leading zero (.83, -.33, 1.00).
 *
 * Cost: O(1). Throws nothing; a non-finite value is printed as "n/a".
 */
export function formatRatio(value: number, digits = 2): string {
  if (!Number.isFinite(value)) return 'n/a';
  const fixed = Math.abs(value).toFixed(digits);
  const bare = fixed.startsWith('0.') ? fixed.slice(1) : fixed;
  return (value < 0 && Number(fixed) !== 0 ? '-' : '') + bare;
}

/** One item's content-validity evidence. Null marks a statistic the panel's answers cannot support. */
export interface ItemContentValidity {
  item: string;
  /** Intended facet, when the researcher gave one. */
  facet: string | null;
  /** Experts who gave a relevance rating. */
  rated: number;
  /** Panel experts who gave no relevance rating for this item. */
  missing: number;
  relevant: number;
  iCvi: number | null;
  pc: number | null;
  modifiedKappa: number | null;
  kappaBand: KappaBand | null;
  /** Experts who answered the essential question, and how many said essential. */
  essentialAnswered: number;
  essentialCount: number;
  cvr: number | null;
  /** Critical CVR for this item's number of essential answers; null when none is reachable. */
  cvrCritical: number | null;
  aikenV: number | null;
  /** Share of the experts who placed the item in a facet that chose its intended facet. */
  facetAgreement: number | null;
  /** Benchmarks the item misses, each naming its source. */
  flags: string[];
}

export interface FacetContentValidity {
  facet: string;
  items: number;
  sCviAve: number;
  sCviUa: number;
}

export interface FacetSortingAgreement {
  /** Fleiss' kappa over the items every sorting expert placed; null when undefined (see warnings). */
  fleissKappa: number | null;
  itemsUsed: number;
  raters: number;
  /** Cohen's kappa when exactly two experts sorted items; null otherwise. */
  cohenKappa: number | null;
}

export interface ContentValidityReport {
  scale: RelevanceScale;
  experts: string[];
  items: ItemContentValidity[];
  sCviAve: number;
  sCviUa: number;
  /** Critical CVR for the full panel size at CVR_ALPHA; null when no panel answer can reach it. */
  cvrCritical: number | null;
  facets: FacetContentValidity[];
  facetSorting: FacetSortingAgreement | null;
  /** Scale-level benchmarks missed. */
  flags: string[];
  warnings: string[];
}

export interface ContentValidityInput {
  ratings: readonly ExpertRating[];
  scale: RelevanceScale;
  /** Whether the panel was asked Lawshe's essential question; without it CVR is null and a warning says so. */
  hasEssential: boolean;
  /** Intended facet per item code. */
  intendedFacets?: Readonly<Record<string, string>>;
}

interface ItemTally {
  relevance: number[];
  essentialAnswered: number;
  essentialCount: number;
  placements: Map<string, string>;
}

function iCviFlag(iCvi: number, rated: number): string | null {
  if (rated < MIN_PANEL_FOR_BENCHMARK) return null;
  if (rated < LARGE_PANEL) {
    return iCvi < 1 - BENCHMARK_PRECISION
      ? `I-CVI ${formatRatio(iCvi)} below 1.00 (${MIN_PANEL_FOR_BENCHMARK}–${LARGE_PANEL - 1} experts; Lynn 1986)`
      : null;
  }
  return iCvi < ICVI_BENCHMARK_LARGE_PANEL - BENCHMARK_PRECISION
    ? `I-CVI ${formatRatio(iCvi)} below ${formatRatio(ICVI_BENCHMARK_LARGE_PANEL)} (${LARGE_PANEL}+ experts; Polit & Beck 2006)`
    : null;
}

function countWord(n: number, word: string): string {
  return `${n} ${word}${n === 1 ? '' : 's'}`;
}

/**
 * Content validity of an item pool from one expert panel: per item I-CVI, modified kappa with its
 * band (Polit, Beck & Owen 2007), Lawshe's CVR with the exact critical value (Wilson, Pan & Schumsky
 * 2012), Aiken's V; S-CVI/Ave and S-CVI/UA overall and per intended facet (Polit & Beck 2006); facet
 * placement agreement per item and Fleiss' (1971) kappa across items, plus Cohen's (1960) kappa when
 * two experts sorted. Missing ratings are left out of that item's statistics (each statistic uses the
 * experts who answered) and reported in `missing` and in the warnings. Items keep their first order
 * of appearance.
 *
 * Registry: content.i-cvi-benchmark and the entries above.
 * Cost: O(R + k·F) for R ratings, k items and F facets. Throws EngineError when there are no
 * ratings, a rating is off the scale, an expert rates an item twice, or no item has a relevance rating.
 */
export function analyzeContentValidity(input: ContentValidityInput): ContentValidityReport {
  const { ratings, scale } = input;
  checkScale(scale);
  if (ratings.length === 0) throw new EngineError('content validity requires at least one rating', 'empty');
  const intended = input.intendedFacets ?? {};
  const experts: string[] = [];
  const expertSet = new Set<string>();
  const tallies = new Map<string, ItemTally>();
  const seen = new Set<string>();
  for (const r of ratings) {
    const key = `${r.item}\u0000${r.expert}`;
    if (seen.has(key)) {
      throw new EngineError(`expert ${r.expert} rates item ${r.item} more than once`, 'duplicate');
    }
    seen.add(key);
    if (!expertSet.has(r.expert)) {
      expertSet.add(r.expert);
      experts.push(r.expert);
    }
    let tally = tallies.get(r.item);
    if (!tally) {
      tally = { relevance: [], essentialAnswered: 0, essentialCount: 0, placements: new Map() };
      tallies.set(r.item, tally);
    }
    if (r.relevance !== null) {
      if (!Number.isInteger(r.relevance) || r.relevance < scale.min || r.relevance > scale.max) {
        throw new EngineError(
          `relevance ${r.relevance} (expert ${r.expert}, item ${r.item}) is outside the scale ${scale.min}–${scale.max}`,
          'range',
        );
      }
      tally.relevance.push(r.relevance);
    }
    if (r.essential !== undefined && r.essential !== null) {
      tally.essentialAnswered++;
      if (r.essential) tally.essentialCount++;
    }
    if (r.facet !== undefined && r.facet !== null && r.facet !== '') tally.placements.set(r.expert, r.facet);
  }
  for (const item of Object.keys(intended)) {
    if (!tallies.has(item)) {
      tallies.set(item, { relevance: [], essentialAnswered: 0, essentialCount: 0, placements: new Map() });
    }
  }

  const panel = experts.length;
  const warnings: string[] = [];
  const items: ItemContentValidity[] = [];
  const unrated: string[] = [];
  const partlyRated: string[] = [];
  let missingTotal = 0;
  for (const [item, tally] of tallies) {
    const rated = tally.relevance.length;
    const missing = panel - rated;
    missingTotal += missing;
    const flags: string[] = [];
    let iCvi: number | null = null;
    let pc: number | null = null;
    let kappa: number | null = null;
    let band: KappaBand | null = null;
    let v: number | null = null;
    let relevant = 0;
    if (rated === 0) {
      unrated.push(item);
    } else {
      if (missing > 0) partlyRated.push(item);
      for (const r of tally.relevance) if (isRelevant(r, scale)) relevant++;
      const mk = modifiedKappa(rated, relevant);
      iCvi = mk.iCvi;
      pc = mk.pc;
      kappa = mk.kappa;
      band = mk.band;
      v = aikenV(tally.relevance, scale);
      const flag = iCviFlag(iCvi, rated);
      if (flag) flags.push(flag);
      if (band === 'fair' || band === 'poor') {
        flags.push(`modified kappa ${formatRatio(kappa)} ${band} (Polit, Beck & Owen 2007)`);
      }
    }
    let cvr: number | null = null;
    let critical: number | null = null;
    if (input.hasEssential && tally.essentialAnswered > 0) {
      cvr = contentValidityRatio(tally.essentialCount, tally.essentialAnswered);
      const crit = criticalCvr(tally.essentialAnswered);
      critical = crit ? crit.cvr : null;
      if (crit && cvr < crit.cvr - RATIO_TOLERANCE) {
        flags.push(
          `CVR ${formatRatio(cvr)} below critical ${formatRatio(crit.cvr, 3)} for ${countWord(tally.essentialAnswered, 'expert')} (exact binomial, one-tailed .05; Wilson, Pan & Schumsky 2012)`,
        );
      }
    }
    const facet = intended[item] ?? null;
    let facetAgreement: number | null = null;
    if (facet !== null && tally.placements.size > 0) {
      let same = 0;
      for (const placed of tally.placements.values()) if (placed === facet) same++;
      facetAgreement = same / tally.placements.size;
    }
    items.push({
      item,
      facet,
      rated,
      missing,
      relevant,
      iCvi,
      pc,
      modifiedKappa: kappa,
      kappaBand: band,
      essentialAnswered: tally.essentialAnswered,
      essentialCount: tally.essentialCount,
      cvr,
      cvrCritical: critical,
      aikenV: v,
      facetAgreement,
      flags,
    });
  }

  const scored = items.filter((it) => it.iCvi !== null);
  if (scored.length === 0) {
    throw new EngineError('content validity requires at least one relevance rating', 'empty');
  }
  if (unrated.length > 0) {
    warnings.push(
      `no relevance ratings for ${countWord(unrated.length, 'item')} (${unrated.join(', ')}): left out of I-CVI and S-CVI`,
    );
  }
  if (missingTotal > 0 && partlyRated.length > 0) {
    warnings.push(
      `relevance ratings missing for ${countWord(partlyRated.length, 'item')} (${partlyRated.join(', ')}): each statistic uses the experts who rated the item`,
    );
  }
  if (panel < MIN_PANEL_FOR_BENCHMARK) {
    warnings.push(
      `only ${countWord(panel, 'expert')}: I-CVI benchmarks start at ${MIN_PANEL_FOR_BENCHMARK} experts (Lynn 1986)`,
    );
  }
  const overall = scaleCvi(scored.map((it) => it.iCvi as number));
  const flags: string[] = [];
  if (overall.average < SCVI_AVE_BENCHMARK - BENCHMARK_PRECISION) {
    flags.push(
      `S-CVI/Ave ${formatRatio(overall.average)} below ${formatRatio(SCVI_AVE_BENCHMARK)} (Polit & Beck 2006)`,
    );
  }

  let cvrCritical: number | null = null;
  if (!input.hasEssential) {
    warnings.push(
      'no essential column: CVR not computed (Lawshe 1975 needs essential / not essential judgements)',
    );
  } else {
    const crit = criticalCvr(panel);
    cvrCritical = crit ? crit.cvr : null;
    if (!crit) {
      warnings.push(
        `with ${countWord(panel, 'expert')} no CVR reaches one-tailed .05 significance (exact binomial): the panel is too small`,
      );
    }
    const noEssential = items.filter((it) => it.essentialAnswered === 0).map((it) => it.item);
    if (noEssential.length > 0) {
      warnings.push(
        `no essential judgements for ${countWord(noEssential.length, 'item')} (${noEssential.join(', ')}): CVR not computed`,
      );
    }
  }

  const facets = facetSummaries(scored);
  const facetSorting = sortingAgreement(tallies, warnings);
  return {
    scale: { min: scale.min, max: scale.max },
    experts,
    items,
    sCviAve: overall.average,
    sCviUa: overall.universal,
    cvrCritical,
    facets,
    facetSorting,
    flags,
    warnings,
  };
}

function facetSummaries(scored: readonly ItemContentValidity[]): FacetContentValidity[] {
  const byFacet = new Map<string, number[]>();
  for (const it of scored) {
    if (it.facet === null) continue;
    const list = byFacet.get(it.facet) ?? [];
    list.push(it.iCvi as number);
    byFacet.set(it.facet, list);
  }
  const out: FacetContentValidity[] = [];
  for (const [facet, values] of byFacet) {
    const s = scaleCvi(values);
    out.push({ facet, items: values.length, sCviAve: s.average, sCviUa: s.universal });
  }
  return out;
}

function sortingAgreement(tallies: Map<string, ItemTally>, warnings: string[]): FacetSortingAgreement | null {
  const sorters = new Set<string>();
  for (const t of tallies.values()) for (const e of t.placements.keys()) sorters.add(e);
  if (sorters.size === 0) return null;
  if (sorters.size < 2) {
    warnings.push('facet placements from only one expert: no agreement statistic');
    return null;
  }
  const categories = new Map<string, number>();
  const complete: ItemTally[] = [];
  for (const t of tallies.values()) {
    if (t.placements.size !== sorters.size) continue;
    complete.push(t);
    for (const f of t.placements.values()) if (!categories.has(f)) categories.set(f, categories.size);
  }
  const skipped = tallies.size - complete.length;
  if (skipped > 0) {
    warnings.push(
      `${countWord(skipped, 'item')} not placed in a facet by every sorting expert: left out of the facet-sorting kappa`,
    );
  }
  let fleiss: number | null = null;
  let cohen: number | null = null;
  if (complete.length < 2) {
    warnings.push("fewer than two items placed by every sorting expert: Fleiss' kappa not computed");
  } else {
    const counts = complete.map((t) => {
      const row = new Array<number>(categories.size).fill(0);
      for (const f of t.placements.values()) row[categories.get(f) as number]++;
      return row;
    });
    fleiss = undefinedAsNull(() => fleissKappa(counts), warnings);
    if (sorters.size === 2) {
      const [first, second] = [...sorters];
      const a = complete.map((t) => t.placements.get(first) as string);
      const b = complete.map((t) => t.placements.get(second) as string);
      cohen = undefinedAsNull(() => cohenKappa(a, b), warnings);
    }
  }
  return { fleissKappa: fleiss, itemsUsed: complete.length, raters: sorters.size, cohenKappa: cohen };
}

function undefinedAsNull(compute: () => number, warnings: string[]): number | null {
  try {
    return compute();
  } catch (e) {
    if (e instanceof EngineError && e.code === 'undefined') {
      warnings.push(e.message);
      return null;
    }
    throw e;
  }
}

/**
 * The registry ids of the methods and rules one content validity analysis actually used: the CVR
 * entries only when essential judgements were given, the kappa coefficients only when they were
 * computed.
 *
 * Cost: O(1). Throws nothing.
 */
export function contentValidityMethods(report: ContentValidityReport): string[] {
  const ids = ['content.relevant-ratings', 'content.i-cvi', 'content.i-cvi-benchmark'];
  ids.push('content.modified-kappa', 'content.modified-kappa-bands', 'content.aiken-v');
  ids.push('content.s-cvi', 'content.s-cvi-ave-benchmark');
  if (report.items.some((item) => item.cvr !== null)) {
    ids.push('content.cvr', 'content.cvr-critical', 'content.cvr-significance');
  }
  if (report.facetSorting?.fleissKappa != null) ids.push('agreement.fleiss-kappa');
  if (report.facetSorting?.cohenKappa != null) ids.push('agreement.cohen-kappa');
  return ids;
}
