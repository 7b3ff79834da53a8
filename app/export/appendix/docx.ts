import type { Paragraph, Table, TextRun } from 'docx';
import { type AppendixDocument, type Block, type Inline, NOTICE_LABEL, type Notice } from './model.ts';
import { figurePng } from './raster.ts';
import { figureSvg } from './svg.ts';

/**
 * The appendix as a Word document (OOXML): real headings, tables with rules above and below and a
 * repeated header row, figures embedded as SVG (with a plain PNG for word processors that cannot
 * show SVG), and page numbers in the footer.
 */

const FONT = 'Times New Roman';
const BODY = 22;
const SMALL = 18;

/** The docx module, imported when a document is written (so the command line starts without it). */
type Docx = typeof import('docx');

function runsOf(d: Docx, inlines: readonly Inline[], size = BODY): TextRun[] {
  return inlines
    .filter((i) => i.text !== '')
    .map(
      (i) =>
        new d.TextRun({
          text: i.text,
          italics: i.em,
          bold: i.strong,
          size,
          font: i.code ? 'Courier New' : FONT,
        }),
    );
}

function caption(d: Docx, label: string, text: string): Paragraph[] {
  return [
    new d.Paragraph({
      children: [new d.TextRun({ text: label, bold: true, font: FONT, size: BODY })],
      spacing: { before: 240 },
      keepNext: true,
    }),
    new d.Paragraph({
      children: [new d.TextRun({ text, italics: true, font: FONT, size: BODY })],
      spacing: { after: 80 },
      keepNext: true,
    }),
  ];
}

function note(d: Docx, inlines: readonly Inline[] | undefined): Paragraph[] {
  if (!inlines) return [];
  return [
    new d.Paragraph({
      children: runsOf(d, [{ text: 'Note. ', em: true }, ...inlines], SMALL),
      spacing: { before: 60, after: 200 },
    }),
  ];
}

const SHADE: Record<Notice['tone'], string> = {
  'not-yet': 'FBF6E9',
  empty: 'F4F4F4',
  caution: 'EEF3F8',
  verified: 'EDF5EE',
  break: 'FBEAEA',
};

function blockDocx(d: Docx, block: Block): (Paragraph | Table)[] {
  const RULE = { style: d.BorderStyle.SINGLE, size: 8, color: '000000' };
  const THIN = { style: d.BorderStyle.SINGLE, size: 4, color: '000000' };
  const NONE = { style: d.BorderStyle.NONE, size: 0, color: 'FFFFFF' };
  const ALIGN = { left: d.AlignmentType.LEFT, right: d.AlignmentType.RIGHT, center: d.AlignmentType.CENTER };
  switch (block.kind) {
    case 'heading':
      return [
        new d.Paragraph({
          text: block.text,
          heading: block.level === 2 ? d.HeadingLevel.HEADING_1 : d.HeadingLevel.HEADING_2,
        }),
      ];
    case 'paragraph':
      return [new d.Paragraph({ children: runsOf(d, block.inlines), spacing: { after: 120 } })];
    case 'list':
      return block.items.map(
        (item, i) =>
          new d.Paragraph({
            children: [
              new d.TextRun({ text: block.ordered ? `${i + 1}.\t` : '•\t', font: FONT, size: BODY }),
              ...runsOf(d, item),
            ],
            indent: { left: 360, hanging: 360 },
            spacing: { after: 60 },
          }),
      );
    case 'notice':
      return [
        new d.Paragraph({
          children: runsOf(
            d,
            [{ text: `${NOTICE_LABEL[block.tone]}. `, strong: true }, ...block.inlines],
            SMALL + 1,
          ),
          shading: { type: d.ShadingType.CLEAR, fill: SHADE[block.tone], color: 'auto' },
          border: { left: { style: d.BorderStyle.SINGLE, size: 18, color: '888888', space: 6 } },
          spacing: { before: 120, after: 120 },
        }),
      ];
    case 'table': {
      const cell = (text: string, j: number, header: boolean) =>
        new d.TableCell({
          children: [
            new d.Paragraph({
              children: [new d.TextRun({ text, font: FONT, size: SMALL })],
              alignment: ALIGN[block.columns[j]?.align ?? 'left'],
            }),
          ],
          borders: header
            ? { top: RULE, bottom: THIN, left: NONE, right: NONE }
            : { top: NONE, bottom: NONE, left: NONE, right: NONE },
          margins: { top: 30, bottom: 30, left: 60, right: 60 },
        });
      const last = block.rows.length - 1;
      const table = new d.Table({
        width: { size: 100, type: d.WidthType.PERCENTAGE },
        borders: {
          top: RULE,
          bottom: RULE,
          left: NONE,
          right: NONE,
          insideHorizontal: NONE,
          insideVertical: NONE,
        },
        rows: [
          new d.TableRow({
            tableHeader: true,
            children: block.columns.map((c, j) => cell(c.header, j, true)),
          }),
          ...block.rows.map(
            (r, i) =>
              new d.TableRow({
                cantSplit: true,
                children: r.map((text, j) => {
                  const c = cell(text, j, false);
                  return i === last
                    ? new d.TableCell({
                        children: [
                          new d.Paragraph({
                            children: [new d.TextRun({ text, font: FONT, size: SMALL })],
                            alignment: ALIGN[block.columns[j]?.align ?? 'left'],
                          }),
                        ],
                        borders: { top: NONE, bottom: RULE, left: NONE, right: NONE },
                        margins: { top: 30, bottom: 30, left: 60, right: 60 },
                      })
                    : c;
                }),
              }),
          ),
        ],
      });
      return [...caption(d, block.label, block.caption), table, ...note(d, block.note)];
    }
    case 'figure': {
      const px = (pt: number) => Math.round((pt * 96) / 72);
      const image = new d.ImageRun({
        type: 'svg',
        data: Buffer.from(figureSvg(block), 'utf8'),
        fallback: { type: 'png', data: figurePng(block) },
        transformation: { width: px(block.width), height: px(block.height) },
        altText: {
          name: block.label,
          title: `${block.label}. ${block.caption}`,
          description: `${block.description} (Where this picture shows without labels, the word processor cannot display SVG; the HTML and PDF appendix show the full figure.)`,
        },
      });
      return [
        ...caption(d, block.label, block.caption),
        new d.Paragraph({ children: [image], alignment: d.AlignmentType.CENTER }),
        ...note(d, block.note),
      ];
    }
    case 'references':
      return block.entries.map(
        (entry) =>
          new d.Paragraph({
            children: runsOf(d, entry, BODY - 1),
            indent: { left: 480, hanging: 480 },
            spacing: { after: 100 },
          }),
      );
  }
}

/** Renders the appendix as DOCX bytes. */
export async function renderDocx(appendix: AppendixDocument): Promise<Uint8Array> {
  const d = await import('docx');
  const doc = new d.Document({
    creator: 'Scalewright',
    title: appendix.title,
    description: 'Methods appendix rendered from a Scalewright study file',
    styles: {
      default: {
        document: { run: { font: FONT, size: BODY } },
        heading1: {
          run: { font: FONT, size: 28, bold: true, color: '000000' },
          paragraph: { spacing: { before: 360, after: 120 }, keepNext: true },
        },
        heading2: {
          run: { font: FONT, size: 23, bold: true, italics: true, color: '000000' },
          paragraph: { spacing: { before: 240, after: 80 }, keepNext: true },
        },
        title: { run: { font: FONT, size: 34, bold: true, color: '000000' } },
      },
    },
    sections: [
      {
        footers: {
          default: new d.Footer({
            children: [
              new d.Paragraph({
                alignment: d.AlignmentType.CENTER,
                children: [
                  new d.TextRun({
                    children: ['Page ', d.PageNumber.CURRENT, ' of ', d.PageNumber.TOTAL_PAGES],
                    size: 16,
                    font: FONT,
                  }),
                ],
              }),
            ],
          }),
        },
        children: [
          new d.Paragraph({ text: appendix.title, heading: d.HeadingLevel.TITLE }),
          ...appendix.subtitle.map(
            (line) =>
              new d.Paragraph({
                children: [new d.TextRun({ text: line, size: SMALL, color: '555555', font: FONT })],
              }),
          ),
          ...appendix.blocks.flatMap((b) => blockDocx(d, b)),
        ],
      },
    ],
  });
  return new Uint8Array(await d.Packer.toBuffer(doc));
}
