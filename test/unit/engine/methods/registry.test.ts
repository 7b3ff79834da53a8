import { describe, expect, it } from 'vitest';
import { citation, formatReference, METHODS, methodsField } from '../../../../app/engine/methods/index.ts';

describe('methods registry', () => {
  it('formats a journal article in the one reference style', () => {
    // Cronbach (1951), Psychometrika 16(3), 297–334: details as printed on the article.
    const ref = METHODS.get('alpha.cronbach');
    expect(ref).toBeDefined();
    expect(formatReference(ref?.references[0] as never)).toBe(
      'Cronbach, L. J. (1951). Coefficient alpha and the internal structure of tests. Psychometrika, 16(3), 297–334. https://doi.org/10.1007/BF02310555',
    );
  });

  it('cites one, two and three or more authors', () => {
    const base = { year: 2007, title: 't' };
    expect(citation({ ...base, authors: ['Polit, D. F.'] })).toBe('Polit (2007)');
    expect(citation({ ...base, authors: ['Polit, D. F.', 'Beck, C. T.'] })).toBe('Polit & Beck (2007)');
    expect(citation({ ...base, authors: ['Polit, D. F.', 'Beck, C. T.', 'Owen, S. V.'] })).toBe(
      'Polit et al. (2007)',
    );
    expect(
      formatReference({ ...base, authors: ['Polit, D. F.', 'Beck, C. T.', 'Owen, S. V.'], fromMemory: true }),
    ).toBe('Polit, D. F., Beck, C. T., & Owen, S. V. (2007). t. [Details from memory.]');
  });

  it('gives every entry an id, a name and a reference (or marks it common practice)', () => {
    for (const [id, entry] of METHODS) {
      expect(entry.id).toBe(id);
      expect(entry.name.length).toBeGreaterThan(0);
      if (!(entry.kind === 'rule' && entry.commonPractice))
        expect(entry.references.length).toBeGreaterThan(0);
    }
  });

  it('renders the methods field once per id and refuses an unknown id', () => {
    expect(methodsField(['alpha.cronbach', 'alpha.cronbach'])).toHaveLength(1);
    expect(() => methodsField(['no.such'])).toThrow(/no entry "no.such"/);
  });
});
