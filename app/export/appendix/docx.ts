import {
  AlignmentType,
  BorderStyle,
  Document,
  Footer,
  HeadingLevel,
  ImageRun,
  Packer,
  PageNumber,
  Paragraph,
  ShadingType,
  Table,
  TableCell,
  TableRow,
  TextRun,
  WidthType,
} from 'docx';
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
const RULE = { style: BorderStyle.SINGLE, size: 8, color: '000000' };
const THIN = { style: BorderStyle.SINGLE, size: 4, color: '000000' };
const NONE = { style: BorderStyle.NONE, size: 0, color: 'FFFFFF' };

function runsOf(inlines: readonly Inline[], size = BODY): TextRun[] {
  return inlines
    .filter((i) => i.text !== '')
    .map(
      (i) =>
        new TextRun({
          text: i.text,
          italics: i.em,
          bold: i.strong,
          size,
          font: i.code ? 'Courier New' : FONT,
        }),
    );
}

function caption(label: string, text: string): Paragraph[] {
  return [
    new Paragraph({
      children: [new TextRun({ text: label, bold: true, font: FONT, size: BODY })],
      spacing: { before: 240 },
      keepNext: true,
    }),
    new Paragraph({
      children: [new TextRun({ text, italics: true, font: FONT, size: BODY })],
      spacing: { after: 80 },
      keepNext: true,
    }),
  ];
}

function note(inlines: readonly Inline[] | undefined): Paragraph[] {
  if (!inlines) return [];
  return [
    new Paragraph({
      children: runsOf([{ text: 'Note. ', em: true }, ...inlines], SMALL),
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

const ALIGN = { left: AlignmentType.LEFT, right: AlignmentType.RIGHT, center: AlignmentType.CENTER } as const;

function blockDocx(block: Block): (Paragraph | Table)[] {
  switch (block.kind) {
    case 'heading':
      return [
        new Paragraph({
          text: block.text,
          heading: block.level === 2 ? HeadingLevel.HEADING_1 : HeadingLevel.HEADING_2,
        }),
      ];
    case 'paragraph':
      return [new Paragraph({ children: runsOf(block.inlines), spacing: { after: 120 } })];
    case 'list':
      return block.items.map(
        (item, i) =>
          new Paragraph({
            children: [
              new TextRun({ text: block.ordered ? `${i + 1}.\t` : '•\t', font: FONT, size: BODY }),
              ...runsOf(item),
            ],
            indent: { left: 360, hanging: 360 },
            spacing: { after: 60 },
          }),
      );
    case 'notice':
      return [
        new Paragraph({
          children: runsOf(
            [{ text: `${NOTICE_LABEL[block.tone]}. `, strong: true }, ...block.inlines],
            SMALL + 1,
          ),
          shading: { type: ShadingType.CLEAR, fill: SHADE[block.tone], color: 'auto' },
          border: { left: { style: BorderStyle.SINGLE, size: 18, color: '888888', space: 6 } },
          spacing: { before: 120, after: 120 },
        }),
      ];
    case 'table': {
      const cell = (text: string, j: number, header: boolean) =>
        new TableCell({
          children: [
            new Paragraph({
              children: [new TextRun({ text, font: FONT, size: SMALL })],
              alignment: ALIGN[block.columns[j]?.align ?? 'left'],
            }),
          ],
          borders: header
            ? { top: RULE, bottom: THIN, left: NONE, right: NONE }
            : { top: NONE, bottom: NONE, left: NONE, right: NONE },
          margins: { top: 30, bottom: 30, left: 60, right: 60 },
        });
      const last = block.rows.length - 1;
      const table = new Table({
        width: { size: 100, type: WidthType.PERCENTAGE },
        borders: {
          top: RULE,
          bottom: RULE,
          left: NONE,
          right: NONE,
          insideHorizontal: NONE,
          insideVertical: NONE,
        },
        rows: [
          new TableRow({ tableHeader: true, children: block.columns.map((c, j) => cell(c.header, j, true)) }),
          ...block.rows.map(
            (r, i) =>
              new TableRow({
                cantSplit: true,
                children: r.map((text, j) => {
                  const c = cell(text, j, false);
                  return i === last
                    ? new TableCell({
                        children: [
                          new Paragraph({
                            children: [new TextRun({ text, font: FONT, size: SMALL })],
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
      return [...caption(block.label, block.caption), table, ...note(block.note)];
    }
    case 'figure': {
      const px = (pt: number) => Math.round((pt * 96) / 72);
      const image = new ImageRun({
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
        ...caption(block.label, block.caption),
        new Paragraph({ children: [image], alignment: AlignmentType.CENTER }),
        ...note(block.note),
      ];
    }
    case 'references':
      return block.entries.map(
        (entry) =>
          new Paragraph({
            children: runsOf(entry, BODY - 1),
            indent: { left: 480, hanging: 480 },
            spacing: { after: 100 },
          }),
      );
  }
}

/** Renders the appendix as DOCX bytes. */
export async function renderDocx(appendix: AppendixDocument): Promise<Uint8Array> {
  const doc = new Document({
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
          default: new Footer({
            children: [
              new Paragraph({
                alignment: AlignmentType.CENTER,
                children: [
                  new TextRun({
                    children: ['Page ', PageNumber.CURRENT, ' of ', PageNumber.TOTAL_PAGES],
                    size: 16,
                    font: FONT,
                  }),
                ],
              }),
            ],
          }),
        },
        children: [
          new Paragraph({ text: appendix.title, heading: HeadingLevel.TITLE }),
          ...appendix.subtitle.map(
            (line) =>
              new Paragraph({
                children: [new TextRun({ text: line, size: SMALL, color: '555555', font: FONT })],
              }),
          ),
          ...appendix.blocks.flatMap(blockDocx),
        ],
      },
    ],
  });
  return new Uint8Array(await Packer.toBuffer(doc));
}
