import { type AppendixDocument, type Block, type Inline, NOTICE_LABEL } from './model.ts';
import { escapeXml, figureSvg } from './svg.ts';

function inlineHtml(inlines: readonly Inline[]): string {
  return inlines
    .map((i) => {
      let t = escapeXml(i.text);
      if (i.code) t = `<code>${t}</code>`;
      if (i.em) t = `<em>${t}</em>`;
      if (i.strong) t = `<strong>${t}</strong>`;
      return t;
    })
    .join('');
}

const STYLE = `
body { font-family: 'DejaVu Serif', Georgia, 'Times New Roman', serif; font-size: 11pt; line-height: 1.5;
  color: #1a1a1a; max-width: 46em; margin: 2.5em auto; padding: 0 1.5em; }
h1 { font-size: 1.6em; line-height: 1.25; margin: 0 0 .3em; }
.subtitle { color: #555; font-size: .9em; margin: 0 0 2em; }
h2 { font-size: 1.25em; margin: 2em 0 .6em; border-bottom: 1px solid #ccc; padding-bottom: .2em; }
h3 { font-size: 1.05em; font-style: italic; margin: 1.5em 0 .5em; }
p { margin: .6em 0; text-align: left; }
code { font-family: 'DejaVu Sans Mono', Menlo, Consolas, monospace; font-size: .85em; overflow-wrap: anywhere; }
figure, .table { margin: 1.6em 0; }
.label { font-weight: bold; display: block; }
.caption { font-style: italic; display: block; margin-bottom: .4em; }
table { border-collapse: collapse; width: 100%; font-size: .86em; line-height: 1.35; }
thead th { border-top: 1.5px solid #000; border-bottom: 1px solid #000; font-weight: normal; padding: .35em .5em; vertical-align: bottom; }
tbody td { padding: .25em .5em; vertical-align: top; overflow-wrap: anywhere; }
tbody tr:last-child td { border-bottom: 1.5px solid #000; }
.r { text-align: right; font-variant-numeric: tabular-nums; white-space: nowrap; }
.l { text-align: left; } .c { text-align: center; }
.note { font-size: .86em; margin-top: .4em; }
figure svg { display: block; max-width: 100%; height: auto; }
aside { border-left: 4px solid #888; background: #f5f5f5; padding: .6em 1em; margin: 1em 0; }
aside.not-yet { border-color: #c08a00; background: #fbf6e9; }
aside.verified { border-color: #2e7d32; background: #edf5ee; }
aside.caution { border-color: #1f5f99; background: #eef3f8; }
aside.break { border-color: #b00020; background: #fbeaea; }
.references p { padding-left: 2em; text-indent: -2em; margin: .4em 0; }
@media print { body { margin: 0; max-width: none; } h2 { break-after: avoid; } figure, .table { break-inside: avoid; } }
`;

const ALIGN = { left: 'l', right: 'r', center: 'c' } as const;

function blockHtml(block: Block): string {
  switch (block.kind) {
    case 'heading':
      return `<h${block.level} id="${escapeXml(block.id)}">${escapeXml(block.text)}</h${block.level}>`;
    case 'paragraph':
      return `<p>${inlineHtml(block.inlines)}</p>`;
    case 'list': {
      const tag = block.ordered ? 'ol' : 'ul';
      return `<${tag}>${block.items.map((i) => `<li>${inlineHtml(i)}</li>`).join('')}</${tag}>`;
    }
    case 'notice':
      return `<aside class="${block.tone}"><strong>${NOTICE_LABEL[block.tone]}.</strong> ${inlineHtml(block.inlines)}</aside>`;
    case 'table': {
      const head = block.columns
        .map((c) => `<th class="${ALIGN[c.align]}" scope="col">${escapeXml(c.header)}</th>`)
        .join('');
      const rows = block.rows
        .map(
          (r) =>
            `<tr>${r.map((cell, j) => `<td class="${ALIGN[block.columns[j]?.align ?? 'left']}">${escapeXml(cell)}</td>`).join('')}</tr>`,
        )
        .join('\n');
      const note = block.note ? `<p class="note"><em>Note.</em> ${inlineHtml(block.note)}</p>` : '';
      return `<div class="table"><table><caption style="caption-side: top; text-align: left;"><span class="label">${escapeXml(block.label)}</span><span class="caption">${escapeXml(block.caption)}</span></caption><thead><tr>${head}</tr></thead><tbody>\n${rows}\n</tbody></table>${note}</div>`;
    }
    case 'figure': {
      const note = block.note ? `<p class="note"><em>Note.</em> ${inlineHtml(block.note)}</p>` : '';
      return `<figure><figcaption><span class="label">${escapeXml(block.label)}</span><span class="caption">${escapeXml(block.caption)}</span></figcaption>${figureSvg(block)}${note}</figure>`;
    }
    case 'references':
      return `<div class="references">${block.entries.map((e) => `<p>${inlineHtml(e)}</p>`).join('\n')}</div>`;
  }
}

/** The appendix as one self-contained HTML page (styles and figures inline, nothing loaded from elsewhere). */
export function renderHtml(doc: AppendixDocument): string {
  return [
    '<!DOCTYPE html>',
    '<html lang="en">',
    '<head>',
    '<meta charset="utf-8">',
    '<meta name="viewport" content="width=device-width, initial-scale=1">',
    `<title>${escapeXml(doc.title)}</title>`,
    `<style>${STYLE}</style>`,
    '</head>',
    '<body>',
    '<main>',
    `<h1>${escapeXml(doc.title)}</h1>`,
    `<p class="subtitle">${doc.subtitle.map(escapeXml).join('<br>')}</p>`,
    ...doc.blocks.map(blockHtml),
    '</main>',
    '</body>',
    '</html>',
    '',
  ].join('\n');
}
