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

describe('registry ids cited by the validity engine', () => {
  it('every id named after "Registry:" in a doc comment of cfa/, validity/ and icc.ts is in the registry', async () => {
    const { readdirSync, readFileSync } = await import('node:fs');
    const root = new URL('../../../../app/engine/', import.meta.url);
    const files = [
      ...readdirSync(new URL('cfa/', root)).map((f) => new URL(`cfa/${f}`, root)),
      ...readdirSync(new URL('validity/', root)).map((f) => new URL(`validity/${f}`, root)),
      new URL('icc.ts', root),
    ];
    const cited = new Set<string>();
    for (const f of files) {
      const source = readFileSync(f, 'utf8');
      for (const block of source.matchAll(/Registry:([^.]*(?:\.[a-z][^.]*)*)\./g)) {
        for (const id of block[1].matchAll(/`([^`]+)`/g)) cited.add(id[1]);
      }
    }
    expect(cited.size).toBeGreaterThan(20);
    for (const id of cited) expect(METHODS.has(id), id).toBe(true);
    expect(methodsField(['validity.standards'])[0].reference).toMatch(
      /^American Educational Research Association, American Psychological Association, & National Council on Measurement in Education \(2014\)\. Standards for educational and psychological testing\./,
    );
  });
});
