import { readFile } from 'node:fs/promises';
import { resolve } from 'node:path';
import { type CliContext, DataError } from './types.ts';

/** Resolves a path the user typed against the folder they ran npm from. */
export function resolveUserPath(file: string, ctx: CliContext): string {
  return resolve(ctx.cwd, file);
}

/**
 * Reads a file the user named (relative to the folder they ran the command from); a file that
 * cannot be read is a data error saying which file and why.
 */
export async function readUserFile(file: string, what: string, ctx: CliContext): Promise<Uint8Array> {
  try {
    return await readFile(resolve(ctx.cwd, file));
  } catch (error) {
    const code = (error as NodeJS.ErrnoException).code;
    const reason =
      code === 'ENOENT'
        ? 'no such file'
        : code === 'EISDIR'
          ? 'it is a folder, not a file'
          : code === 'EACCES'
            ? 'permission denied'
            : (code ?? 'unreadable');
    throw new DataError(`cannot read ${what} "${file}": ${reason}`);
  }
}
