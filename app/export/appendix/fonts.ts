import fs from 'node:fs';
import path from 'node:path';
import { fontDirectory } from '../pdf.ts';

/** The four DejaVu Serif styles the PDF embeds (standard PDF fonts cannot print α, ω, λ, ≤ or −). */
export const FONT_FILES = {
  regular: 'DejaVuSerif.ttf',
  bold: 'DejaVuSerif-Bold.ttf',
  italic: 'DejaVuSerif-Italic.ttf',
  boldItalic: 'DejaVuSerif-BoldItalic.ttf',
} as const;

export type FontStyle = keyof typeof FONT_FILES;

/** The font files' bytes, by style; throws naming the file that cannot be read. */
export function loadFonts(): Record<FontStyle, Buffer> {
  // The one lookup the instrument's PDF uses too: SCALEWRIGHT_FONTS, a packaged app's resources, assets/fonts.
  const folder = fontDirectory();
  const out = {} as Record<FontStyle, Buffer>;
  for (const [style, file] of Object.entries(FONT_FILES) as [FontStyle, string][]) {
    const full = path.join(folder, file);
    try {
      out[style] = fs.readFileSync(full);
    } catch (error) {
      throw new Error(`the PDF font ${full} cannot be read: ${(error as Error).message}`);
    }
  }
  return out;
}
