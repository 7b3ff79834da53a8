import fs from 'node:fs';
import path from 'node:path';
import { fileURLToPath } from 'node:url';

/**
 * The one layer over pdfkit that every printed output of a study is drawn with (the methods
 * appendix, the questionnaire): an A4 document with DejaVu Serif embedded in its four styles (so α,
 * ω, λ, ≤ and − print on any machine, unlike PDF's standard fonts), headings (sections bookmarked),
 * paragraphs of styled runs, captioned tables that break across pages and repeat their header row,
 * and a footer on every page. Pure JavaScript: no browser or Electron needed. pdfkit is loaded when
 * a document is opened, so code that never writes a PDF never loads it.
 */

export type PdfKitDocument = PDFKit.PDFDocument;

/** The registered font names, by style. */
export const PDF_FONTS = {
  regular: 'Serif',
  bold: 'Serif-Bold',
  italic: 'Serif-Italic',
  boldItalic: 'Serif-BoldItalic',
} as const;

export type FontStyle = keyof typeof PDF_FONTS;

const FONT_FILES: Record<FontStyle, string> = {
  regular: 'DejaVuSerif.ttf',
  bold: 'DejaVuSerif-Bold.ttf',
  italic: 'DejaVuSerif-Italic.ttf',
  boldItalic: 'DejaVuSerif-BoldItalic.ttf',
};

/**
 * The folder holding the DejaVu Serif files: `SCALEWRIGHT_FONTS` when set; the packaged app's
 * resources (`fonts/` beside the app archive); else `assets/fonts/` found by walking up from this
 * module, which works from the sources, the command line's bundle (app/cli/dist/) and the shell's.
 * Throws an Error naming where it looked.
 */
export function fontDirectory(): string {
  const candidates: string[] = [];
  if (process.env.SCALEWRIGHT_FONTS) candidates.push(process.env.SCALEWRIGHT_FONTS);
  const resources = (process as { resourcesPath?: string }).resourcesPath;
  if (resources) candidates.push(path.join(resources, 'fonts'));
  let dir = path.dirname(fileURLToPath(import.meta.url));
  for (let up = 0; up < 6; up++) {
    candidates.push(path.join(dir, 'assets', 'fonts'));
    dir = path.dirname(dir);
  }
  const found = candidates.find((c) => fs.existsSync(path.join(c, FONT_FILES.regular)));
  if (!found) {
    throw new Error(
      `the PDF fonts (${FONT_FILES.regular}) were not found; looked in ${candidates.join(', ')}`,
    );
  }
  return found;
}

/** The four font files' bytes, by style; throws naming the file that cannot be read. */
function readFonts(folder: string): Record<FontStyle, Buffer> {
  const out = {} as Record<FontStyle, Buffer>;
  for (const [style, file] of Object.entries(FONT_FILES) as [FontStyle, string][]) {
    const full = path.join(folder, file);
    try {
      out[style] = fs.readFileSync(full);
    } catch (error) {
      throw new Error(`the PDF font ${full} cannot be read: ${(error as Error).message}`);
    }
  }
  return out;
}

/** Sizes in points (A4 is 595.28 × 841.89). */
export const BODY_SIZE = 10;
export const SMALL_SIZE = 8.5;
const TABLE_SIZE = 8.2;
const FOOTER_SIZE = 7.5;
/** Distance of the footer line from the bottom edge of the page. */
const FOOTER_FROM_BOTTOM = 42;
/** Extra space between the lines of a paragraph. */
const LINE_GAP = 1.5;
/** Space left and right of a table cell's text. */
const CELL_PAD = 4;
/** The colour of text and rules. */
export const INK = '#1a1a1a';

const HEADINGS: Record<1 | 2 | 3, { size: number; style: FontStyle; before: number }> = {
  1: { size: 17, style: 'bold', before: 0.8 },
  2: { size: 13, style: 'bold', before: 1.1 },
  3: { size: 11, style: 'boldItalic', before: 0.7 },
};
/** A heading keeps this much of what follows it on its page. */
const HEADING_KEEP = 120;

/** A run of text in one style; a paragraph is a list of them. */
export interface TextRun {
  text: string;
  style?: FontStyle;
}

export interface ParagraphOptions {
  size?: number;
  /** The style of a paragraph given as plain text. */
  style?: FontStyle;
  /** Lines of space after the paragraph. */
  gap?: number;
  /** Left edge and width; default the text block's. */
  x?: number;
  width?: number;
  /** Indent of the first line (negative for a hanging indent). */
  indent?: number;
  color?: string;
  /** Points that must still fit on this page, else the paragraph starts the next one. */
  keep?: number;
}

export interface TableColumn {
  header: string;
  /** Share of the text width (the shares are scaled to fill it); without widths the columns are fitted to their content. */
  width?: number;
  align?: 'left' | 'right' | 'center';
}

/** A cell drawn by the caller (a response box, a mark) in the box it is given. */
export interface DrawnCell {
  height: number;
  draw(doc: PdfKitDocument, box: { x: number; y: number; width: number; height: number }): void;
}

export type TableCell = string | DrawnCell;

export interface TableSpec {
  columns: TableColumn[];
  rows: TableCell[][];
  /** The table's label ("Table 3") and caption, written above it; the label is repeated, continued, on each further page. */
  label?: string;
  caption?: string;
  /** Written under the table in the small size. */
  note?: TextRun[];
  /** Font size of the body rows. */
  size?: number;
  /** Font size and style of the header row; default the body's size, regular. */
  headerSize?: number;
  headerStyle?: FontStyle;
  /** Space above and below each cell's text. */
  padding?: number;
  /** Light rules between body rows. */
  rowRules?: boolean;
}

export interface PdfWriter {
  doc: PdfKitDocument;
  /** Left edge and width of the text block. */
  readonly left: number;
  readonly width: number;
  /** Starts a new page unless `height` points still fit on this one. */
  ensureSpace(height: number): void;
  /** Level 1 is the document's title; level 2 headings are bookmarked. */
  heading(text: string, level?: 1 | 2 | 3): void;
  paragraph(content: string | readonly TextRun[], options?: ParagraphOptions): void;
  /** Height the content takes at `size` in `width` (slightly generous). */
  heightOf(content: string | readonly TextRun[], size: number, width?: number): number;
  /** A label in bold and a caption in italics, above a table or a figure. */
  caption(label: string, caption: string): void;
  table(spec: TableSpec): void;
  /** Ends the document: writes the footer on every page and returns the bytes. */
  finish(): Promise<Buffer>;
}

export interface PdfMargins {
  top: number;
  bottom: number;
  left: number;
  right: number;
}

/**
 * Opens a new A4 document with the fonts registered. `footer(page, pages)` gives each page's
 * footer line (page numbers are 1-based). Throws when the fonts cannot be found or read.
 */
export async function createPdf(options: {
  title: string;
  subject?: string;
  margins?: PdfMargins;
  footer?: (page: number, pages: number) => string;
}): Promise<PdfWriter> {
  const folder = fontDirectory();
  const fonts = readFonts(folder);
  const { default: PDFDocument } = await import('pdfkit');
  const margins = options.margins ?? { top: 56, bottom: 70, left: 56, right: 56 };
  const doc = new PDFDocument({
    size: 'A4',
    margins,
    bufferPages: true,
    font: path.join(folder, FONT_FILES.regular),
    info: {
      Title: options.title,
      ...(options.subject ? { Subject: options.subject } : {}),
      Creator: 'Scalewright',
      Producer: 'Scalewright',
    },
    pdfVersion: '1.7',
    lang: 'en',
    displayTitle: true,
  } as PDFKit.PDFDocumentOptions);
  for (const [style, name] of Object.entries(PDF_FONTS) as [FontStyle, string][]) {
    doc.registerFont(name, fonts[style]);
  }
  const chunks: Buffer[] = [];
  doc.on('data', (chunk: Buffer) => chunks.push(chunk));
  const left = margins.left;
  const width = doc.page.width - margins.left - margins.right;
  const bottom = () => doc.page.height - doc.page.margins.bottom;
  const body = () => doc.font(PDF_FONTS.regular).fontSize(BODY_SIZE).fillColor(INK);
  body();

  const ensureSpace = (height: number) => {
    if (doc.y + height > bottom()) doc.addPage();
  };

  const runsOf = (content: string | readonly TextRun[], style: FontStyle = 'regular'): readonly TextRun[] =>
    (typeof content === 'string' ? [{ text: content, style }] : content).filter((r) => r.text !== '');

  const heightOf: PdfWriter['heightOf'] = (content, size, w = width) => {
    doc.font(PDF_FONTS.regular).fontSize(size);
    const text = runsOf(content)
      .map((r) => r.text)
      .join('');
    return doc.heightOfString(text, { width: w, lineGap: LINE_GAP }) * 1.04;
  };

  const paragraph: PdfWriter['paragraph'] = (content, opts = {}) => {
    const runs = runsOf(content, opts.style);
    if (runs.length > 0) {
      ensureSpace(opts.keep ?? 30);
      doc.fillColor(opts.color ?? INK);
      runs.forEach((run, index) => {
        doc.font(PDF_FONTS[run.style ?? 'regular']).fontSize(opts.size ?? BODY_SIZE);
        const textOptions = {
          width: opts.width ?? width,
          lineGap: LINE_GAP,
          continued: index < runs.length - 1,
          indent: opts.indent ?? 0,
        };
        if (index === 0) doc.text(run.text, opts.x ?? left, doc.y, textOptions);
        else doc.text(run.text, textOptions);
      });
      doc.moveDown(opts.gap ?? 0.5);
    }
    doc.x = left;
    body();
  };

  const heading: PdfWriter['heading'] = (text, level = 1) => {
    const style = HEADINGS[level];
    ensureSpace(HEADING_KEEP);
    // The space above is counted in lines of body text, the same for every document.
    if (doc.y > doc.page.margins.top) doc.moveDown(style.before);
    doc.font(PDF_FONTS[style.style]).fontSize(style.size).fillColor(INK);
    if (level === 2) doc.outline.addItem(text);
    doc.text(text, left, doc.y, { width });
    doc.moveDown(0.35);
    body();
  };

  const caption: PdfWriter['caption'] = (label, text) => {
    doc.font(PDF_FONTS.bold).fontSize(BODY_SIZE).fillColor(INK).text(label, left, doc.y, { width });
    doc.font(PDF_FONTS.italic).text(text, { width });
    doc.moveDown(0.25);
    body();
  };

  const rule = (y: number, weight: number, length: number, color = INK) => {
    doc
      .moveTo(left, y)
      .lineTo(left + length, y)
      .lineWidth(weight)
      .strokeColor(color)
      .stroke();
  };

  /** Numbers keep their natural width, text columns share what is left. */
  const fittedWidths = (spec: TableSpec, size: number): number[] => {
    doc.font(PDF_FONTS.regular).fontSize(size);
    const natural = spec.columns.map((c, j) => {
      const cells = spec.rows.map((r) => (typeof r[j] === 'string' ? doc.widthOfString(r[j]) : 0));
      return Math.max(doc.widthOfString(c.header), ...cells) + 2 * CELL_PAD;
    });
    const isText = spec.columns.map((c) => (c.align ?? 'left') === 'left');
    const total = natural.reduce((a, b) => a + b, 0);
    if (total <= width) {
      const textCols = natural.map((w, j) => (isText[j] ? w : 0));
      const textTotal = textCols.reduce((a, b) => a + b, 0);
      const extra = width - total;
      return natural.map((w, j) =>
        textTotal > 0 ? w + (extra * textCols[j]) / textTotal : w + extra / natural.length,
      );
    }
    const fixed = natural.map((w, j) => (isText[j] ? 0 : Math.min(w, 70)));
    const fixedTotal = fixed.reduce((a, b) => a + b, 0);
    const flexible = natural.map((w, j) => (isText[j] ? Math.sqrt(w) : 0));
    const flexTotal = flexible.reduce((a, b) => a + b, 0);
    const rest = Math.max(width - fixedTotal, 40 * flexible.filter((f) => f > 0).length);
    return natural.map((_, j) => (isText[j] ? (rest * flexible[j]) / flexTotal : fixed[j]));
  };

  const table = (spec: TableSpec) => {
    const size = spec.size ?? TABLE_SIZE;
    const pad = spec.padding ?? 2.5;
    const headerSize = spec.headerSize ?? size;
    const headerFont = PDF_FONTS[spec.headerStyle ?? 'regular'];
    const total = spec.columns.reduce((s, c) => s + (c.width ?? 0), 0);
    const widths = spec.columns.every((c) => c.width !== undefined)
      ? spec.columns.map((c) => ((c.width ?? 0) / total) * width)
      : fittedWidths(spec, size);
    const span = widths.reduce((a, b) => a + b, 0);
    const xs = widths.map((_, i) => left + widths.slice(0, i).reduce((s, w) => s + w, 0));
    const cellHeight = (cell: TableCell, i: number, font: string, fontSize: number) => {
      if (typeof cell !== 'string') return cell.height;
      doc.font(font).fontSize(fontSize);
      return doc.heightOfString(cell || ' ', { width: widths[i] - 2 * CELL_PAD });
    };
    const rowHeight = (cells: TableCell[], font: string, fontSize: number) =>
      Math.max(...cells.map((c, i) => cellHeight(c, i, font, fontSize))) + 2 * pad;
    const drawRow = (cells: TableCell[], font: string, fontSize: number, height: number) => {
      const y = doc.y;
      cells.forEach((cell, i) => {
        if (typeof cell === 'string') {
          doc.font(font).fontSize(fontSize).fillColor(INK);
          doc.text(cell, xs[i] + CELL_PAD, y + pad, {
            width: widths[i] - 2 * CELL_PAD,
            align: spec.columns[i].align ?? 'left',
          });
        } else {
          cell.draw(doc, { x: xs[i], y, width: widths[i], height });
        }
      });
      doc.x = left;
      doc.y = y + height;
    };
    const headers = spec.columns.map((c) => c.header);
    const headerHeight = rowHeight(headers, headerFont, headerSize);
    const drawHeader = () => {
      rule(doc.y, 1, span);
      drawRow(headers, headerFont, headerSize, headerHeight);
      rule(doc.y, 0.5, span);
    };
    const first = spec.rows.length > 0 ? rowHeight(spec.rows[0], PDF_FONTS.regular, size) : 0;
    ensureSpace((spec.label || spec.caption ? 34 : 0) + headerHeight + first);
    if (spec.label || spec.caption) caption(spec.label ?? '', spec.caption ?? '');
    drawHeader();
    spec.rows.forEach((row, r) => {
      const height = rowHeight(row, PDF_FONTS.regular, size);
      if (doc.y + height > bottom()) {
        rule(doc.y, 0.5, span);
        doc.addPage();
        if (spec.label) {
          doc.font(PDF_FONTS.italic).fontSize(SMALL_SIZE).fillColor(INK);
          doc.text(`${spec.label} (continued)`, left, doc.y, { width });
          doc.moveDown(0.2);
        }
        drawHeader();
      }
      drawRow(row, PDF_FONTS.regular, size, height);
      if (spec.rowRules && r < spec.rows.length - 1) rule(doc.y, 0.3, span, '#999999');
    });
    rule(doc.y, 1, span);
    doc.lineWidth(1).strokeColor(INK);
    doc.y += 3;
    if (spec.note) paragraph(spec.note, { size: SMALL_SIZE, gap: 0, keep: 0 });
    doc.x = left;
    doc.moveDown(0.4);
    body();
  };

  const finish = () =>
    new Promise<Buffer>((resolve, reject) => {
      if (options.footer) {
        const range = doc.bufferedPageRange();
        for (let i = range.start; i < range.start + range.count; i++) {
          doc.switchToPage(i);
          const saved = doc.page.margins.bottom;
          doc.page.margins.bottom = 0;
          doc.font(PDF_FONTS.regular).fontSize(FOOTER_SIZE).fillColor('#666666');
          const line = options.footer(i - range.start + 1, range.count);
          doc.text(line, left, doc.page.height - FOOTER_FROM_BOTTOM, { width, align: 'center' });
          doc.page.margins.bottom = saved;
        }
      }
      doc.on('end', () => resolve(Buffer.concat(chunks)));
      doc.on('error', reject);
      doc.end();
    });

  return { doc, left, width, ensureSpace, heading, paragraph, heightOf, caption, table, finish };
}
