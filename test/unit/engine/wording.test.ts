import { describe, expect, it } from 'vitest';
import { EngineError } from '../../../app/engine/errors.ts';
import {
  checkItemWording,
  countSyllables,
  findNearDuplicates,
  fleschKincaidGrade,
  fleschReadingEase,
  NEAR_DUPLICATE_THRESHOLD,
  readability,
  splitSentences,
  splitWords,
  textSimilarity,
} from '../../../app/engine/wording.ts';

/** Hand arithmetic below is carried to four decimals. */
const HAND_TOL = 1e-4;

describe('countSyllables', () => {
  // Dictionary syllable counts, each chosen to exercise one part of the documented rule.
  const table: [string, number, string][] = [
    ['the', 1, 'one vowel group'],
    ['traffic', 2, 'two vowel groups'],
    ['cycling', 2, 'y inside a word is a vowel'],
    ['you', 1, 'y at the start is a consonant'],
    ['they', 1, 'ey is one group'],
    ['bike', 1, 'silent final e'],
    ['route', 1, 'silent final e after a vowel pair'],
    ['tyre', 1, 'silent final e after y'],
    ['agree', 2, 'final ee is not silent'],
    ['bicycle', 3, 'consonant + le keeps its syllable'],
    ['handle', 2, 'consonant + le keeps its syllable'],
    ['people', 2, 'consonant + le keeps its syllable'],
    ['whole', 1, 'vowel + le: the e is silent'],
    ['lanes', 1, 'silent -es'],
    ['routes', 1, 'silent -es'],
    ['buses', 2, '-es after s is sounded'],
    ['fixes', 2, '-es after x is sounded'],
    ['changes', 2, '-es after g is sounded'],
    ['bicycles', 3, 'consonant + les keeps its syllable'],
    ['planned', 1, 'silent -ed'],
    ['used', 1, 'silent -ed'],
    ['wanted', 2, '-ed after t is sounded'],
    ['needed', 2, '-ed after d is sounded'],
    ['cycled', 2, 'consonant + led keeps its syllable'],
    ['safely', 2, 'silent e before -ly'],
    ['statement', 2, 'silent e before -ment'],
    ['useful', 2, 'silent e before -ful'],
    ['confidence', 3, 'silent final e, three groups'],
    ['puncture', 2, 'silent final e'],
    ['comfortable', 4, 'consonant + le keeps its syllable'],
    ['intersection', 4, 'io is one group'],
    ['ago', 2, 'short words are not forced to one syllable'],
    ["don't", 1, 'apostrophes are dropped'],
    ['20', 1, 'a token without letters counts as one'],
  ];
  it.each(table)('%s has %i syllable(s): %s', (word, expected) => {
    expect(countSyllables(word)).toBe(expected);
  });

  it('misses the exceptions named in its documentation', () => {
    expect(countSyllables('recipe')).toBe(2);
    expect(countSyllables('create')).toBe(1);
  });
});

describe('words and sentences', () => {
  it('keeps apostrophes inside words and splits on hyphens', () => {
    expect(splitWords('I don’t ride on well-lit roads')).toEqual([
      'i',
      "don't",
      'ride',
      'on',
      'well',
      'lit',
      'roads',
    ]);
  });

  it('counts sentences by end marks, and a text without one as one sentence', () => {
    expect(splitSentences('I can fix a flat tyre. I ride to work every day.')).toHaveLength(2);
    expect(splitSentences('I can fix a flat tyre')).toHaveLength(1);
    expect(splitSentences('Really?! Yes.')).toHaveLength(2);
    expect(splitSentences('')).toHaveLength(0);
  });
});

describe('Flesch formulas on hand-counted sentences (Flesch 1948; Kincaid et al. 1975)', () => {
  it('"I can fix a flat tyre. I ride to work every day."', () => {
    // Hand count: 12 words, 2 sentences, 14 syllables (every = 3, all others 1).
    // Reading ease = 206.835 − 1.015·6 − 84.6·(14/12) = 102.0450
    // Grade = 0.39·6 + 11.8·(14/12) − 15.59 = 0.5167
    const r = readability('I can fix a flat tyre. I ride to work every day.');
    expect([r.words, r.sentences, r.syllables]).toEqual([12, 2, 14]);
    expect(Math.abs((r.readingEase as number) - 102.045)).toBeLessThan(HAND_TOL);
    expect(Math.abs((r.gradeLevel as number) - 0.5167)).toBeLessThan(HAND_TOL);
  });

  it('"Planning a safe route through unfamiliar neighbourhoods takes confidence."', () => {
    // Hand count: 9 words, 1 sentence, 17 syllables
    // (plan-ning 2, a 1, safe 1, route 1, through 1, un-fa-mil-iar 4, neigh-bour-hoods 3, takes 1, con-fi-dence 3).
    // Reading ease = 206.835 − 1.015·9 − 84.6·(17/9) = 37.9000
    // Grade = 0.39·9 + 11.8·(17/9) − 15.59 = 10.2089
    const r = readability('Planning a safe route through unfamiliar neighbourhoods takes confidence.');
    expect([r.words, r.sentences, r.syllables]).toEqual([9, 1, 17]);
    expect(Math.abs((r.readingEase as number) - 37.9)).toBeLessThan(HAND_TOL);
    expect(Math.abs((r.gradeLevel as number) - 10.2089)).toBeLessThan(HAND_TOL);
  });

  it('applies the formulas to given counts and refuses empty ones', () => {
    // 100 words, 5 sentences, 150 syllables: 206.835 − 20.3 − 126.9 = 59.635; 7.8 + 17.7 − 15.59 = 9.91.
    expect(fleschReadingEase({ words: 100, sentences: 5, syllables: 150 })).toBeCloseTo(59.635, 10);
    expect(fleschKincaidGrade({ words: 100, sentences: 5, syllables: 150 })).toBeCloseTo(9.91, 10);
    expect(() => fleschReadingEase({ words: 0, sentences: 1, syllables: 0 })).toThrow(
      'Flesch Reading Ease requires at least one word and one sentence',
    );
  });

  it('gives null readability, not NaN, for a text without words', () => {
    expect(readability('  ...  ')).toEqual({
      words: 0,
      sentences: 0,
      syllables: 0,
      readingEase: null,
      gradeLevel: null,
    });
    expect(checkItemWording('').flags).toEqual([]);
  });
});

function checks(text: string, options = {}): string[] {
  return checkItemWording(text, options).flags.map((f) => f.check);
}

describe('wording flags', () => {
  it('flags "and" joining two things, with the words around it', () => {
    const report = checkItemWording('I feel safe and relaxed when riding in traffic');
    const flag = report.flags.find((f) => f.check === 'double-barrelled');
    expect(flag?.terms).toEqual(['safe and relaxed']);
    expect(flag?.reason).toMatch(/one/);
    expect(checks('I can plan a route to work or to the shops')).toContain('double-barrelled');
    expect(checks('I can repair a chain/brake cable')).toContain('double-barrelled');
    expect(checks('I check my tyres as well as my brakes')).toContain('double-barrelled');
  });

  it('does not flag fixed phrases, numbers, or "between A and B"', () => {
    expect(checks('I ride more or less every week')).not.toContain('double-barrelled');
    expect(checks('I ride two or three times a week')).not.toContain('double-barrelled');
    expect(checks('I can choose between the main road and the side street')).not.toContain(
      'double-barrelled',
    );
    expect(checks('I feel confident in heavy traffic')).toEqual([]);
  });

  it('flags double negatives within a sentence', () => {
    expect(checks("I don't feel unsafe on a bike lane")).toContain('double-negative');
    expect(checks('I never ride without a helmet')).toContain('double-negative');
    expect(checks('I do not ride at night. I have no lights.')).not.toContain('double-negative');
  });

  it('flags absolutes and lists them once', () => {
    const report = checkItemWording('I always know the way and always arrive on time');
    const flag = report.flags.find((f) => f.check === 'absolute');
    expect(flag?.terms).toEqual(['always']);
    expect(checks('Every junction feels safe to me')).toContain('absolute');
  });

  it('flags jargon from the default list, its plurals, and researcher-added terms', () => {
    expect(checks('I can adjust a derailleur')).toContain('jargon');
    expect(checks('I understand the cycling infrastructures here')).toContain('jargon');
    expect(checks('I understand our modal split')).toContain('jargon');
    expect(checks('I can true a wheel')).not.toContain('jargon');
    const added = checkItemWording('I can true a wheel', { jargon: ['true a wheel'] });
    expect(added.flags.find((f) => f.check === 'jargon')?.terms).toEqual(['true a wheel']);
  });

  it('flags long items and low reading ease with their thresholds', () => {
    const long =
      'When I ride through the city centre during the evening rush hour I usually know which lane I should be in at each junction';
    const report = checkItemWording(long);
    expect(report.words).toBe(24);
    expect(report.flags.find((f) => f.check === 'length')?.reason).toMatch(/^24 words, above 20/);
    expect(checkItemWording(long, { maxWords: 30 }).flags.map((f) => f.check)).not.toContain('length');
    expect(checks('Planning a safe route through unfamiliar neighbourhoods takes confidence.')).toContain(
      'readability',
    );
    expect(() => checkItemWording('x', { maxWords: 0 })).toThrow(EngineError);
  });
});

describe('near-duplicate wording', () => {
  it('is 1 for the same words regardless of case and punctuation, 0 without words', () => {
    expect(textSimilarity('I ride in traffic.', 'i RIDE in traffic')).toBeCloseTo(1, 15);
    expect(textSimilarity('', 'I ride')).toBe(0);
  });

  it('computes the cosine of trigram counts', () => {
    // "ab" → " ab", "ab "; "abc" → " ab", "abc", "bc ": one shared trigram, cosine = 1 / √(2·3).
    expect(textSimilarity('ab', 'abc')).toBeCloseTo(1 / Math.sqrt(6), 15);
  });

  it('pairs items that differ by a word and leaves distinct items alone', () => {
    const pool = [
      { code: 'tc1', text: 'I feel confident riding in heavy traffic' },
      { code: 'tc2', text: 'I feel confident cycling in heavy traffic' },
      { code: 'rr1', text: 'I feel confident fixing a flat tyre' },
      { code: 'rp1', text: 'I can plan a route that avoids busy roads' },
      { code: 'rp2', text: 'I can find a route that avoids busy roads' },
    ];
    const pairs = findNearDuplicates(pool);
    expect(pairs.map((p) => `${p.a}-${p.b}`).sort()).toEqual(['rp1-rp2', 'tc1-tc2']);
    expect(pairs[0].similarity).toBeGreaterThanOrEqual(pairs[1].similarity);
    expect(pairs[0].reason).toMatch(/worded almost alike/);
    expect(findNearDuplicates(pool, 0.99)).toEqual([]);
    expect(NEAR_DUPLICATE_THRESHOLD).toBe(0.8);
  });

  it('refuses repeated codes and thresholds outside (0, 1]', () => {
    expect(() =>
      findNearDuplicates([
        { code: 'a', text: 'x' },
        { code: 'a', text: 'y' },
      ]),
    ).toThrow('item code a appears twice in the pool');
    expect(() => findNearDuplicates([], 0)).toThrow(/threshold/);
  });
});
