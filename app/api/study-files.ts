import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import Database from 'better-sqlite3';
import { StudyFileError } from '../../db/errors.ts';
import { STUDY_EXTENSION } from '../../db/study.ts';
import { inspectStudyFile } from '../../db/study-file.ts';
import { DecisionLog } from '../../db/decision-log.ts';
import { RuleError } from '../phases/errors.ts';

/**
 * The file side of New, Open and Save a copy: every path check happens here, in the main process,
 * so that the renderer (in browser mode, a page on loopback) can never reach beyond it. Folders are
 * listed by name only; no file's contents ever leave through these functions.
 */

export interface FolderEntry {
  name: string;
  /** Absolute path. */
  path: string;
  kind: 'folder' | 'study';
}

export interface FolderListing {
  path: string;
  /** The folder above, or null at the top of the file system. */
  parent: string | null;
  entries: FolderEntry[];
}

/** A path the user typed: must be absolute (no guessing what it is relative to). */
export function absolutePath(input: string, what: string): string {
  const trimmed = input.trim();
  if (trimmed.length === 0) throw fail('invalid-input', `${what}: a path is required`);
  if (trimmed.includes('\0')) throw fail('invalid-input', `${what}: the path holds a NUL character`);
  if (!path.isAbsolute(trimmed))
    throw fail('invalid-input', `${what}: "${trimmed}" is not an absolute path (start it with / or a drive)`);
  return path.resolve(trimmed);
}

/** Lists the sub-folders and study files of a folder (hidden entries left out), folders first. */
export function listFolder(folder: string): FolderListing {
  const target = absolutePath(folder, 'folder');
  let dirents: fs.Dirent[];
  try {
    dirents = fs.readdirSync(target, { withFileTypes: true });
  } catch (error) {
    const code = (error as NodeJS.ErrnoException).code;
    if (code === 'ENOENT') throw fail('not-found', `folder ${target} does not exist`);
    if (code === 'ENOTDIR') throw fail('invalid-input', `${target} is a file, not a folder`);
    if (code === 'EACCES' || code === 'EPERM')
      throw fail('not-readable', `folder ${target} cannot be read (permission denied)`);
    throw fail('not-readable', `folder ${target} cannot be read (${code})`);
  }
  const entries: FolderEntry[] = [];
  for (const d of dirents) {
    if (d.name.startsWith('.')) continue;
    const full = path.join(target, d.name);
    let isDir = d.isDirectory();
    let isFile = d.isFile();
    if (d.isSymbolicLink()) {
      const stat = fs.statSync(full, { throwIfNoEntry: false });
      isDir = stat?.isDirectory() ?? false;
      isFile = stat?.isFile() ?? false;
    }
    if (isDir) entries.push({ name: d.name, path: full, kind: 'folder' });
    else if (isFile && d.name.endsWith(STUDY_EXTENSION))
      entries.push({ name: d.name, path: full, kind: 'study' });
  }
  entries.sort((a, b) =>
    a.kind === b.kind ? a.name.localeCompare(b.name, 'en') : a.kind === 'folder' ? -1 : 1,
  );
  const parent = path.dirname(target);
  return { path: target, parent: parent === target ? null : parent, entries };
}

/** The folder a file dialog starts in: the open study's folder, else the user's home folder. */
export function startFolder(studyPath: string | undefined): string {
  return studyPath ? path.dirname(studyPath) : os.homedir();
}

/**
 * Checks a path where a new study file (or a copy) will be written: absolute, ending in
 * `.scalewright`, in a folder that exists, and not already taken.
 */
export function newStudyPath(input: string, what: string): string {
  const target = absolutePath(input, what);
  if (!target.endsWith(STUDY_EXTENSION))
    throw fail(
      'invalid-input',
      `${what}: a study file name ends in ${STUDY_EXTENSION} (got ${path.basename(target)})`,
    );
  const folder = path.dirname(target);
  const stat = fs.statSync(folder, { throwIfNoEntry: false });
  if (!stat) throw fail('not-found', `${what}: folder ${folder} does not exist`);
  if (!stat.isDirectory()) throw fail('invalid-input', `${what}: ${folder} is not a folder`);
  if (fs.existsSync(target))
    throw new StudyFileError('exists', `${target} already exists; choose another name`);
  return target;
}

/**
 * Writes a consistent copy of an open study with SQLite's online backup, under a temporary name,
 * checks it (study header, integrity, decision-log chain and row count) and only then moves it into
 * place; the target must not exist. The open study is not changed and stays open.
 */
export async function saveCopy(
  db: Database.Database,
  target: string,
  nativeBinding?: string,
): Promise<{ path: string; bytes: number; logRows: number }> {
  const temp = `${target}.${process.pid}.copying`;
  try {
    await db.backup(temp);
    // The backup keeps the open study's write-ahead mode; a copy is one self-contained file.
    const writable = new Database(temp, { fileMustExist: true, nativeBinding });
    try {
      writable.pragma('journal_mode = DELETE');
    } finally {
      writable.close();
    }
    inspectStudyFile(temp);
    const copy = new Database(temp, { readonly: true, fileMustExist: true, nativeBinding });
    let logRows: number;
    try {
      const problems = (copy.pragma('quick_check') as { quick_check: string }[])
        .map((r) => r.quick_check)
        .filter((r) => r !== 'ok');
      if (problems.length > 0)
        throw new StudyFileError('corrupt', `the copy failed its integrity check: ${problems.join('; ')}`);
      const log = new DecisionLog(copy);
      const breaks = log.verify();
      if (breaks.length > 0)
        throw new StudyFileError(
          'corrupt',
          `the copy's decision log does not verify (${breaks.length} breaks)`,
        );
      logRows = log.count();
      const original = new DecisionLog(db).count();
      if (logRows !== original)
        throw new StudyFileError('corrupt', `the copy holds ${logRows} log rows, the study ${original}`);
    } finally {
      copy.close();
    }
    if (fs.existsSync(target))
      throw new StudyFileError('exists', `${target} already exists; choose another name`);
    fs.renameSync(temp, target);
    return { path: target, bytes: fs.statSync(target).size, logRows };
  } finally {
    for (const leftover of [temp, `${temp}-wal`, `${temp}-shm`, `${temp}-journal`])
      fs.rmSync(leftover, { force: true });
  }
}

function fail(code: string, message: string): RuleError {
  return new RuleError(message, code);
}
