import { type AppendixDocument, type Block, type Inline, NOTICE_LABEL } from './model.ts';
import { figureSvg } from './svg.ts';

function escapeMd(value: string): string {
  return value.replace(/([\\`*_[\]<>|#])/g, '\\$1');
}

function inlineMd(inlines: readonly Inline[]): string {
  return inlines
    .map((i) => {
      if (i.text === '') return '';
      if (i.code) return `\`${i.text.replace(/`/g, "'")}\``;
      let t = escapeMd(i.text);
      const lead = t.match(/^\s*/)?.[0] ?? '';
      const trail = t.match(/\s*$/)?.[0] ?? '';
      const core = t.trim();
      if (core === '') return t;
      if (i.strong) t = `${lead}**${core}**${trail}`;
      else if (i.em) t = `${lead}*${core}*${trail}`;
      return t;
    })
    .join('');
}

function blockMd(block: Block): string {
  switch (block.kind) {
    case 'heading':
      return `${'#'.repeat(block.level)} ${escapeMd(block.text)}`;
    case 'paragraph':
      return inlineMd(block.inlines);
    case 'list':
      return block.items
        .map((item, i) => `${block.ordered ? `${i + 1}.` : '-'} ${inlineMd(item)}`)
        .join('\n');
    case 'notice':
      return `> **${NOTICE_LABEL[block.tone]}.** ${inlineMd(block.inlines)}`;
    case 'table': {
      const cell = (s: string) => escapeMd(s).replace(/\n/g, ' ');
      const head = `| ${block.columns.map((c) => cell(c.header)).join(' | ')} |`;
      const rule = `| ${block.columns.map((c) => (c.align === 'right' ? '---:' : c.align === 'center' ? ':---:' : '---')).join(' | ')} |`;
      const rows = block.rows.map((r) => `| ${r.map(cell).join(' | ')} |`);
      const note = block.note ? `\n\n*Note.* ${inlineMd(block.note)}` : '';
      return `**${block.label}**  \n*${escapeMd(block.caption)}*\n\n${[head, rule, ...rows].join('\n')}${note}`;
    }
    case 'figure': {
      const data = Buffer.from(figureSvg(block), 'utf8').toString('base64');
      const note = block.note ? `\n\n*Note.* ${inlineMd(block.note)}` : '';
      return `**${block.label}**  \n*${escapeMd(block.caption)}*\n\n![${escapeMd(block.description)}](data:image/svg+xml;base64,${data})${note}`;
    }
    case 'references':
      return block.entries.map((e) => inlineMd(e)).join('\n\n');
  }
}

/** The appendix as Markdown (CommonMark with pipe tables; figures as embedded SVG images). */
export function renderMarkdown(doc: AppendixDocument): string {
  const parts = [
    `# ${escapeMd(doc.title)}`,
    doc.subtitle.map(escapeMd).join('  \n'),
    ...doc.blocks.map(blockMd),
  ];
  return `${parts.join('\n\n')}\n`;
}
