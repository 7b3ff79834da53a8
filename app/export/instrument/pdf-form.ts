import { createPdf, type DrawnCell, PDF_FONTS, type TableCell } from '../pdf.ts';
import { type InstrumentModel, provenance } from './model.ts';

/** Radius of an answer circle, in points. */
const CIRCLE = 5;

/** One answer circle with the point's value under it. */
function answerCell(value: number): DrawnCell {
  return {
    height: 2 * CIRCLE + 12,
    draw(doc, box) {
      const cx = box.x + box.width / 2;
      const cy = box.y + box.height / 2 - 4;
      doc.lineWidth(0.9).strokeColor('#222222').circle(cx, cy, CIRCLE).stroke();
      doc.font(PDF_FONTS.regular).fontSize(6.5).fillColor('#555555');
      doc.text(String(value), box.x, cy + CIRCLE + 1.5, { width: box.width, align: 'center' });
      doc.fillColor('#000000');
    },
  };
}

/**
 * The printable questionnaire as PDF: heading, instructions, the items in the chosen order with
 * one answer circle per response point under its anchor (the header repeats on every page), then a
 * page for the researcher with the log head, the command that checks it, and the cautions.
 */
export async function questionnairePdf(m: InstrumentModel): Promise<Buffer> {
  const pdf = await createPdf({
    title: m.title,
    subject: `Questionnaire, ${m.items.length} items`,
    footer: (page, pages) => `${m.title} · page ${page} of ${pages}`,
  });
  pdf.heading(m.title, 1);
  pdf.paragraph(m.instructions, { gap: 0.8 });
  const numberWidth = 26;
  const answerWidth = Math.min(56, (pdf.width - numberWidth - 160) / m.anchors.length);
  pdf.table({
    columns: [
      { header: 'No.', width: numberWidth, align: 'right' },
      { header: 'Statement', width: pdf.width - numberWidth - answerWidth * m.anchors.length },
      ...m.anchors.map((a) => ({
        header: a.label === '' ? String(a.value) : a.label,
        width: answerWidth,
        align: 'center' as const,
      })),
    ],
    headerSize: 7,
    headerStyle: 'bold',
    rows: m.items.map((it): TableCell[] => [
      String(it.position),
      it.text,
      ...m.anchors.map((a) => answerCell(a.value)),
    ]),
    size: 10,
    rowRules: true,
    padding: 4,
  });
  pdf.doc.addPage();
  const p = provenance(m);
  pdf.heading('For the researcher (not part of the questionnaire)', 2);
  pdf.paragraph(p.study);
  pdf.paragraph(`${p.head}. Record it outside the study file; check it later with:`);
  pdf.paragraph(m.verifyCommand, { size: 8.5 });
  pdf.paragraph(p.verification, { style: m.verification.intact ? 'regular' : 'bold' });
  pdf.paragraph(
    `${m.items.length} items. Score them with the scoring key exported beside this file (scoring-key.csv or scoring-key.json); norms from the pilot sample are in norms.csv.`,
  );
  pdf.heading('Cautions', 3);
  for (const caution of m.cautions) pdf.paragraph(`• ${caution}`, { gap: 0.3 });
  return pdf.finish();
}
