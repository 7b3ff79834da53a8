import fs from 'node:fs';
import path from 'node:path';
import { fileURLToPath } from 'node:url';
import PDFDocument from 'pdfkit';

/**
 * A small layer over pdfkit for the study's printed outputs: an A4 document with DejaVu Serif
 * embedded in its four styles (so α, ω, λ, ≤ and − print on any machine, unlike PDF's standard
 * fonts), headings, wrapped paragraphs, tables that break across pages and repeat their header row,
 * and a footer on every page. Pure JavaScript: no browser or Electron needed.
 */

export type PdfKitDocument = InstanceType<typeof PDFDocument>;

/** The registered font names. */
export const PDF_FONTS = {
  regular: 'Serif',
  bold: 'Serif-Bold',
  italic: 'Serif-Italic',
  boldItalic: 'Serif-BoldItalic',
} as const;

const FONT_FILES: Record<keyof typeof PDF_FONTS, string> = {
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

/** Points: A4 is 595.28 × 841.89. */
const MARGIN = 56;
const FOOTER_SIZE = 7.5;
export const BODY_SIZE = 10;

export interface TableColumn {
  header: string;
  /** Share of the text width (the shares are scaled to fill it). */
  width: number;
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
  /** Font size of the body rows. */
  size?: number;
  /** Font size of the header row; default a point below the body. */
  headerSize?: number;
  /** Light rules between body rows. */
  rowRules?: boolean;
  /** Space above and below each cell's text. */
  padding?: number;
}

export interface PdfWriter {
  doc: PdfKitDocument;
  /** Width available for text between the margins. */
  readonly width: number;
  heading(text: string, level?: 1 | 2 | 3): void;
  paragraph(text: string, options?: { size?: number; style?: keyof typeof PDF_FONTS; gap?: number }): void;
  table(spec: TableSpec): void;
  /** Starts a new page unless `height` points still fit on this one. */
  ensureSpace(height: number): void;
  /** Ends the document: writes the footer on every page and returns the bytes. */
  finish(): Promise<Buffer>;
}

/**
 * A new A4 document with the fonts registered. `footer(page, pages)` gives each page's footer line
 * (page numbers are 1-based).
 */
export function createPdf(options: {
  title: string;
  subject?: string;
  footer?: (page: number, pages: number) => string;
}): PdfWriter {
  const fonts = fontDirectory();
  const doc = new PDFDocument({
    size: 'A4',
    margins: { top: MARGIN, bottom: MARGIN + 14, left: MARGIN, right: MARGIN },
    bufferPages: true,
    font: path.join(fonts, FONT_FILES.regular),
    info: {
      Title: options.title,
      Subject: options.subject ?? '',
      Creator: 'Scalewright',
      Producer: 'Scalewright',
    },
  });
  for (const [style, name] of Object.entries(PDF_FONTS)) {
    doc.registerFont(name, path.join(fonts, FONT_FILES[style as keyof typeof PDF_FONTS]));
  }
  doc.font(PDF_FONTS.regular).fontSize(BODY_SIZE);
  const chunks: Buffer[] = [];
  doc.on('data', (chunk: Buffer) => chunks.push(chunk));
  const left = doc.page.margins.left;
  const width = doc.page.width - doc.page.margins.left - doc.page.margins.right;
  const bottom = () => doc.page.height - doc.page.margins.bottom;

  const ensureSpace = (height: number) => {
    if (doc.y + height > bottom()) doc.addPage();
  };

  const heading = (text: string, level: 1 | 2 | 3 = 1) => {
    const size = level === 1 ? 16 : level === 2 ? 12.5 : 11;
    doc.font(PDF_FONTS.bold).fontSize(size);
    ensureSpace(doc.heightOfString(text, { width }) + 3 * BODY_SIZE);
    if (doc.y > doc.page.margins.top) doc.moveDown(level === 1 ? 0.8 : 0.6);
    doc.text(text, left, doc.y, { width });
    doc.moveDown(0.35);
    doc.font(PDF_FONTS.regular).fontSize(BODY_SIZE);
  };

  const paragraph: PdfWriter['paragraph'] = (text, opts = {}) => {
    doc.font(PDF_FONTS[opts.style ?? 'regular']).fontSize(opts.size ?? BODY_SIZE);
    doc.text(text, left, doc.y, { width, align: 'left' });
    doc.moveDown(opts.gap ?? 0.5);
    doc.font(PDF_FONTS.regular).fontSize(BODY_SIZE);
  };

  const table = (spec: TableSpec) => {
    const size = spec.size ?? BODY_SIZE - 1;
    const pad = spec.padding ?? 3;
    const total = spec.columns.reduce((s, c) => s + c.width, 0);
    const widths = spec.columns.map((c) => (c.width / total) * width);
    const xs = widths.map((_, i) => left + widths.slice(0, i).reduce((s, w) => s + w, 0));
    const textHeight = (cell: TableCell, i: number, font: string, fontSize: number) => {
      if (typeof cell !== 'string') return cell.height;
      doc.font(font).fontSize(fontSize);
      return doc.heightOfString(cell, { width: widths[i] - 2 * pad });
    };
    const rowHeight = (cells: TableCell[], font: string, fontSize: number) =>
      Math.max(...cells.map((c, i) => textHeight(c, i, font, fontSize))) + 2 * pad;
    const drawRow = (cells: TableCell[], font: string, fontSize: number, height: number) => {
      const y = doc.y;
      cells.forEach((cell, i) => {
        if (typeof cell === 'string') {
          doc.font(font).fontSize(fontSize);
          doc.text(cell, xs[i] + pad, y + pad, {
            width: widths[i] - 2 * pad,
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
    const headerSize = spec.headerSize ?? size - 1;
    const headerHeight = rowHeight(headers, PDF_FONTS.bold, headerSize);
    const drawHeader = () => {
      drawRow(headers, PDF_FONTS.bold, headerSize, headerHeight);
      doc
        .moveTo(left, doc.y)
        .lineTo(left + width, doc.y)
        .lineWidth(0.8)
        .strokeColor('#333333')
        .stroke();
    };
    drawHeader();
    for (const row of spec.rows) {
      const height = rowHeight(row, PDF_FONTS.regular, size);
      if (doc.y + height > bottom()) {
        doc.addPage();
        drawHeader();
      }
      drawRow(row, PDF_FONTS.regular, size, height);
      if (spec.rowRules) {
        doc
          .moveTo(left, doc.y)
          .lineTo(left + width, doc.y)
          .lineWidth(0.3)
          .strokeColor('#999999')
          .stroke();
      }
    }
    doc.strokeColor('#000000').lineWidth(1);
    doc.font(PDF_FONTS.regular).fontSize(BODY_SIZE);
    doc.moveDown(0.6);
  };

  const finish = () =>
    new Promise<Buffer>((resolve, reject) => {
      if (options.footer) {
        const range = doc.bufferedPageRange();
        for (let i = range.start; i < range.start + range.count; i++) {
          doc.switchToPage(i);
          const saved = doc.page.margins.bottom;
          doc.page.margins.bottom = 0;
          doc.font(PDF_FONTS.regular).fontSize(FOOTER_SIZE).fillColor('#444444');
          doc.text(options.footer(i - range.start + 1, range.count), left, doc.page.height - MARGIN + 4, {
            width,
            align: 'center',
            lineBreak: true,
          });
          doc.fillColor('#000000');
          doc.page.margins.bottom = saved;
        }
      }
      doc.on('end', () => resolve(Buffer.concat(chunks)));
      doc.on('error', reject);
      doc.end();
    });

  return { doc, width, heading, paragraph, table, ensureSpace, finish };
}
