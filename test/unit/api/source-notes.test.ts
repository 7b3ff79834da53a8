import { createElement } from 'react';
import { renderToStaticMarkup } from 'react-dom/server';
import { describe, expect, it } from 'vitest';
import { sourceNoteLines, sourceNotes } from '../../../app/api/source-notes.ts';
import { RULES_OF_THUMB } from '../../../app/phases/purification/index.ts';
import { SourceNotes } from '../../../renderer/shared/source-notes.tsx';

// The sources quoted below are the registry's own entries (app/engine/methods/); the check is that
// the sentence carries a numbered marker only, and the note carries the source and its caveat.
describe('source notes', () => {
  it('words each rule from the registry and numbers one note per source', () => {
    const { rules, notes } = sourceNotes(['cfa.cutoffs', 'rmsea.bands', 'cfa.cutoffs', 'icc.mdc95']);
    expect(rules.map((r) => [r.id, r.marker])).toEqual([
      ['cfa.cutoffs', 1],
      ['rmsea.bands', 2],
      ['icc.mdc95', 3],
    ]);
    expect(rules[0].wording).toBe('Good fit: CFI and TLI at least .95, RMSEA at most .06, SRMR at most .08.');
    for (const r of rules) expect(r.wording).not.toMatch(/from memory|\(\d{4}\)|\d{4}\)/i);
    expect(notes[0]).toMatch(
      /^\[1\] Hu, L\., & Bentler, P\. M\. \(1999\)\. Cutoff criteria .*\[Details from memory\.\]$/,
    );
    expect(notes[1]).toMatch(/^\[2\] Browne, M\. W\., & Cudeck, R\. \(1993\)/);
    expect(notes[1]).not.toMatch(/from memory/);
    expect(notes[2]).toBe('[3] Common practice of the trade (no single published source).');
  });

  it('prints the same notes as plain lines of at most the given width', () => {
    const lines = sourceNoteLines(['cfa.cutoffs', 'htmt'], 60);
    for (const line of lines) expect(line.length).toBeLessThanOrEqual(60);
    expect(lines[0]).toBe('  Good fit: CFI and TLI at least .95, RMSEA at most .06,');
    expect(lines.join(' ')).toMatch(/\[1\] Hu, L\., & Bentler/);
    expect(lines.filter((l) => /^ {2}\[\d\]/.test(l)).length).toBe(2);
  });

  it('renders the rules with superscript markers and the notes as a numbered list', () => {
    const html = renderToStaticMarkup(
      createElement(SourceNotes, { ids: ['efa.kmo-labels', 'rule.efa-sample-size'] }),
    );
    const text = html.replace(/<[^>]+>/g, '|');
    expect(text).toContain('below .50 unacceptable.|1|');
    expect(text).toContain('1000 or more excellent.|2|');
    expect(text).toMatch(
      /\|Kaiser, H\. F\. \(1974\)\. An index of factorial simplicity\..*\[Details from memory\.\]\|/,
    );
    expect(html).toMatch(/<ol class="source-notes-list"><li>Kaiser/);
  });

  it('the purification legend states no source mid-sentence; the kurtosis rule points to its note', () => {
    for (const r of RULES_OF_THUMB) expect(r.statement, r.rule).not.toMatch(/from memory|\d{4}\)/i);
    const kurtosis = RULES_OF_THUMB.find((r) => r.rule === 'kurtosis');
    expect(kurtosis?.source).toBe('items.kurtosis');
    expect(sourceNotes(['items.kurtosis']).notes[0]).toMatch(
      /West, S\. G\., Finch, J\. F\., & Curran, P\. J\. \(1995\).*\[Details from memory\.\]$/,
    );
  });
});
