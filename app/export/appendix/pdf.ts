import {
  BODY_SIZE,
  createPdf,
  type FontStyle,
  INK,
  PDF_FONTS,
  type PdfWriter,
  SMALL_SIZE,
  type TextRun,
} from '../pdf.ts';
import {
  type AppendixDocument,
  type Block,
  type Figure,
  type Inline,
  NOTICE_LABEL,
  type Notice,
} from './model.ts';

/**
 * The appendix as PDF, drawn with the study's one PDF layer (`../pdf.ts`) in plain JavaScript (no
 * browser, no Electron): A4, the DejaVu Serif fonts embedded, tables with rules above and below
 * (header repeated on a new page), figures as vector paths, bookmarks for the sections, and page
 * numbers. Only the appendix's own blocks are drawn here.
 */

const MARGINS = { top: 68, bottom: 68, left: 66, right: 66 };

function styleOf(i: { em?: boolean; strong?: boolean; italic?: boolean; bold?: boolean }): FontStyle {
  const italic = i.em || i.italic;
  const bold = i.strong || i.bold;
  return bold && italic ? 'boldItalic' : bold ? 'bold' : italic ? 'italic' : 'regular';
}

function runsOf(inlines: readonly Inline[]): TextRun[] {
  return inlines.map((i) => ({ text: i.text, style: styleOf(i) }));
}

/** "Note. " in italics, then the note. */
function noteRuns(note: readonly Inline[]): TextRun[] {
  return [{ text: 'Note. ', style: 'italic' }, ...runsOf(note)];
}

const TONE_COLOR: Record<Notice['tone'], [string, string]> = {
  'not-yet': ['#c08a00', '#fbf6e9'],
  empty: ['#8a8a8a', '#f4f4f4'],
  caution: ['#1f5f99', '#eef3f8'],
  verified: ['#2e7d32', '#edf5ee'],
  break: ['#b00020', '#fbeaea'],
};

function noticeBlock(pdf: PdfWriter, block: Notice): void {
  const { doc, left, width } = pdf;
  const runs: TextRun[] = [
    { text: `${NOTICE_LABEL[block.tone]}. `, style: 'bold' },
    ...runsOf(block.inlines),
  ];
  const inner = width - 20;
  const height = pdf.heightOf(runs, SMALL_SIZE + 0.5, inner) + 10;
  pdf.ensureSpace(height + 6);
  doc.moveDown(0.3);
  const top = doc.y;
  const [bar, fill] = TONE_COLOR[block.tone];
  doc.rect(left, top, width, height).fill(fill);
  doc.rect(left, top, 3, height).fill(bar);
  doc.y = top + 5;
  pdf.paragraph(runs, { size: SMALL_SIZE + 0.5, x: left + 12, width: inner, gap: 0, keep: 0 });
  doc.y = top + height + 4;
}

function figureBlock(pdf: PdfWriter, figure: Figure): void {
  const { doc, left, width } = pdf;
  const scale = Math.min(1, width / figure.width);
  const h = figure.height * scale;
  doc.moveDown(0.6);
  pdf.ensureSpace(h + 40);
  pdf.caption(figure.label, figure.caption);
  const x0 = left + (width - figure.width * scale) / 2;
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
        .font(PDF_FONTS[styleOf(s)])
        .fontSize(s.size)
        .fillColor(s.fill ?? INK);
      const textWidth = doc.widthOfString(s.text);
      const ascent = ((doc as unknown as { _font: { ascender: number } })._font.ascender / 1000) * s.size;
      const x = s.anchor === 'middle' ? s.x - textWidth / 2 : s.anchor === 'end' ? s.x - textWidth : s.x;
      doc.save();
      if (s.rotate) doc.rotate(s.rotate, { origin: [s.x, s.y] });
      doc.text(s.text, s.rotate ? s.x - textWidth / 2 : x, s.y - ascent, { lineBreak: false });
      doc.restore();
    }
  }
  doc.restore();
  doc.x = left;
  doc.y = y0 + h + 4;
  if (figure.note) pdf.paragraph(noteRuns(figure.note), { size: SMALL_SIZE, gap: 0, keep: 0 });
  doc.moveDown(0.4);
}

function block(pdf: PdfWriter, b: Block): void {
  const { doc, left, width } = pdf;
  switch (b.kind) {
    case 'heading':
      pdf.heading(b.text, b.level);
      return;
    case 'paragraph':
      pdf.paragraph(runsOf(b.inlines));
      return;
    case 'list':
      for (const [index, item] of b.items.entries()) {
        pdf.ensureSpace(24);
        const top = doc.y;
        doc
          .font(PDF_FONTS.regular)
          .fontSize(BODY_SIZE)
          .fillColor(INK)
          .text(b.ordered ? `${index + 1}.` : '•', left + 4, top, { lineBreak: false });
        doc.y = top;
        pdf.paragraph(runsOf(item), { x: left + 18, width: width - 18, gap: 0.25, keep: 0 });
      }
      doc.moveDown(0.3);
      return;
    case 'notice':
      noticeBlock(pdf, b);
      return;
    case 'table':
      doc.moveDown(0.6);
      pdf.table({
        label: b.label,
        caption: b.caption,
        columns: b.columns,
        rows: b.rows,
        note: b.note && noteRuns(b.note),
      });
      return;
    case 'figure':
      figureBlock(pdf, b);
      return;
    case 'references':
      for (const entry of b.entries) {
        pdf.paragraph(runsOf(entry), {
          size: SMALL_SIZE + 0.7,
          x: left + 18,
          width: width - 18,
          indent: -18,
          gap: 0.35,
        });
      }
  }
}

/** Renders the appendix as PDF bytes. */
export async function renderPdf(appendix: AppendixDocument): Promise<Uint8Array> {
  const pdf = await createPdf({
    title: appendix.title,
    margins: MARGINS,
    footer: (page, pages) => `${appendix.title} · page ${page} of ${pages}`,
  });
  pdf.heading(appendix.title, 1);
  appendix.subtitle.forEach((line, i) => {
    const gap = i === appendix.subtitle.length - 1 ? 0.8 : 0;
    pdf.paragraph(line, { size: SMALL_SIZE, color: '#555555', gap, keep: 0 });
  });
  for (const b of appendix.blocks) block(pdf, b);
  return pdf.finish();
}
