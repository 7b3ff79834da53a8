import { type InstrumentModel, provenance } from './model.ts';

/**
 * The printable questionnaire as one self-contained HTML file (no scripts, no outside resources):
 * heading, instructions, and a table of the items in the chosen order with one answer circle per
 * response point under its anchor. Facets and keys stay off the respondent's page; the researcher's
 * notes (log head, how to check it, cautions) follow on a page of their own when printed.
 */

function escapeHtml(text: string): string {
  return text
    .replace(/&/g, '&amp;')
    .replace(/</g, '&lt;')
    .replace(/>/g, '&gt;')
    .replace(/"/g, '&quot;')
    .replace(/'/g, '&#39;');
}

const STYLE = `
body { font-family: "DejaVu Serif", Georgia, serif; color: #111; max-width: 52rem; margin: 2rem auto; padding: 0 1rem; line-height: 1.4; }
h1 { font-size: 1.5rem; margin-bottom: 0.5rem; }
.instructions { margin: 0 0 1.25rem; }
table.items { border-collapse: collapse; width: 100%; }
table.items th, table.items td { border-bottom: 1px solid #bbb; padding: 0.45rem 0.3rem; vertical-align: middle; }
table.items thead th { font-size: 0.78rem; font-weight: bold; text-align: center; vertical-align: bottom; }
table.items th.statement { text-align: left; }
table.items tbody th.statement { font-weight: normal; }
td.number { width: 2rem; text-align: right; color: #444; }
td.answer { text-align: center; width: 4.2rem; }
td.answer span { display: inline-block; width: 0.95rem; height: 0.95rem; border: 1.5px solid #333; border-radius: 50%; }
td.answer small { display: block; font-size: 0.7rem; color: #555; }
section.researcher { margin-top: 2.5rem; border-top: 2px solid #333; padding-top: 0.75rem; font-size: 0.85rem; }
section.researcher .failed { color: #a00; font-weight: bold; }
code { font-size: 0.85em; word-break: break-all; }
@media print { body { margin: 0; max-width: none; } thead { display: table-header-group; } tr { break-inside: avoid; } section.researcher { break-before: page; } }
`;

export function questionnaireHtml(m: InstrumentModel): string {
  const header = m.anchors
    .map((a) => `<th scope="col">${a.label === '' ? String(a.value) : escapeHtml(a.label)}</th>`)
    .join('');
  const rows = m.items
    .map(
      (it) =>
        `<tr><td class="number">${it.position}</td><th scope="row" class="statement">${escapeHtml(it.text)}</th>${m.anchors
          .map(
            (a) =>
              `<td class="answer"><span role="img" aria-label="${escapeHtml(a.label || String(a.value))}"></span><small>${a.value}</small></td>`,
          )
          .join('')}</tr>`,
    )
    .join('\n');
  const { study, head, verification } = provenance(m);
  return `<!DOCTYPE html>
<html lang="en">
<head>
<meta charset="utf-8">
<meta name="viewport" content="width=device-width, initial-scale=1">
<meta name="generator" content="Scalewright">
<title>${escapeHtml(m.title)}</title>
<style>${STYLE}</style>
</head>
<body>
<main>
<h1>${escapeHtml(m.title)}</h1>
<p class="instructions">${escapeHtml(m.instructions)}</p>
<table class="items">
<thead><tr><th scope="col" class="number">No.</th><th scope="col" class="statement">Statement</th>${header}</tr></thead>
<tbody>
${rows}
</tbody>
</table>
</main>
<section class="researcher" aria-label="For the researcher">
<h2>For the researcher (not part of the questionnaire)</h2>
<p>${escapeHtml(study)}</p>
<p>${escapeHtml(head)}. Check it later with: <code>${escapeHtml(m.verifyCommand)}</code></p>
<p${m.verification.intact ? '' : ' class="failed"'}>${escapeHtml(verification)}</p>
<p>${m.items.length} items; score with the scoring key exported beside this file (scoring-key.csv or scoring-key.json).</p>
<h3>Cautions</h3>
<ul>
${m.cautions.map((c) => `<li>${escapeHtml(c)}</li>`).join('\n')}
</ul>
</section>
</body>
</html>
`;
}
