import PDFDocument from 'pdfkit';
import { loadFonts } from './fonts.ts';
import {
  type AppendixDocument,
  type Block,
  type Figure,
  type Inline,
  NOTICE_LABEL,
  type Notice,
  type Table,
} from './model.ts';

/**
 * The appendix as PDF, drawn with pdfkit in plain JavaScript (no browser, no Electron): A4, the
 * DejaVu Serif fonts embedded, tables with rules above and below (header repeated on a new page),
 * figures as vector paths, bookmarks for the sections, and page numbers.
 */

const PAGE = { width: 595.28, height: 841.89 };
const MARGIN = { top: 68, bottom: 68, left: 66, right: 66 };
const WIDTH = PAGE.width - MARGIN.left - MARGIN.right;
const BODY = 10;
const SMALL = 8.5;
const TABLE = 8.2;
const INK = '#1a1a1a';

type Doc = PDFKit.PDFDocument;

const FONT = { regular: 'serif', bold: 'serif-bold', italic: 'serif-italic', boldItalic: 'serif-bolditalic' };

function fontOf(i: { em?: boolean; strong?: boolean; italic?: boolean; bold?: boolean }): string {
  const italic = i.em || i.italic;
  const bold = i.strong || i.bold;
  return bold && italic ? FONT.boldItalic : bold ? FONT.bold : italic ? FONT.italic : FONT.regular;
}

const BOTTOM = PAGE.height - MARGIN.bottom;

/** Starts a new page unless `needed` points still fit on this one. */
function ensure(doc: Doc, needed: number): void {
  if (doc.y + needed > BOTTOM) doc.addPage();
}

/** Height of inlines set at `size` in `width`, measured in the regular font (slightly generous). */
function measure(doc: Doc, inlines: readonly Inline[], size: number, width: number): number {
  doc.font(FONT.regular).fontSize(size);
  return doc.heightOfString(inlines.map((i) => i.text).join(''), { width, lineGap: 1.5 }) * 1.04;
}

/** Writes inlines as one paragraph, switching fonts run by run. */
function runs(
  doc: Doc,
  inlines: readonly Inline[],
  size: number,
  x: number,
  width: number,
  color = INK,
  indent = 0,
): void {
  const parts = inlines.filter((i) => i.text !== '');
  if (parts.length === 0) return;
  doc.fillColor(color);
  parts.forEach((part, index) => {
    doc.font(fontOf(part)).fontSize(size);
    const options = { width, lineGap: 1.5, continued: index < parts.length - 1, indent };
    if (index === 0) doc.text(part.text, x, doc.y, options);
    else doc.text(part.text, options);
  });
}

function heading(doc: Doc, level: number, text: string): void {
  const size = level === 2 ? 13 : 11;
  ensure(doc, 120);
  doc.moveDown(level === 2 ? 1.1 : 0.7);
  doc
    .font(level === 2 ? FONT.bold : FONT.boldItalic)
    .fontSize(size)
    .fillColor(INK);
  if (level === 2) doc.outline.addItem(text);
  doc.text(text, MARGIN.left, doc.y, { width: WIDTH });
  doc.moveDown(0.35);
}

const TONE_COLOR: Record<Notice['tone'], [string, string]> = {
  'not-yet': ['#c08a00', '#fbf6e9'],
  empty: ['#8a8a8a', '#f4f4f4'],
  caution: ['#1f5f99', '#eef3f8'],
  verified: ['#2e7d32', '#edf5ee'],
  break: ['#b00020', '#fbeaea'],
};

function noticeBlock(doc: Doc, block: Notice): void {
  const inlines: Inline[] = [{ text: `${NOTICE_LABEL[block.tone]}. `, strong: true }, ...block.inlines];
  const inner = WIDTH - 20;
  const height = measure(doc, inlines, SMALL + 0.5, inner) + 10;
  ensure(doc, height + 6);
  doc.moveDown(0.3);
  const top = doc.y;
  const [bar, fill] = TONE_COLOR[block.tone];
  doc.rect(MARGIN.left, top, WIDTH, height).fill(fill);
  doc.rect(MARGIN.left, top, 3, height).fill(bar);
  doc.y = top + 5;
  runs(doc, inlines, SMALL + 0.5, MARGIN.left + 12, inner);
  doc.y = top + height + 4;
  doc.x = MARGIN.left;
}

/** Column widths: numbers keep their natural width, text columns share what is left. */
function columnWidths(doc: Doc, table: Table): number[] {
  const pad = 8;
  const natural = table.columns.map((c, j) => {
    doc.font(FONT.regular).fontSize(TABLE);
    const cells = table.rows.map((r) => doc.widthOfString(r[j] ?? ''));
    return Math.max(doc.widthOfString(c.header), ...cells) + pad;
  });
  const total = natural.reduce((a, b) => a + b, 0);
  if (total <= WIDTH) {
    const textCols = table.columns.map((c, j) => (c.align === 'left' ? natural[j] : 0));
    const textTotal = textCols.reduce((a, b) => a + b, 0);
    const extra = WIDTH - total;
    return natural.map((w, j) =>
      textTotal > 0 ? w + (extra * textCols[j]) / textTotal : w + extra / natural.length,
    );
  }
  const fixed = table.columns.map((c, j) => (c.align === 'left' ? 0 : Math.min(natural[j], 70)));
  const fixedTotal = fixed.reduce((a, b) => a + b, 0);
  const flexible = table.columns.map((c, j) => (c.align === 'left' ? Math.sqrt(natural[j]) : 0));
  const flexTotal = flexible.reduce((a, b) => a + b, 0);
  const left = Math.max(WIDTH - fixedTotal, 40 * flexible.filter((f) => f > 0).length);
  return table.columns.map((c, j) => (c.align === 'left' ? (left * flexible[j]) / flexTotal : fixed[j]));
}

function rowHeight(doc: Doc, cells: string[], widths: number[], font: string): number {
  doc.font(font).fontSize(TABLE);
  return Math.max(...cells.map((cell, j) => doc.heightOfString(cell || ' ', { width: widths[j] - 8 }))) + 5;
}

function drawRow(doc: Doc, cells: string[], table: Table, widths: number[], font: string, top: number): void {
  let x = MARGIN.left;
  doc.font(font).fontSize(TABLE).fillColor(INK);
  cells.forEach((cell, j) => {
    const align = table.columns[j]?.align ?? 'left';
    doc.text(cell, x + 4, top + 2.5, { width: widths[j] - 8, align });
    x += widths[j];
  });
}

function rule(doc: Doc, y: number, width: number, length = WIDTH): void {
  doc
    .moveTo(MARGIN.left, y)
    .lineTo(MARGIN.left + length, y)
    .lineWidth(width)
    .strokeColor(INK)
    .stroke();
}

function tableBlock(doc: Doc, table: Table): void {
  const widths = columnWidths(doc, table);
  const span = widths.reduce((a, b) => a + b, 0);
  const headers = table.columns.map((c) => c.header);
  const headH = rowHeight(doc, headers, widths, FONT.regular);
  const firstH = table.rows.length > 0 ? rowHeight(doc, table.rows[0], widths, FONT.regular) : 0;
  doc.moveDown(0.6);
  ensure(doc, 34 + headH + firstH);
  doc.font(FONT.bold).fontSize(BODY).fillColor(INK).text(table.label, MARGIN.left, doc.y, { width: WIDTH });
  doc.font(FONT.italic).fontSize(BODY).text(table.caption, { width: WIDTH });
  doc.moveDown(0.25);
  const header = () => {
    const top = doc.y;
    rule(doc, top, 1, span);
    drawRow(doc, headers, table, widths, FONT.regular, top);
    rule(doc, top + headH, 0.5, span);
    doc.y = top + headH;
  };
  header();
  for (const row of table.rows) {
    const h = rowHeight(doc, row, widths, FONT.regular);
    if (doc.y + h > BOTTOM) {
      rule(doc, doc.y, 0.5, span);
      doc.addPage();
      doc
        .font(FONT.italic)
        .fontSize(SMALL)
        .fillColor(INK)
        .text(`${table.label} (continued)`, MARGIN.left, doc.y);
      doc.moveDown(0.2);
      header();
    }
    const top = doc.y;
    drawRow(doc, row, table, widths, FONT.regular, top);
    doc.y = top + h;
  }
  rule(doc, doc.y, 1, span);
  doc.y += 3;
  if (table.note) {
    runs(doc, [{ text: 'Note. ', em: true }, ...table.note], SMALL, MARGIN.left, WIDTH);
  }
  doc.x = MARGIN.left;
  doc.moveDown(0.4);
}

function figureBlock(doc: Doc, figure: Figure): void {
  const scale = Math.min(1, WIDTH / figure.width);
  const h = figure.height * scale;
  doc.moveDown(0.6);
  ensure(doc, h + 40);
  doc.font(FONT.bold).fontSize(BODY).fillColor(INK).text(figure.label, MARGIN.left, doc.y, { width: WIDTH });
  doc.font(FONT.italic).fontSize(BODY).text(figure.caption, { width: WIDTH });
  doc.moveDown(0.3);
  const x0 = MARGIN.left + (WIDTH - figure.width * scale) / 2;
  const y0 = doc.y;
  doc.save();
  doc.translate(x0, y0).scale(scale);
  for (const s of figure.shapes) {
    if (s.type === 'line' || s.type === 'polyline') {
      const points: [number, number][] =
        s.type === 'line'
          ? [
              [s.x1, s.y1],
              [s.x2, s.y2],
            ]
          : s.points;
      doc.moveTo(points[0][0], points[0][1]);
      for (const [x, y] of points.slice(1)) doc.lineTo(x, y);
      if (s.dash) doc.dash(s.dash, { space: s.dash });
      doc.lineWidth(s.width).strokeColor(s.stroke).stroke();
      doc.undash();
    } else if (s.type === 'rect') {
      if (s.fill) doc.rect(s.x, s.y, s.w, s.h).fill(s.fill);
      if (s.stroke)
        doc
          .rect(s.x, s.y, s.w, s.h)
          .lineWidth(s.width ?? 1)
          .strokeColor(s.stroke)
          .stroke();
    } else if (s.type === 'circle') {
      doc.circle(s.cx, s.cy, s.r).fill(s.fill);
    } else {
      doc
        .font(fontOf(s))
        .fontSize(s.size)
        .fillColor(s.fill ?? INK);
      const width = doc.widthOfString(s.text);
      const ascent = ((doc as unknown as { _font: { ascender: number } })._font.ascender / 1000) * s.size;
      const x = s.anchor === 'middle' ? s.x - width / 2 : s.anchor === 'end' ? s.x - width : s.x;
      doc.save();
      if (s.rotate) doc.rotate(s.rotate, { origin: [s.x, s.y] });
      doc.text(s.text, s.rotate ? s.x - width / 2 : x, s.y - ascent, { lineBreak: false });
      doc.restore();
    }
  }
  doc.restore();
  doc.x = MARGIN.left;
  doc.y = y0 + h + 4;
  if (figure.note) runs(doc, [{ text: 'Note. ', em: true }, ...figure.note], SMALL, MARGIN.left, WIDTH);
  doc.x = MARGIN.left;
  doc.moveDown(0.4);
}

function block(doc: Doc, b: Block): void {
  switch (b.kind) {
    case 'heading':
      heading(doc, b.level, b.text);
      return;
    case 'paragraph':
      ensure(doc, 30);
      runs(doc, b.inlines, BODY, MARGIN.left, WIDTH);
      doc.moveDown(0.5);
      return;
    case 'list':
      for (const [index, item] of b.items.entries()) {
        ensure(doc, 24);
        const top = doc.y;
        doc
          .font(FONT.regular)
          .fontSize(BODY)
          .fillColor(INK)
          .text(b.ordered ? `${index + 1}.` : '•', MARGIN.left + 4, top, { lineBreak: false });
        doc.y = top;
        runs(doc, item, BODY, MARGIN.left + 18, WIDTH - 18);
        doc.moveDown(0.25);
      }
      doc.x = MARGIN.left;
      doc.moveDown(0.3);
      return;
    case 'notice':
      noticeBlock(doc, b);
      return;
    case 'table':
      tableBlock(doc, b);
      return;
    case 'figure':
      figureBlock(doc, b);
      return;
    case 'references':
      for (const entry of b.entries) {
        ensure(doc, 30);
        runs(doc, entry, SMALL + 0.7, MARGIN.left + 18, WIDTH - 18, INK, -18);
        doc.moveDown(0.35);
      }
      doc.x = MARGIN.left;
  }
}

/** Renders the appendix as PDF bytes. */
export function renderPdf(appendix: AppendixDocument): Promise<Uint8Array> {
  const fonts = loadFonts();
  const doc = new PDFDocument({
    size: 'A4',
    margins: MARGIN,
    bufferPages: true,
    font: fonts.regular as unknown as string,
    info: { Title: appendix.title, Creator: 'Scalewright', Producer: 'Scalewright (pdfkit)' },
    pdfVersion: '1.7',
    lang: 'en',
    displayTitle: true,
  } as PDFKit.PDFDocumentOptions);
  doc.registerFont(FONT.regular, fonts.regular);
  doc.registerFont(FONT.bold, fonts.bold);
  doc.registerFont(FONT.italic, fonts.italic);
  doc.registerFont(FONT.boldItalic, fonts.boldItalic);
  const chunks: Buffer[] = [];
  const done = new Promise<Uint8Array>((resolve, reject) => {
    doc.on('data', (chunk: Buffer) => chunks.push(chunk));
    doc.on('end', () => resolve(new Uint8Array(Buffer.concat(chunks))));
    doc.on('error', reject);
  });
  doc
    .font(FONT.bold)
    .fontSize(17)
    .fillColor(INK)
    .text(appendix.title, MARGIN.left, MARGIN.top, { width: WIDTH });
  doc.moveDown(0.3);
  doc.font(FONT.regular).fontSize(SMALL).fillColor('#555555');
  for (const line of appendix.subtitle) doc.text(line, { width: WIDTH });
  doc.moveDown(0.8);
  for (const b of appendix.blocks) block(doc, b);
  const range = doc.bufferedPageRange();
  for (let i = range.start; i < range.start + range.count; i++) {
    doc.switchToPage(i);
    const keep = doc.page.margins.bottom;
    doc.page.margins.bottom = 0;
    doc
      .font(FONT.regular)
      .fontSize(7.5)
      .fillColor('#666666')
      .text(`${appendix.title} · page ${i + 1} of ${range.count}`, MARGIN.left, PAGE.height - 42, {
        width: WIDTH,
        align: 'center',
        lineBreak: false,
      });
    doc.page.margins.bottom = keep;
  }
  doc.end();
  return done;
}
