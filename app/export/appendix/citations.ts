import { citedAuthors, formatReference, methodEntry, type Reference } from '../../engine/methods/index.ts';
import type { Inline } from './model.ts';

/**
 * The appendix's citations, in the methods registry's one author–year style: each cite in the text
 * names registry ids, and the reference list holds every publication behind every id cited, once,
 * alphabetically. A common-practice entry without a publication is cited as "common practice".
 */
export class Citations {
  private readonly used = new Set<string>();

  /** "(Cronbach, 1951; Feldt, 1965)" for the given registry ids; throws for an unknown id. */
  cite(...ids: string[]): Inline {
    const parts: string[] = [];
    let practice = false;
    for (const id of ids) {
      const entry = methodEntry(id);
      this.used.add(id);
      if (entry.references.length === 0) practice = true;
      for (const ref of entry.references) {
        const short = shortCitation(ref);
        if (!parts.includes(short)) parts.push(short);
      }
    }
    if (practice) parts.push('common practice');
    return { text: `(${parts.join('; ')})` };
  }

  /** The registry ids cited so far. */
  ids(): string[] {
    return [...this.used].sort();
  }

  /**
   * Every reference behind the cited ids, once, sorted by first author and year. The same publication
   * under two entries counts once (the registry gives each publication one form wherever it is cited).
   */
  references(): Reference[] {
    const byWork = new Map<string, Reference>();
    for (const id of this.used) {
      for (const ref of methodEntry(id).references) {
        const key = `${ref.authors.join(';')}|${ref.year}|${ref.title.toLowerCase()}`;
        if (!byWork.has(key)) byWork.set(key, ref);
      }
    }
    return [...byWork.values()]
      .map((ref) => [formatReference(ref), ref] as const)
      .sort(([a], [b]) => a.localeCompare(b, 'en'))
      .map(([, ref]) => ref);
  }
}

/** "Cronbach, 1951", "Polit & Beck, 2006", "Polit et al., 2007"; an organization by its name. */
export function shortCitation(ref: Reference): string {
  return `${citedAuthors(ref)}, ${ref.year}`;
}

/**
 * One reference as inlines: the registry's formatted text, with the journal and volume in italics
 * for an article or chapter's book, and the title in italics for a book.
 */
export function referenceInlines(ref: Reference): Inline[] {
  const full = formatReference(ref);
  const target = ref.container ? (ref.volume ? `${ref.container}, ${ref.volume}` : ref.container) : ref.title;
  const at = full.indexOf(target);
  if (at < 0) return [{ text: full }];
  return [
    { text: full.slice(0, at) },
    { text: target, em: true },
    { text: full.slice(at + target.length) },
  ].filter((i) => i.text !== '');
}
