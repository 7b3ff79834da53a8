import { describe, expect, it } from 'vitest';
import { PREVIEW_BYTES, previewTable } from '../../../app/import/preview.ts';

describe('previewTable', () => {
  it('shows the first rows of a large file, cut after a whole line', () => {
    const lines = ['id,tc1,tc2'];
    for (let i = 0; i < 200_000; i++) lines.push(`r${i},${i % 5},${(i * 3) % 5}`);
    const bytes = new TextEncoder().encode(`${lines.join('\n')}\n`);
    expect(bytes.length).toBeGreaterThan(PREVIEW_BYTES);
    const p = previewTable(bytes, { rows: 5 });
    expect(p.header).toEqual(['id', 'tc1', 'tc2']);
    expect(p.rows).toEqual([
      ['r0', '0', '0'],
      ['r1', '1', '3'],
      ['r2', '2', '1'],
      ['r3', '3', '4'],
      ['r4', '4', '2'],
    ]);
    expect(p.rowNumbers).toEqual([2, 3, 4, 5, 6]);
    expect(p.truncated).toBe(true);
    expect(p.totalBytes).toBe(bytes.length);
  });

  it('cuts UTF-16 files on a code-unit boundary', () => {
    const text = `id,tc1\n${Array.from({ length: 60_000 }, (_, i) => `r${i},${i % 5}`).join('\n')}\n`;
    const bytes = new Uint8Array(Buffer.from(`\ufeff${text}`, 'utf16le'));
    const p = previewTable(bytes, { rows: 2 });
    expect([p.encoding, p.rows]).toEqual([
      'utf-16le',
      [
        ['r0', '0'],
        ['r1', '1'],
      ],
    ]);
  });

  it('warns, without refusing, when the whole file is above the import limit', () => {
    const p = previewTable(new TextEncoder().encode('id,tc1\nr1,2\n'), { maxBytes: 5 });
    expect(p.warnings).toContain('the file is 12 bytes, above the import limit of 5 bytes');
    expect(p.truncated).toBe(false);
  });
});
