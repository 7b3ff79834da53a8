import { Citations } from './citations.ts';
import {
  type Block,
  type Column,
  type Figure,
  type Inline,
  type Notice,
  notice,
  type Paragraph,
  paragraph,
  type Shape,
} from './model.ts';

/**
 * Collects the appendix's blocks in order, numbering tables and figures and recording every
 * registry id cited, so that the sections only say what to show.
 */
export class Writer {
  readonly blocks: Block[] = [];
  readonly cites = new Citations();
  private tables = 0;
  private figures = 0;
  private sections = 0;

  /** A numbered section heading ("3 Expert review"); level 2 and 3 headings are not numbered. */
  section(title: string): void {
    this.sections++;
    this.heading(2, `${this.sections}. ${title}`);
  }

  heading(level: 1 | 2 | 3, text: string): void {
    const id = text
      .toLowerCase()
      .replace(/[^a-z0-9]+/g, '-')
      .replace(/^-|-$/g, '');
    this.blocks.push({ kind: 'heading', level, text, id: id || `section-${this.blocks.length}` });
  }

  para(...inlines: (Inline | string)[]): Paragraph {
    const p = paragraph(...inlines);
    this.blocks.push(p);
    return p;
  }

  cite(...ids: string[]): Inline {
    return this.cites.cite(...ids);
  }

  list(items: (Inline | string)[][], ordered = false): void {
    if (items.length === 0) return;
    this.blocks.push({
      kind: 'list',
      ordered,
      items: items.map((parts) => parts.map((p) => (typeof p === 'string' ? { text: p } : p))),
    });
  }

  notice(tone: Notice['tone'], ...inlines: (Inline | string)[]): void {
    this.blocks.push(notice(tone, ...inlines));
  }

  /** A phase or analysis the study does not hold yet: said in words, never shown as an empty table. */
  notYet(what: string, how: string): void {
    this.notice('not-yet', `${what[0].toUpperCase()}${what.slice(1)}: ${how}`);
  }

  /**
   * A table; returns its label ("Table 4") for the text to refer to. A table without rows is not
   * drawn: `empty` says in a notice what is missing instead.
   */
  table(
    caption: string,
    columns: [string, Column['align']][],
    rows: string[][],
    options: { note?: (Inline | string)[]; empty: string },
  ): string | null {
    if (rows.length === 0) {
      this.notice('empty', options.empty);
      return null;
    }
    this.tables++;
    const label = `Table ${this.tables}`;
    this.blocks.push({
      kind: 'table',
      label,
      caption,
      columns: columns.map(([header, align]) => ({ header, align })),
      rows,
      note: options.note?.map((p) => (typeof p === 'string' ? { text: p } : p)),
    });
    return label;
  }

  figure(
    caption: string,
    drawing: { width: number; height: number; shapes: Shape[] },
    description: string,
    note?: (Inline | string)[],
  ): string {
    this.figures++;
    const label = `Figure ${this.figures}`;
    const figure: Figure = {
      kind: 'figure',
      label,
      caption,
      ...drawing,
      description,
      note: note?.map((p) => (typeof p === 'string' ? { text: p } : p)),
    };
    this.blocks.push(figure);
    return label;
  }

  /** The label the next table will get (to refer to it in the sentence before it). */
  nextTable(): string {
    return `Table ${this.tables + 1}`;
  }

  nextFigure(): string {
    return `Figure ${this.figures + 1}`;
  }
}
