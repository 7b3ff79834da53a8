import type { Figure, Shape } from './model.ts';

/** Escapes text for XML content and attribute values. */
export function escapeXml(value: string): string {
  return value
    .replace(/&/g, '&amp;')
    .replace(/</g, '&lt;')
    .replace(/>/g, '&gt;')
    .replace(/"/g, '&quot;')
    .replace(/'/g, '&apos;');
}

const n = (x: number) => String(Math.round(x * 100) / 100);

function shapeSvg(s: Shape): string {
  switch (s.type) {
    case 'line':
      return `<line x1="${n(s.x1)}" y1="${n(s.y1)}" x2="${n(s.x2)}" y2="${n(s.y2)}" stroke="${s.stroke}" stroke-width="${n(s.width)}"${s.dash ? ` stroke-dasharray="${s.dash} ${s.dash}"` : ''}/>`;
    case 'polyline':
      return `<polyline points="${s.points.map(([x, y]) => `${n(x)},${n(y)}`).join(' ')}" fill="none" stroke="${s.stroke}" stroke-width="${n(s.width)}"${s.dash ? ` stroke-dasharray="${s.dash} ${s.dash}"` : ''}/>`;
    case 'rect':
      return `<rect x="${n(s.x)}" y="${n(s.y)}" width="${n(s.w)}" height="${n(s.h)}" fill="${s.fill ?? 'none'}"${s.stroke ? ` stroke="${s.stroke}" stroke-width="${n(s.width ?? 1)}"` : ''}/>`;
    case 'circle':
      return `<circle cx="${n(s.cx)}" cy="${n(s.cy)}" r="${n(s.r)}" fill="${s.fill}"${s.stroke ? ` stroke="${s.stroke}"` : ''}/>`;
    case 'text': {
      const rotate = s.rotate ? ` transform="rotate(${s.rotate} ${n(s.x)} ${n(s.y)})"` : '';
      const style = `${s.italic ? ' font-style="italic"' : ''}${s.bold ? ' font-weight="bold"' : ''}`;
      return `<text x="${n(s.x)}" y="${n(s.y)}" font-size="${n(s.size)}" text-anchor="${s.anchor}" fill="${s.fill ?? '#000'}"${style}${rotate}>${escapeXml(s.text)}</text>`;
    }
  }
}

/** A figure as a standalone SVG document (sizes in points), with its title and description for screen readers. */
export function figureSvg(figure: Figure): string {
  return [
    `<svg xmlns="http://www.w3.org/2000/svg" width="${n(figure.width)}pt" height="${n(figure.height)}pt" viewBox="0 0 ${n(figure.width)} ${n(figure.height)}" role="img" font-family="'DejaVu Serif', Georgia, 'Times New Roman', serif">`,
    `<title>${escapeXml(`${figure.label}. ${figure.caption}`)}</title>`,
    `<desc>${escapeXml(figure.description)}</desc>`,
    ...figure.shapes.map(shapeSvg),
    '</svg>',
  ].join('');
}
