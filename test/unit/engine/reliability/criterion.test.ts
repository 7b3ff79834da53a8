import { describe, expect, it } from 'vitest';
import { methodEntry } from '../../../../app/engine/methods/index.ts';
import { meetsCriterion, reliabilityCriterion } from '../../../../app/engine/reliability/criterion.ts';

// Nunnally, J. C., & Bernstein, I. H. (1994). Psychometric theory (3rd ed.), on how reliable a
// measure must be: about .70 in the early stages of research, .80 for basic research, and .90 at
// the least (.95 desirable) where important decisions about individuals rest on the scores.

describe('the reliability criterion follows the stated use of scores', () => {
  it.each([
    ['early-research', 0.7, null],
    ['basic-research', 0.8, null],
    ['individual-decisions', 0.9, 0.95],
  ] as const)('%s → %d', (use, minimum, desirable) => {
    const c = reliabilityCriterion(use);
    expect(c.minimum).toBe(minimum);
    expect(c.desirable).toBe(desirable);
    expect(c.stated).toBe(true);
    expect(c.ruleId).toBe(`reliability.criterion.${use}`);
    expect(c.citation).toBe('Nunnally & Bernstein (1994)');
    expect(c.reference).toBe(
      'Nunnally, J. C., & Bernstein, I. H. (1994). Psychometric theory. 3rd ed. McGraw-Hill.',
    );
    expect(c.reason).toMatch(/^Chosen from the use of scores stated in the construct phase/);
  });

  it('with no use stated, shows the early-stage criterion and says why', () => {
    const c = reliabilityCriterion(null);
    expect(c.use).toBe('early-research');
    expect(c.minimum).toBe(0.7);
    expect(c.stated).toBe(false);
    expect(c.reason).toMatch(/No use of scores is stated/);
  });

  it('reads a coefficient against the minimum, the edge included', () => {
    const basic = reliabilityCriterion('basic-research');
    expect(meetsCriterion(0.8, basic)).toBe(true);
    expect(meetsCriterion(0.7999, basic)).toBe(false);
    expect(() => meetsCriterion(Number.NaN, basic)).toThrow(/finite/);
  });

  it('keeps its rules in the methods registry with their wording', () => {
    const entry = methodEntry('reliability.criterion.individual-decisions');
    expect(entry.kind).toBe('rule');
    if (entry.kind === 'rule') expect(entry.thresholds).toEqual({ minimum: 0.9, desirable: 0.95 });
  });
});
