import fs from 'node:fs';
import path from 'node:path';
import { fileURLToPath } from 'node:url';

/** The four DejaVu Serif styles the PDF embeds (standard PDF fonts cannot print α, ω, λ, ≤ or −). */
export const FONT_FILES = {
  regular: 'DejaVuSerif.ttf',
  bold: 'DejaVuSerif-Bold.ttf',
  italic: 'DejaVuSerif-Italic.ttf',
  boldItalic: 'DejaVuSerif-BoldItalic.ttf',
} as const;

export type FontStyle = keyof typeof FONT_FILES;

function here(): string | null {
  try {
    return path.dirname(fileURLToPath(import.meta.url));
  } catch {
    return null;
  }
}

/**
 * The folder holding the fonts: `SCALEWRIGHT_FONTS` when set, else the nearest `assets/fonts` above
 * this module (the sources, the command line's bundle in app/cli/dist, the desktop shell's bundle
 * inside a packaged app) or above the working folder.
 */
export function fontFolder(): string {
  const fromEnv = process.env.SCALEWRIGHT_FONTS;
  if (fromEnv) return fromEnv;
  const starts = [here(), process.cwd()].filter((s): s is string => s !== null);
  for (const start of starts) {
    let dir = start;
    for (;;) {
      const candidate = path.join(dir, 'assets', 'fonts');
      if (fs.existsSync(path.join(candidate, FONT_FILES.regular))) return candidate;
      const up = path.dirname(dir);
      if (up === dir) break;
      dir = up;
    }
  }
  throw new Error(
    `the PDF fonts (assets/fonts/${FONT_FILES.regular} and its bold and italic styles) were not found above ${starts.join(' or ')}`,
  );
}

/** The font files' bytes, by style; throws naming the file that cannot be read. */
export function loadFonts(): Record<FontStyle, Buffer> {
  const folder = fontFolder();
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
