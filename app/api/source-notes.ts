import { formatReference, methodEntry } from '../engine/methods/index.ts';

/**
 * Rules of thumb shown to a user, worded from the methods registry, each with a numbered marker that
 * points to a footnote-style note giving its source; whether the details were recalled rather than
 * checked is said in the note, never in the sentence. The screens (renderer/shared/source-notes.tsx)
 * and the command line's tables render from this one function.
 */
export interface SourceNotes {
  /** Each rule's wording as the registry gives it, with its note's number. */
  rules: { id: string; wording: string; marker: number }[];
  /** The notes, in marker order: "[1] Surname, I. (1999). Title. …". */
  notes: string[];
}

/** The wording and numbered source notes of registry entries (ids repeated are noted once). */
export function sourceNotes(ids: readonly string[]): SourceNotes {
  const unique = [...new Set(ids)];
  const rules = unique.map((id, i) => {
    const entry = methodEntry(id);
    return { id, wording: entry.kind === 'rule' ? entry.wording : entry.name, marker: i + 1 };
  });
  const notes = unique.map((id, i) => {
    const entry = methodEntry(id);
    const sources = entry.commonPractice
      ? ['Common practice of the trade (no single published source).']
      : entry.references.map(formatReference);
    return `[${i + 1}] ${sources.join(' ')}`;
  });
  return { rules, notes };
}

/** Plain-text lines (indented, at most `width` columns): the rules with markers, then the notes. */
export function sourceNoteLines(ids: readonly string[], width = 100): string[] {
  const { rules, notes } = sourceNotes(ids);
  return [
    ...rules.flatMap((r) => wrapText(`${r.wording} [${r.marker}]`, width, '  ')),
    ...notes.flatMap((n) => wrapText(n, width, '  ', '      ')),
  ];
}

function wrapText(text: string, width: number, first: string, rest = first): string[] {
  const lines: string[] = [];
  let line = first;
  for (const word of text.split(' ')) {
    const lead = lines.length === 0 ? first : rest;
    if (line.length > lead.length && line.length + 1 + word.length > width) {
      lines.push(line);
      line = rest + word;
    } else {
      line = line.length > lead.length ? `${line} ${word}` : line + word;
    }
  }
  lines.push(line);
  return lines;
}
