import fs from 'node:fs';
import { StudyFileError } from './errors.ts';
import { LATEST_VERSION } from './migrations/index.ts';

/** `PRAGMA application_id` of every study file: the bytes "SCLW". */
export const APPLICATION_ID = 0x53434c57;
const SQLITE_MAGIC = 'SQLite format 3\u0000';
const HEADER_SIZE = 100;

export interface HeaderFacts {
  pageSize: number;
  pageCount: number;
  applicationId: number;
  userVersion: number;
}

/**
 * Reads the 100-byte SQLite header without opening the database, so that a file that is not
 * ours, is truncated, or comes from a newer Scalewright is refused before SQLite touches it.
 */
export function inspectStudyFile(path: string): HeaderFacts {
  let fd: number;
  try {
    fd = fs.openSync(path, 'r');
  } catch (error) {
    const code = (error as NodeJS.ErrnoException).code;
    if (code === 'ENOENT') throw new StudyFileError('not-found', `${path} does not exist`);
    if (code === 'EISDIR') throw new StudyFileError('not-sqlite', `${path} is a folder, not a study file`);
    throw new StudyFileError('not-found', `${path} cannot be read (${code})`);
  }
  try {
    const size = fs.fstatSync(fd).size;
    if (size === 0) throw new StudyFileError('not-sqlite', `${path} is empty (0 bytes), not a study file`);
    const header = Buffer.alloc(HEADER_SIZE);
    const read = fs.readSync(fd, header, 0, HEADER_SIZE, 0);
    if (read < HEADER_SIZE || header.toString('latin1', 0, 16) !== SQLITE_MAGIC) {
      throw new StudyFileError(
        'not-sqlite',
        `${path} is not a Scalewright study file (it is not an SQLite database)`,
      );
    }
    const rawPageSize = header.readUInt16BE(16);
    const pageSize = rawPageSize === 1 ? 65536 : rawPageSize;
    const pageCount = header.readUInt32BE(28);
    const userVersion = header.readUInt32BE(60);
    // The in-header page count is only meaningful when "version-valid-for" equals the change counter.
    const pageCountValid = header.readUInt32BE(92) === header.readUInt32BE(24);
    const applicationId = header.readUInt32BE(68);
    if (pageSize < 512 || (pageSize & (pageSize - 1)) !== 0) {
      throw new StudyFileError(
        'corrupt',
        `${path} is damaged: its header gives an impossible page size (${pageSize})`,
      );
    }
    // A process stopped during a checkpoint leaves page 1 (with the new page count) written but the
    // file not yet grown to it; the write-ahead log beside it still holds every page, and SQLite
    // finishes the checkpoint on the next open. The page count proves truncation only without one.
    const walSize = fs.statSync(`${path}-wal`, { throwIfNoEntry: false })?.size ?? 0;
    const truncated = pageCountValid && pageCount > 0 && size < pageCount * pageSize && walSize === 0;
    if (size % pageSize !== 0 || truncated) {
      throw new StudyFileError(
        'corrupt',
        `${path} is damaged or truncated: ${size} bytes, but its header promises ${pageCount} pages of ${pageSize} bytes`,
      );
    }
    if (applicationId !== APPLICATION_ID) {
      throw new StudyFileError(
        'not-a-study',
        `${path} is an SQLite database, but not a Scalewright study file`,
      );
    }
    if (userVersion > LATEST_VERSION) {
      throw new StudyFileError(
        'newer-version',
        `${path} was written by a newer Scalewright (study file version ${userVersion}; this one reads up to ${LATEST_VERSION}); update Scalewright to open it`,
      );
    }
    return { pageSize, pageCount, applicationId, userVersion };
  } finally {
    fs.closeSync(fd);
  }
}
