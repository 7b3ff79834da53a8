import zlib from 'node:zlib';

/**
 * Just enough of ZIP (PKWARE APPNOTE: central directory, local headers, stored and deflated entries)
 * and of XML 1.0 well-formedness to check a DOCX package in tests without a dependency.
 */

export function unzip(bytes: Uint8Array): Map<string, Buffer> {
  const buf = Buffer.from(bytes);
  let end = -1;
  for (let i = buf.length - 22; i >= 0; i--) {
    if (buf.readUInt32LE(i) === 0x06054b50) {
      end = i;
      break;
    }
  }
  if (end < 0) throw new Error('not a ZIP file: no end of central directory');
  const entries = buf.readUInt16LE(end + 10);
  let at = buf.readUInt32LE(end + 16);
  const out = new Map<string, Buffer>();
  for (let e = 0; e < entries; e++) {
    if (buf.readUInt32LE(at) !== 0x02014b50) throw new Error(`bad central directory entry ${e}`);
    const method = buf.readUInt16LE(at + 10);
    const compressed = buf.readUInt32LE(at + 20);
    const size = buf.readUInt32LE(at + 24);
    const nameLength = buf.readUInt16LE(at + 28);
    const extra = buf.readUInt16LE(at + 30);
    const comment = buf.readUInt16LE(at + 32);
    const local = buf.readUInt32LE(at + 42);
    const name = buf.toString('utf8', at + 46, at + 46 + nameLength);
    if (buf.readUInt32LE(local) !== 0x04034b50) throw new Error(`bad local header for ${name}`);
    const start = local + 30 + buf.readUInt16LE(local + 26) + buf.readUInt16LE(local + 28);
    const raw = buf.subarray(start, start + compressed);
    const data = method === 0 ? raw : method === 8 ? zlib.inflateRawSync(raw) : null;
    if (!data) throw new Error(`${name}: compression method ${method} not supported`);
    if (data.length !== size) throw new Error(`${name}: ${data.length} bytes, expected ${size}`);
    out.set(name, Buffer.from(data));
    at += 46 + nameLength + extra + comment;
  }
  return out;
}

const TOKEN =
  /<!\[CDATA\[[\s\S]*?\]\]>|<!--[\s\S]*?-->|<\?[\s\S]*?\?>|<(\/?)([A-Za-z_][\w:.-]*)((?:\s+[A-Za-z_][\w:.-]*\s*=\s*(?:"[^"<]*"|'[^'<]*'))*)\s*(\/?)>/g;
const BAD_TEXT = /<|&(?!(?:amp|lt|gt|quot|apos|#\d+|#x[0-9a-fA-F]+);)/;

/** Throws naming the first well-formedness error: stray `<` or `&`, unbalanced tags, duplicate attributes, no single root. */
export function checkWellFormed(xml: string, name = 'xml'): void {
  const stack: string[] = [];
  let roots = 0;
  let last = 0;
  TOKEN.lastIndex = 0;
  for (let m = TOKEN.exec(xml); m !== null; m = TOKEN.exec(xml)) {
    const between = xml.slice(last, m.index);
    if (BAD_TEXT.test(between))
      throw new Error(`${name}: stray markup near offset ${last}: ${between.slice(0, 40)}`);
    if (stack.length === 0 && between.trim() !== '' && last > 0)
      throw new Error(`${name}: text outside the root element`);
    last = TOKEN.lastIndex;
    const [, closing, tag, attrs, selfClosing] = m;
    if (!tag) continue;
    if (closing) {
      const open = stack.pop();
      if (open !== tag) throw new Error(`${name}: </${tag}> closes <${open ?? 'nothing'}>`);
      continue;
    }
    const names = [...(attrs ?? '').matchAll(/([A-Za-z_][\w:.-]*)\s*=/g)].map((a) => a[1]);
    if (new Set(names).size !== names.length) throw new Error(`${name}: duplicate attribute in <${tag}>`);
    if (stack.length === 0) roots++;
    if (!selfClosing) stack.push(tag);
  }
  if (BAD_TEXT.test(xml.slice(last))) throw new Error(`${name}: stray markup at the end`);
  if (stack.length > 0) throw new Error(`${name}: <${stack.at(-1)}> never closed`);
  if (roots !== 1) throw new Error(`${name}: ${roots} root elements`);
}
