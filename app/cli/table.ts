/** Widest line any command prints in its readable (non-JSON) output. */
export const LINE_WIDTH = 100;

const ELLIPSIS = '…';
/** A column that wraps is never made narrower than this (or its header). */
const MIN_WRAPPED_WIDTH = 8;

/** Cuts `text` to `width` characters, ending in an ellipsis when something was cut. */
export function cut(text: string, width: number): string {
  return text.length <= width ? text : `${text.slice(0, Math.max(0, width - 1))}${ELLIPSIS}`;
}

/**
 * Breaks `text` into lines of at most `width` characters at spaces; a word longer than a line is
 * cut with an ellipsis. Line breaks already in the text are kept; text that fits is left as it is.
 */
export function wrap(text: string, width: number): string[] {
  if (text.length <= width && !text.includes('\n')) return [text];
  const lines: string[] = [];
  for (const paragraph of text.split('\n')) {
    let line = '';
    for (const word of paragraph.split(/ +/)) {
      const piece = cut(word, width);
      if (line === '') line = piece;
      else if (line.length + 1 + piece.length <= width) line += ` ${piece}`;
      else {
        lines.push(line);
        line = piece;
      }
    }
    lines.push(line);
  }
  return lines;
}

/** Wraps `text` to the line width, every line after the first indented by `indent` spaces. */
export function wrapIndented(text: string, indent: number, first = 0, width = LINE_WIDTH): string {
  const [head, ...rest] = wrap(text, width - Math.max(indent, first));
  return [' '.repeat(first) + head, ...rest.map((l) => ' '.repeat(indent) + l)].join('\n');
}

/**
 * Column widths that fit `width`: when the natural widths are too wide, the left-aligned (text)
 * columns are narrowed, widest first, down to a common cap; numbers (right-aligned) keep theirs.
 */
function fitWidths(natural: number[], header: string[], wrappable: boolean[], width: number): number[] {
  const gaps = 2 * (natural.length - 1);
  const total = (ws: number[]) => ws.reduce((a, b) => a + b, 0) + gaps;
  if (total(natural) <= width) return natural;
  const floor = (i: number) => Math.max(MIN_WRAPPED_WIDTH, header[i].length);
  const capped = (cap: number) =>
    natural.map((w, i) => (wrappable[i] ? Math.min(w, Math.max(cap, floor(i))) : w));
  let cap = Math.max(...natural);
  while (cap > 0 && total(capped(cap)) > width) cap--;
  return capped(cap);
}

/**
 * Aligns rows under a header for the readable (non-JSON) output of every command, within
 * `width` columns: text columns that would make it wider wrap at spaces, and a word longer than
 * its column is cut with an ellipsis.
 */
export function formatTable(
  header: string[],
  rows: string[][],
  align: ('left' | 'right')[] = [],
  width = LINE_WIDTH,
): string {
  const natural = header.map((h, i) => Math.max(h.length, ...rows.map((r) => (r[i] ?? '').length)));
  const widths = fitWidths(
    natural,
    header,
    header.map((_, i) => align[i] !== 'right'),
    width,
  );
  const pad = (cell: string, i: number) =>
    align[i] === 'right' ? cell.padStart(widths[i]) : cell.padEnd(widths[i]);
  const row = (cells: string[]) => {
    const wrapped = header.map((_, i) => wrap(cells[i] ?? '', widths[i]));
    const height = Math.max(...wrapped.map((w) => w.length));
    return Array.from({ length: height }, (_, line) =>
      wrapped
        .map((w, i) => pad(w[line] ?? '', i))
        .join('  ')
        .trimEnd(),
    ).join('\n');
  };
  return [row(header), widths.map((w) => '─'.repeat(w)).join('  '), ...rows.map(row)].join('\n');
}
