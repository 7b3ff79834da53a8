import zlib from 'node:zlib';
import type { Figure } from './model.ts';

/**
 * A plain raster of a figure's lines, boxes and dots as PNG, the picture a word processor without
 * SVG support shows instead of the vector figure. Labels are left out (there is no font rasterizer
 * here); the DOCX says so in the figure's alternative text, and the HTML and PDF carry the full figure.
 */

const CRC_TABLE = Array.from({ length: 256 }, (_, n) => {
  let c = n;
  for (let k = 0; k < 8; k++) c = c & 1 ? 0xedb88320 ^ (c >>> 1) : c >>> 1;
  return c >>> 0;
});

function crc32(bytes: Uint8Array): number {
  let c = 0xffffffff;
  for (const b of bytes) c = CRC_TABLE[(c ^ b) & 0xff] ^ (c >>> 8);
  return (c ^ 0xffffffff) >>> 0;
}

function chunk(type: string, data: Uint8Array): Buffer {
  const head = Buffer.alloc(8);
  head.writeUInt32BE(data.length, 0);
  head.write(type, 4, 'ascii');
  const crc = Buffer.alloc(4);
  crc.writeUInt32BE(crc32(Buffer.concat([head.subarray(4), data])), 0);
  return Buffer.concat([head, data, crc]);
}

function rgb(hex: string): [number, number, number] {
  const h = hex.replace('#', '');
  return [0, 2, 4].map((i) => Number.parseInt(h.slice(i, i + 2), 16) || 0) as [number, number, number];
}

/** The figure as PNG bytes at `scale` pixels per point. */
export function figurePng(figure: Figure, scale = 2): Uint8Array {
  const w = Math.ceil(figure.width * scale);
  const h = Math.ceil(figure.height * scale);
  const px = new Uint8Array(w * h * 3).fill(255);
  const set = (x: number, y: number, c: [number, number, number]) => {
    const xi = Math.round(x);
    const yi = Math.round(y);
    if (xi < 0 || yi < 0 || xi >= w || yi >= h) return;
    px.set(c, (yi * w + xi) * 3);
  };
  const disc = (cx: number, cy: number, r: number, c: [number, number, number]) => {
    for (let y = Math.floor(cy - r); y <= Math.ceil(cy + r); y++)
      for (let x = Math.floor(cx - r); x <= Math.ceil(cx + r); x++)
        if ((x - cx) ** 2 + (y - cy) ** 2 <= r * r + 0.25) set(x, y, c);
  };
  const segment = (
    x1: number,
    y1: number,
    x2: number,
    y2: number,
    width: number,
    color: string,
    dash?: number,
  ) => {
    const c = rgb(color);
    const length = Math.hypot(x2 - x1, y2 - y1) * scale;
    const steps = Math.max(1, Math.ceil(length * 2));
    for (let i = 0; i <= steps; i++) {
      const t = i / steps;
      if (dash && Math.floor((t * length) / (dash * scale)) % 2 === 1) continue;
      disc((x1 + (x2 - x1) * t) * scale, (y1 + (y2 - y1) * t) * scale, Math.max(0.5, (width * scale) / 2), c);
    }
  };
  for (const s of figure.shapes) {
    if (s.type === 'rect') {
      if (s.fill && s.fill !== 'none') {
        const c = rgb(s.fill);
        for (let y = Math.round(s.y * scale); y < Math.round((s.y + s.h) * scale); y++)
          for (let x = Math.round(s.x * scale); x < Math.round((s.x + s.w) * scale); x++) set(x, y, c);
      }
      if (s.stroke) {
        const corners: [number, number][] = [
          [s.x, s.y],
          [s.x + s.w, s.y],
          [s.x + s.w, s.y + s.h],
          [s.x, s.y + s.h],
          [s.x, s.y],
        ];
        for (let i = 0; i < 4; i++) segment(...corners[i], ...corners[i + 1], s.width ?? 1, s.stroke);
      }
    } else if (s.type === 'line') segment(s.x1, s.y1, s.x2, s.y2, s.width, s.stroke, s.dash);
    else if (s.type === 'polyline')
      for (let i = 0; i + 1 < s.points.length; i++)
        segment(...s.points[i], ...s.points[i + 1], s.width, s.stroke, s.dash);
    else if (s.type === 'circle') disc(s.cx * scale, s.cy * scale, s.r * scale, rgb(s.fill));
  }
  const raw = Buffer.alloc((w * 3 + 1) * h);
  for (let y = 0; y < h; y++) {
    raw[y * (w * 3 + 1)] = 0;
    raw.set(px.subarray(y * w * 3, (y + 1) * w * 3), y * (w * 3 + 1) + 1);
  }
  const ihdr = Buffer.alloc(13);
  ihdr.writeUInt32BE(w, 0);
  ihdr.writeUInt32BE(h, 4);
  ihdr[8] = 8;
  ihdr[9] = 2;
  const signature = Buffer.from([137, 80, 78, 71, 13, 10, 26, 10]);
  return new Uint8Array(
    Buffer.concat([
      signature,
      chunk('IHDR', ihdr),
      chunk('IDAT', zlib.deflateSync(raw)),
      chunk('IEND', Buffer.alloc(0)),
    ]),
  );
}
