import { EngineError } from './errors.ts';
import { ruleThreshold } from './methods/index.ts';

/**
 * Item wording checks for an item pool: readability (Flesch 1948; Kincaid et al. 1975) and the
 * flags item writers commonly look for (common practice): length, double-barrelled wording, double
 * negatives, absolutes, jargon and near-duplicate items. Every flag carries a short reason. The
 * checks are heuristics over English text: they advise, the researcher decides.
 *
 * All functions are linear in the text length (near duplicates: quadratic in the number of items),
 * so a 60-item pool can be re-checked on every keystroke.
 */

export type WordingCheck =
  | 'length'
  | 'double-barrelled'
  | 'double-negative'
  | 'absolute'
  | 'jargon'
  | 'readability';

export interface WordingFlag {
  check: WordingCheck;
  /** One sentence saying what was found and why it matters. */
  reason: string;
  /** The words or snippets that triggered the flag. */
  terms: string[];
}

export interface WordingOptions {
  /** Extra jargon terms (single words or phrases) added to DEFAULT_JARGON. */
  jargon?: readonly string[];
  /** Longest item, in words, before the length flag; default MAX_ITEM_WORDS. */
  maxWords?: number;
  /** Reading ease below which the readability flag is raised; default MIN_READING_EASE. */
  minReadingEase?: number;
}

export interface Readability {
  words: number;
  sentences: number;
  syllables: number;
  /** Null when the text has no words. */
  readingEase: number | null;
  gradeLevel: number | null;
}

export interface WordingReport extends Readability {
  flags: WordingFlag[];
}

/** Items longer than this many words are flagged (rule wording.max-words, common practice). */
export const MAX_ITEM_WORDS = ruleThreshold('wording.max-words', 'maximum');

/**
 * Flesch Reading Ease below which an item is flagged. On Flesch's (1948) scale (from memory) 60–70
 * is standard, 50–60 fairly difficult and 30–50 difficult. The flag starts below 50 (common
 * practice for general-public material is 60 or above, but in a one-sentence item of six words a
 * single three-syllable word already pulls the score under 60).
 */
export const MIN_READING_EASE = ruleThreshold('wording.min-reading-ease', 'minimum');

/**
 * Cosine similarity of character trigrams at or above which two items count as near duplicates
 * (rule wording.near-duplicate-threshold, common practice).
 */
export const NEAR_DUPLICATE_THRESHOLD = ruleThreshold('wording.near-duplicate-threshold', 'similarity');

/**
 * A small starting list of words a general adult panel may not know. Researchers extend it per study
 * with WordingOptions.jargon.
 */
export const DEFAULT_JARGON: readonly string[] = [
  'infrastructure',
  'multimodal',
  'micromobility',
  'modal split',
  'derailleur',
  'drivetrain',
  'cadence',
  'utilize',
  'facilitate',
  'optimal',
  'paradigm',
  'efficacy',
  'mitigate',
];

const ABSOLUTES = new Set([
  'always',
  'never',
  'all',
  'none',
  'every',
  'everyone',
  'everybody',
  'everything',
  'everywhere',
  'nobody',
  'nothing',
  'nowhere',
  'completely',
  'totally',
  'entirely',
  'absolutely',
]);

const NEGATORS = new Set([
  'not',
  'no',
  'never',
  'none',
  'nobody',
  'nothing',
  'nowhere',
  'neither',
  'nor',
  'cannot',
  'without',
]);

/** Words whose prefix negates them; with another negation in the sentence they make a double negative. */
const NEGATIVE_AFFIX_WORDS = new Set([
  'unsafe',
  'unable',
  'uncomfortable',
  'unlikely',
  'unsure',
  'uncertain',
  'unhappy',
  'unwilling',
  'unclear',
  'unfamiliar',
  'unsteady',
  'unprepared',
  'insecure',
  'incapable',
  'impossible',
  'dislike',
  'disagree',
]);

/** Phrases in which "and"/"or" does not join two separate things. */
const FIXED_PHRASES: readonly (readonly string[])[] = [
  ['more', 'or', 'less'],
  ['now', 'and', 'then'],
  ['back', 'and', 'forth'],
  ['over', 'and', 'over'],
  ['again', 'and', 'again'],
  ['on', 'and', 'off'],
  ['and', 'so', 'on'],
  ['or', 'so'],
];

/** "between A and B" names one relation: a conjunction this many words after "between" is not flagged. */
const BETWEEN_REACH = 4;

const NUMBER_WORDS = new Set(['one', 'two', 'three', 'four', 'five', 'six', 'seven', 'eight', 'nine', 'ten']);

const VOWELS = new Set(['a', 'e', 'i', 'o', 'u', 'y']);
const LE_SUFFIX_CONSONANT = /[b-df-hj-km-np-tv-xz]l(e|es|ed)$/;
const SILENT_ES_BLOCKERS = new Set(['s', 'x', 'z', 'c', 'g']);
const SILENT_E_BEFORE_SUFFIX = /[b-df-hj-np-tv-xz]e(ly|ment|ful|ness)$/;

function isVowelAt(word: string, i: number): boolean {
  const ch = word[i];
  if (ch === 'y') return i > 0;
  return VOWELS.has(ch);
}

/**
 * Syllables in one English word, by this rule:
 * 1. lower-case the word and keep its letters a–z (accents are stripped; a token with no letters,
 *    such as "20", counts as one syllable);
 * 2. count vowel groups: maximal runs of a, e, i, o, u, and y when y is not the first letter;
 * 3. when there are two or more groups, take one off for a silent ending:
 *    a final e after a consonant (bike, route), except consonant + "le" (bicycle, handle);
 *    a final "es" after a consonant other than s, x, z, c, g, and not "ches"/"shes" or consonant +
 *    "les" (lanes, rides; but buses, fixes, changes, bicycles keep it);
 *    a final "ed" after a consonant other than t or d, and not consonant + "led" (planned, used;
 *    but wanted, needed, cycled keep it);
 *    an e before the suffixes -ly, -ment, -ful, -ness (safely, statement, useful).
 * 4. every word has at least one syllable.
 * Known misses of the rule: recipe (2, not 3), situation (3, not 4), create (1, not 2).
 *
 * Cost: O(length of the word). Throws nothing.
 */
export function countSyllables(word: string): number {
  const w = word
    .normalize('NFD')
    .toLowerCase()
    .replace(/[^a-z]/g, '');
  if (w === '') return 1;
  let groups = 0;
  let inGroup = false;
  for (let i = 0; i < w.length; i++) {
    const vowel = isVowelAt(w, i);
    if (vowel && !inGroup) groups++;
    inGroup = vowel;
  }
  if (groups > 1) {
    const n = w.length;
    const consonantAt = (i: number): boolean => i >= 0 && !isVowelAt(w, i);
    const leEnding = LE_SUFFIX_CONSONANT.test(w);
    if (w.endsWith('e') && consonantAt(n - 2) && !leEnding) {
      groups--;
    } else if (
      w.endsWith('es') &&
      consonantAt(n - 3) &&
      !SILENT_ES_BLOCKERS.has(w[n - 3]) &&
      !/[cs]hes$/.test(w) &&
      !leEnding
    ) {
      groups--;
    } else if (w.endsWith('ed') && consonantAt(n - 3) && w[n - 3] !== 't' && w[n - 3] !== 'd' && !leEnding) {
      groups--;
    } else if (SILENT_E_BEFORE_SUFFIX.test(w)) {
      groups--;
    }
  }
  return Math.max(1, groups);
}

/**
 * The words of a text: runs of letters and digits, with apostrophes inside a word kept ("don't" is
 * one word) and hyphens splitting ("well-lit" is two). Lower-cased.
 *
 * Cost: O(length of the text). Throws nothing.
 */
export function splitWords(text: string): string[] {
  return (
    text
      .replace(/[’‘]/g, "'")
      .toLowerCase()
      .match(/[\p{L}\p{N}]+(?:'[\p{L}]+)*/gu) ?? []
  );
}

/**
 * Sentences: pieces of text ending in one or more of . ! ? (or at the end of the text) that contain
 * at least one word. A text with words but no end mark is one sentence.
 *
 * Cost: O(length of the text). Throws nothing.
 */
export function splitSentences(text: string): string[] {
  return text
    .split(/[.!?]+(?=\s|$)/u)
    .map((s) => s.trim())
    .filter((s) => splitWords(s).length > 0);
}

/**
 * Flesch (1948) Reading Ease: 206.835 − 1.015·(words/sentences) − 84.6·(syllables/words). Higher is
 * easier; 60–70 reads as plain English.
 *
 * Registry: wording.flesch-reading-ease.
 * Cost: O(1). Throws EngineError when words or sentences is below 1.
 */
export function fleschReadingEase(counts: { words: number; sentences: number; syllables: number }): number {
  checkCounts(counts, 'Flesch Reading Ease');
  return 206.835 - 1.015 * (counts.words / counts.sentences) - 84.6 * (counts.syllables / counts.words);
}

/**
 * Flesch–Kincaid grade level (Kincaid et al. 1975): 0.39·(words/sentences) + 11.8·(syllables/words)
 * − 15.59, a US school grade.
 *
 * Registry: wording.flesch-kincaid-grade.
 * Cost: O(1). Throws EngineError when words or sentences is below 1.
 */
export function fleschKincaidGrade(counts: { words: number; sentences: number; syllables: number }): number {
  checkCounts(counts, 'Flesch–Kincaid grade');
  return 0.39 * (counts.words / counts.sentences) + 11.8 * (counts.syllables / counts.words) - 15.59;
}

function checkCounts(counts: { words: number; sentences: number; syllables: number }, what: string): void {
  if (!(counts.words >= 1) || !(counts.sentences >= 1)) {
    throw new EngineError(`${what} requires at least one word and one sentence`, 'empty');
  }
  if (!(counts.syllables >= counts.words)) {
    throw new EngineError(`${what} requires at least one syllable per word`, 'count');
  }
}

/**
 * Word, sentence and syllable counts of a text with its Flesch Reading Ease and Flesch–Kincaid grade
 * (both null for a text without words). Syllables follow countSyllables.
 *
 * Cost: O(length of the text). Throws nothing.
 */
export function readability(text: string): Readability {
  const words = splitWords(text);
  if (words.length === 0) {
    return { words: 0, sentences: 0, syllables: 0, readingEase: null, gradeLevel: null };
  }
  const counts = {
    words: words.length,
    sentences: Math.max(1, splitSentences(text).length),
    syllables: words.reduce((sum, w) => sum + countSyllables(w), 0),
  };
  return { ...counts, readingEase: fleschReadingEase(counts), gradeLevel: fleschKincaidGrade(counts) };
}

function startsPhrase(words: readonly string[], at: number, phrase: readonly string[]): boolean {
  if (at < 0 || at + phrase.length > words.length) return false;
  return phrase.every((p, i) => words[at + i] === p);
}

function inFixedPhrase(words: readonly string[], i: number): boolean {
  return FIXED_PHRASES.some((phrase) =>
    phrase.some((p, offset) => p === words[i] && startsPhrase(words, i - offset, phrase)),
  );
}

function isNumeral(word: string): boolean {
  return /^\p{N}+$/u.test(word) || NUMBER_WORDS.has(word);
}

/**
 * Double-barrelled heuristic: "and" or "or" with a word on each side, unless it sits in a fixed
 * phrase (more or less, now and then, ...), joins two numbers (two or three times), or follows
 * "between" within four words; also "as well as", and a slash between two words (walk/cycle).
 */
function doubleBarrelled(text: string, words: readonly string[]): WordingFlag | null {
  const found: string[] = [];
  for (let i = 1; i < words.length - 1; i++) {
    const w = words[i];
    if (w !== 'and' && w !== 'or') continue;
    if (inFixedPhrase(words, i)) continue;
    if (isNumeral(words[i - 1]) && isNumeral(words[i + 1])) continue;
    if (words.slice(Math.max(0, i - BETWEEN_REACH), i).includes('between')) continue;
    found.push(`${words[i - 1]} ${w} ${words[i + 1]}`);
  }
  for (let i = 0; i + 2 < words.length; i++) {
    if (startsPhrase(words, i, ['as', 'well', 'as']) && i > 0 && i + 3 < words.length) {
      found.push(`${words[i - 1]} as well as ${words[i + 3]}`);
    }
  }
  for (const m of text.matchAll(/[\p{L}]+\/[\p{L}]+/gu)) found.push(m[0].toLowerCase());
  if (found.length === 0) return null;
  return {
    check: 'double-barrelled',
    reason: `may ask about two things at once (${found.map((f) => `"${f}"`).join(', ')}): an item should ask about one`,
    terms: found,
  };
}

function isNegator(word: string): boolean {
  return NEGATORS.has(word) || word.endsWith("n't");
}

/**
 * Double negative: within one sentence, two negations (not, no, never, nor, cannot, ...n't, ...), or
 * one negation with a word from a short list of negated words (unsafe, unsure, disagree, ...).
 */
function doubleNegative(text: string): WordingFlag | null {
  for (const sentence of splitSentences(text)) {
    const words = splitWords(sentence);
    const negators = words.filter(isNegator);
    const affixed = words.filter((w) => NEGATIVE_AFFIX_WORDS.has(w));
    if (negators.length >= 2 || (negators.length >= 1 && affixed.length >= 1)) {
      const terms = [...negators, ...affixed];
      return {
        check: 'double-negative',
        reason: `two negations in one sentence (${terms.join(', ')}): respondents often misread double negatives`,
        terms,
      };
    }
  }
  return null;
}

function normalizeTerm(term: string): string[] {
  return splitWords(term);
}

function matchesTerm(words: readonly string[], at: number, term: readonly string[]): boolean {
  if (at + term.length > words.length) return false;
  for (let j = 0; j < term.length; j++) {
    const w = words[at + j];
    const t = term[j];
    const last = j === term.length - 1;
    if (w !== t && !(last && w === `${t}s`)) return false;
  }
  return true;
}

/**
 * Wording checks for one item: readability, then flags for length, double-barrelled wording, double
 * negatives, absolutes, jargon (DEFAULT_JARGON plus options.jargon; a term also matches its plural
 * in -s) and low reading ease. An empty text gets zero counts, null readability and no flags.
 * Example: "I always feel safe and relaxed in traffic" gets an absolute flag (always) and a
 * double-barrelled flag (safe and relaxed).
 *
 * Registry: wording.max-words, wording.min-reading-ease, wording.double-barrelled, wording.double-negative, wording.absolutes, wording.jargon.
 * Cost: O(L·J) for L words and J jargon terms. Throws EngineError when maxWords is not a positive
 * whole number or minReadingEase is not finite.
 */
export function checkItemWording(text: string, options: WordingOptions = {}): WordingReport {
  const maxWords = options.maxWords ?? MAX_ITEM_WORDS;
  const minEase = options.minReadingEase ?? MIN_READING_EASE;
  if (!Number.isInteger(maxWords) || maxWords < 1) {
    throw new EngineError(`the word limit must be a positive whole number (got ${maxWords})`, 'option');
  }
  if (!Number.isFinite(minEase)) {
    throw new EngineError(`the reading-ease threshold must be a finite number (got ${minEase})`, 'option');
  }
  const stats = readability(text);
  const words = splitWords(text);
  const flags: WordingFlag[] = [];
  if (words.length > maxWords) {
    flags.push({
      check: 'length',
      reason: `${words.length} words, above ${maxWords}: long items are harder to read and answer (common practice)`,
      terms: [],
    });
  }
  const barrel = doubleBarrelled(text, words);
  if (barrel) flags.push(barrel);
  const negative = doubleNegative(text);
  if (negative) flags.push(negative);
  const absolutes = [...new Set(words.filter((w) => ABSOLUTES.has(w)))];
  if (absolutes.length > 0) {
    flags.push({
      check: 'absolute',
      reason: `absolute wording (${absolutes.join(', ')}): few respondents can endorse an absolute, so answers pile up at one end`,
      terms: absolutes,
    });
  }
  const terms = [...DEFAULT_JARGON, ...(options.jargon ?? [])].map(normalizeTerm).filter((t) => t.length > 0);
  const jargon: string[] = [];
  for (const term of terms) {
    for (let i = 0; i < words.length; i++) {
      if (matchesTerm(words, i, term)) {
        const phrase = term.join(' ');
        if (!jargon.includes(phrase)) jargon.push(phrase);
        break;
      }
    }
  }
  if (jargon.length > 0) {
    flags.push({
      check: 'jargon',
      reason: `specialist wording (${jargon.join(', ')}): respondents may not know it; prefer an everyday word`,
      terms: jargon,
    });
  }
  if (stats.readingEase !== null && stats.readingEase < minEase) {
    flags.push({
      check: 'readability',
      reason: `Flesch Reading Ease ${stats.readingEase.toFixed(0)}, below ${minEase} (difficult on Flesch's scale; common practice)`,
      terms: [],
    });
  }
  return { ...stats, flags };
}

/** Character trigrams of a normalized text with their counts (see textSimilarity). */
function trigrams(text: string): Map<string, number> {
  const norm = ` ${splitWords(text.normalize('NFD').replace(/\p{M}/gu, '')).join(' ')} `;
  const grams = new Map<string, number>();
  for (let i = 0; i + 3 <= norm.length; i++) {
    const g = norm.slice(i, i + 3);
    grams.set(g, (grams.get(g) ?? 0) + 1);
  }
  return grams;
}

function cosine(a: Map<string, number>, b: Map<string, number>): number {
  let dot = 0;
  let na = 0;
  let nb = 0;
  for (const [g, c] of a) {
    na += c * c;
    const other = b.get(g);
    if (other !== undefined) dot += c * other;
  }
  for (const c of b.values()) nb += c * c;
  if (na === 0 || nb === 0) return 0;
  return dot / Math.sqrt(na * nb);
}

/**
 * Similarity of two item texts: the cosine between their character-trigram count vectors. Texts are
 * lower-cased, accents stripped, reduced to their words separated by single spaces and padded with
 * one space at each end, so "I ride" yields " i", "i r", " ri", "rid", "ide", "de ". 1 means the
 * same words in the same order; texts with no words have similarity 0.
 *
 * Cost: O(|a| + |b|). Throws nothing.
 */
export function textSimilarity(a: string, b: string): number {
  return cosine(trigrams(a), trigrams(b));
}

export interface NearDuplicate {
  a: string;
  b: string;
  similarity: number;
  reason: string;
}

/**
 * Pairs of items whose wording is nearly the same: textSimilarity at or above the threshold
 * (default NEAR_DUPLICATE_THRESHOLD = .80, chosen so that items differing in one or two words are
 * caught while items sharing only a stem such as "I feel confident" are not). Sorted by similarity,
 * highest first.
 *
 * Registry: wording.near-duplicate, wording.near-duplicate-threshold.
 * Cost: O(n²·L) for n items of about L characters. Throws EngineError when two items share a code or
 * the threshold is not in (0, 1].
 */
export function findNearDuplicates(
  items: readonly { code: string; text: string }[],
  threshold: number = NEAR_DUPLICATE_THRESHOLD,
): NearDuplicate[] {
  if (!(threshold > 0 && threshold <= 1)) {
    throw new EngineError(
      `the near-duplicate threshold must be above 0 and at most 1 (got ${threshold})`,
      'option',
    );
  }
  const codes = new Set<string>();
  for (const it of items) {
    if (codes.has(it.code))
      throw new EngineError(`item code ${it.code} appears twice in the pool`, 'duplicate');
    codes.add(it.code);
  }
  const vectors = items.map((it) => trigrams(it.text));
  const out: NearDuplicate[] = [];
  for (let i = 0; i < items.length; i++) {
    for (let j = i + 1; j < items.length; j++) {
      const similarity = cosine(vectors[i], vectors[j]);
      if (similarity >= threshold) {
        out.push({
          a: items[i].code,
          b: items[j].code,
          similarity,
          reason: `${items[i].code} and ${items[j].code} are worded almost alike (trigram similarity ${similarity.toFixed(2)}): keep one, or make each ask something distinct`,
        });
      }
    }
  }
  return out.sort((x, y) => y.similarity - x.similarity);
}
