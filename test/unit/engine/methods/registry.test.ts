import fs from 'node:fs';
import path from 'node:path';
import { fileURLToPath } from 'node:url';
import { describe, expect, it } from 'vitest';
import {
  CVR_ALPHA,
  ICVI_BENCHMARK_LARGE_PANEL,
  kappaBand,
  LARGE_PANEL,
  MIN_PANEL_FOR_BENCHMARK,
  SCVI_AVE_BENCHMARK,
} from '../../../../app/engine/content.ts';
import {
  citation,
  formatReference,
  METHODS,
  methodsField,
  ruleThreshold,
} from '../../../../app/engine/methods/index.ts';
import { MAHALANOBIS_ALPHA } from '../../../../app/engine/screening.ts';

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
      if (!entry.commonPractice) expect(entry.references.length).toBeGreaterThan(0);
    }
  });

  it('cites each publication with the same details and the same from-memory mark wherever it is cited', () => {
    const byWork = new Map<string, Set<string>>();
    for (const entry of METHODS.values()) {
      for (const ref of entry.references) {
        const work = `${ref.authors.join('; ')} (${ref.year})`;
        byWork.set(work, (byWork.get(work) ?? new Set()).add(formatReference(ref)));
      }
    }
    // Works cited by several areas (written once, in references.ts).
    for (const work of [
      'Harman, H. H. (1976)',
      'McDonald, R. P. (1999)',
      'Lord, F. M.; Novick, M. R. (1968)',
    ])
      expect(byWork.get(work), work).toBeDefined();
    for (const [work, forms] of byWork) expect([...forms], work).toHaveLength(1);
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

describe('the registry and the engine agree', () => {
  const root = fileURLToPath(new URL('../../../../', import.meta.url));
  const sources = (dir: string): string[] =>
    fs.readdirSync(path.join(root, dir), { withFileTypes: true }).flatMap((entry) => {
      const rel = path.join(dir, entry.name);
      if (entry.isDirectory()) return entry.name === 'dist' ? [] : sources(rel);
      return /\.(ts|tsx|mjs|py)$/.test(entry.name) ? [rel] : [];
    });

  it('every registry id a doc comment cites exists', () => {
    const cited = new Set<string>();
    for (const file of sources('app')) {
      const text = fs.readFileSync(path.join(root, file), 'utf8').replace(/\n\s*\* /g, ' ');
      // "Registry: a.b, c.d." and "Source: a.b and c.d (the method registry)": ids always hold a dot.
      const id = String.raw`[a-z0-9-]+\.[a-z0-9.-]*[a-z0-9]`;
      const list = new RegExp(`(?:[Rr]egistry: |Source: )((?:${id})(?:(?:, | and )${id})*)`, 'g');
      for (const m of text.matchAll(list)) for (const one of m[1].split(/, | and /)) cited.add(one.trim());
    }
    expect(cited.size).toBeGreaterThan(30);
    for (const id of cited) expect(METHODS.has(id), `cited id "${id}"`).toBe(true);
  });

  it('no source or test cites a document outside the repository', () => {
    const notes = ['METHODS', 'CLI', 'ARCHITECTURE', 'STYLE'].map((name) => `${name}.md`);
    for (const file of [...sources('app'), ...sources('db'), ...sources('renderer'), ...sources('test')]) {
      const text = fs.readFileSync(path.join(root, file), 'utf8');
      for (const note of notes) expect(text.includes(note), `${file} mentions ${note}`).toBe(false);
    }
  });

  it('applies the published cut-offs', () => {
    // Lynn (1986) and Polit & Beck (2006): I-CVI .78 with six or more experts, 1.00 with three to five.
    expect(ICVI_BENCHMARK_LARGE_PANEL).toBe(0.78);
    expect(LARGE_PANEL).toBe(6);
    expect(MIN_PANEL_FOR_BENCHMARK).toBe(3);
    // Polit & Beck (2006): S-CVI/Ave of .90 or more.
    expect(SCVI_AVE_BENCHMARK).toBe(0.9);
    // Polit, Beck & Owen (2007): modified kappa > .74 excellent, .60–.74 good, .40–.59 fair.
    expect(kappaBand(0.75)).toBe('excellent');
    expect(kappaBand(0.74)).toBe('good');
    expect(kappaBand(0.6)).toBe('good');
    expect(kappaBand(0.59)).toBe('fair');
    expect(kappaBand(0.39)).toBe('poor');
    // Lawshe (1975): one-tailed .05.
    expect(CVR_ALPHA).toBe(0.05);
    // Tabachnick & Fidell (from memory): D² flagged at p < .001.
    expect(MAHALANOBIS_ALPHA).toBe(0.001);
  });

  it('states every rule threshold in its wording (common practice rules included)', () => {
    for (const entry of METHODS.values()) {
      if (entry.kind !== 'rule') continue;
      expect(entry.wording.length, entry.id).toBeGreaterThan(20);
      for (const [name, value] of Object.entries(entry.thresholds)) {
        const shown = [String(value), String(value).replace(/^0\./, '.'), `${Math.round(value * 100)}%`];
        if (name === 'scaleMax' || name === 'chance' || name === 'smallPanelMinimum') continue;
        expect(
          shown.some((s) => entry.wording.includes(s)),
          `${entry.id}: ${name} = ${value} is not in "${entry.wording}"`,
        ).toBe(true);
      }
    }
  });

  it('renders a common-practice entry as such', () => {
    expect(methodsField(['scoring.reverse-keying'])[0].reference).toMatch(/^Common practice/);
    expect(ruleThreshold('screening.speeder', 'fractionOfMedian')).toBe(0.5);
    expect(() => ruleThreshold('alpha.cronbach', 'x')).toThrow('is a method, not a rule');
  });
});
