/**
 * The one document model every appendix format renders from: Markdown, HTML, DOCX and PDF each walk
 * the same blocks, so they cannot disagree on a number, a caption or a reference. Text is plain
 * (never markup); emphasis is an inline flag; numbers arrive already formatted by `app/api/format.ts`.
 */

/** A run of text; `em` is italic (statistic symbols, book and journal titles), `strong` bold. */
export interface Inline {
  text: string;
  em?: boolean;
  strong?: boolean;
  /** Monospaced (hashes, commands). */
  code?: boolean;
}

export type Align = 'left' | 'right' | 'center';

export interface Column {
  header: string;
  align: Align;
}

export interface Heading {
  kind: 'heading';
  level: 1 | 2 | 3;
  text: string;
  /** Anchor for HTML and bookmarks. */
  id: string;
}

export interface Paragraph {
  kind: 'paragraph';
  inlines: Inline[];
}

export interface List {
  kind: 'list';
  ordered: boolean;
  items: Inline[][];
}

/** A notice set off from the text: a phase not yet done, a caution, a verification passed or broken. */
export interface Notice {
  kind: 'notice';
  tone: 'not-yet' | 'empty' | 'caution' | 'verified' | 'break';
  inlines: Inline[];
}

export interface Table {
  kind: 'table';
  /** "Table 3" */
  label: string;
  caption: string;
  columns: Column[];
  /** Never empty: a section without rows says so in a notice instead. */
  rows: string[][];
  note?: Inline[];
}

/** Vector primitives in points (1/72 inch), origin top left; every format draws these same shapes. */
export type Shape =
  | {
      type: 'line';
      x1: number;
      y1: number;
      x2: number;
      y2: number;
      stroke: string;
      width: number;
      dash?: number;
    }
  | { type: 'polyline'; points: [number, number][]; stroke: string; width: number; dash?: number }
  | {
      type: 'rect';
      x: number;
      y: number;
      w: number;
      h: number;
      fill?: string;
      stroke?: string;
      width?: number;
    }
  | { type: 'circle'; cx: number; cy: number; r: number; fill: string; stroke?: string }
  | {
      type: 'text';
      x: number;
      y: number;
      text: string;
      size: number;
      anchor: 'start' | 'middle' | 'end';
      italic?: boolean;
      bold?: boolean;
      fill?: string;
      /** Degrees, clockwise on the page about (x, y), as in SVG (−90 for a vertical axis title). */
      rotate?: number;
    };

export interface Figure {
  kind: 'figure';
  /** "Figure 2" */
  label: string;
  caption: string;
  width: number;
  height: number;
  shapes: Shape[];
  /** Words that say what the figure shows, for readers who cannot see it. */
  description: string;
  note?: Inline[];
}

/** The reference list; each entry is one reference in the registry's one style. */
export interface References {
  kind: 'references';
  entries: Inline[][];
}

export type Block = Heading | Paragraph | List | Notice | Table | Figure | References;

export interface AppendixDocument {
  title: string;
  /** Lines under the title: the study file, when it was exported, the log head. */
  subtitle: string[];
  blocks: Block[];
}

export function text(value: string): Inline {
  return { text: value };
}

export function em(value: string): Inline {
  return { text: value, em: true };
}

export function code(value: string): Inline {
  return { text: value, code: true };
}

export function paragraph(...inlines: (Inline | string)[]): Paragraph {
  return { kind: 'paragraph', inlines: inlines.map((i) => (typeof i === 'string' ? text(i) : i)) };
}

export function notice(tone: Notice['tone'], ...inlines: (Inline | string)[]): Notice {
  return { kind: 'notice', tone, inlines: inlines.map((i) => (typeof i === 'string' ? text(i) : i)) };
}

/** Plain text of inlines (for alt text, Markdown tables, checks). */
export function plain(inlines: readonly Inline[]): string {
  return inlines.map((i) => i.text).join('');
}

/** The word each notice opens with, in every format. */
export const NOTICE_LABEL: Record<Notice['tone'], string> = {
  'not-yet': 'Not yet done',
  empty: 'Note',
  caution: 'Caution',
  verified: 'Verified',
  break: 'Integrity break',
};
