import { createHash } from 'node:crypto';
import fs from 'node:fs';
import path from 'node:path';
import { SCORING_KEY_FORMAT } from './key.ts';

/** One file of the export, ready to write or to hand to a browser. */
export interface ExportFile {
  name: string;
  mime: string;
  bytes: Buffer;
  sha256: string;
}

export function exportFile(name: string, mime: string, content: string | Buffer): ExportFile {
  const bytes = typeof content === 'string' ? Buffer.from(content, 'utf8') : content;
  return { name, mime, bytes, sha256: createHash('sha256').update(bytes).digest('hex') };
}

/** A folder the export cannot write to, said in a sentence that names it. */
export class ExportFolderError extends Error {
  override name = 'ExportFolderError';
}

/**
 * True when a folder holds only files an earlier instrument export wrote: nothing but those file
 * names, and a scoring key that says it is one.
 */
function holdsEarlierExport(dir: string, names: readonly string[], entries: string[]): boolean {
  if (!entries.every((e) => names.includes(e)) || !entries.includes('scoring-key.json')) return false;
  try {
    const key = JSON.parse(fs.readFileSync(path.join(dir, 'scoring-key.json'), 'utf8')) as {
      format?: string;
    };
    return key.format === SCORING_KEY_FORMAT;
  } catch {
    return false;
  }
}

/**
 * Writes the files into `dir` all at once: into a new folder beside it first, which is then renamed
 * into place, so `dir` never holds half an export. `dir` may be missing (it is created), empty, or
 * hold an earlier instrument export (which is replaced); any other content is refused with an
 * ExportFolderError naming what is there, and nothing is written.
 */
export function writeExportFolder(dir: string, files: ExportFile[]): void {
  const target = path.resolve(dir);
  const names = files.map((f) => f.name);
  let replacing = false;
  if (fs.existsSync(target)) {
    if (!fs.statSync(target).isDirectory()) {
      throw new ExportFolderError(`--out ${target} is a file, not a folder; name a new or empty folder`);
    }
    const entries = fs.readdirSync(target);
    if (entries.length > 0) {
      if (!holdsEarlierExport(target, names, entries)) {
        const shown =
          entries.slice(0, 3).join(', ') + (entries.length > 3 ? `, … (${entries.length} entries)` : '');
        throw new ExportFolderError(
          `--out ${target} already holds other files (${shown}); name a new or empty folder, or one holding only an earlier instrument export`,
        );
      }
      replacing = true;
    }
  }
  const parent = path.dirname(target);
  fs.mkdirSync(parent, { recursive: true });
  const staging = fs.mkdtempSync(path.join(parent, `.${path.basename(target)}.writing-`));
  try {
    // mkdtemp makes the folder private; give it the permissions a new folder gets here.
    fs.chmodSync(staging, 0o777 & ~process.umask());
    for (const file of files) fs.writeFileSync(path.join(staging, file.name), file.bytes);
    if (!replacing) {
      if (fs.existsSync(target)) fs.rmdirSync(target);
      fs.renameSync(staging, target);
      return;
    }
    const old = `${staging}.old`;
    fs.renameSync(target, old);
    try {
      fs.renameSync(staging, target);
    } catch (error) {
      fs.renameSync(old, target);
      throw error;
    }
    fs.rmSync(old, { recursive: true, force: true });
  } catch (error) {
    fs.rmSync(staging, { recursive: true, force: true });
    throw error;
  }
}
