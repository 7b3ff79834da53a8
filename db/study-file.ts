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
    if (code === 'EACCES' || code === 'EPERM')
      throw new StudyFileError('not-readable', `${path} cannot be read: permission denied`);
    throw new StudyFileError('not-readable', `${path} cannot be read (${code})`);
  }
  try {
    const stat = fs.fstatSync(fd);
    if (stat.isDirectory()) throw new StudyFileError('not-sqlite', `${path} is a folder, not a study file`);
    if (!stat.isFile())
      throw new StudyFileError('not-sqlite', `${path} is not a regular file, so not a study file`);
    const size = stat.size;
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
    // Bytes 18 and 19: 2 while the study is in write-ahead mode (open for writing, or its writer was
    // stopped), 1 once it was closed cleanly.
    checkWriteAheadLog(path, header.readUInt8(18) === 2, pageSize);
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

const WAL_HEADER_SIZE = 32;
const WAL_FRAME_HEADER_SIZE = 24;
/** Magic numbers of a write-ahead log: checksums in little-endian (…82) or big-endian (…83) words. */
const WAL_MAGIC_LE = 0x377f0682;
const WAL_MAGIC_BE = 0x377f0683;
const WAL_FORMAT_VERSION = 3007000;
/** Offset of the application id inside page 1 (the database header). */
const APPLICATION_ID_OFFSET = 68;

/**
 * Refuses a write-ahead log (`<study>-wal`) that this study does not own, before SQLite can apply it.
 * SQLite replays any valid log it finds beside a database when the database enters write-ahead mode,
 * so a log copied from another database, or left from an earlier copy of this one, would be written
 * into the study. A study closed cleanly is in rollback mode (`inWalMode` false) and owns no log;
 * one whose writer was stopped is in write-ahead mode and owns the log it left, which must be a
 * valid log (header checksum, page size) whose copies of page 1 are this kind of file. Empty logs
 * are harmless. Cost O(size of the log) when one is present.
 *
 * Throws StudyFileError ('foreign-wal') saying which file and what to do.
 */
export function checkWriteAheadLog(path: string, inWalMode: boolean, pageSize: number): void {
  const walPath = `${path}-wal`;
  let fd: number;
  try {
    fd = fs.openSync(walPath, 'r');
  } catch (error) {
    const code = (error as NodeJS.ErrnoException).code;
    if (code === 'ENOENT') return;
    throw new StudyFileError(
      'foreign-wal',
      `${walPath} lies beside the study but cannot be read (${code}); move it to another folder and open the study again`,
    );
  }
  let problem: string | undefined;
  try {
    if (fs.fstatSync(fd).size === 0) return;
    problem = inWalMode ? walProblem(fd, pageSize) : undefined;
  } finally {
    fs.closeSync(fd);
  }
  const moveAway = `move ${walPath} (and ${path}-shm, if present) to another folder and open the study again`;
  if (!inWalMode) {
    throw new StudyFileError(
      'foreign-wal',
      `${walPath} lies beside the study, but the study was closed cleanly, so that log is not from an interrupted session of it and would overwrite the study with another file's changes; ${moveAway}`,
    );
  }
  if (problem !== undefined) {
    throw new StudyFileError(
      'foreign-wal',
      `${walPath} lies beside the study but does not belong to it (${problem}); if it is not from an interrupted session of this study, ${moveAway}`,
    );
  }
}

/** Why the log open at `fd` cannot be this study's write-ahead log, or undefined when it can be. */
function walProblem(fd: number, pageSize: number): string | undefined {
  const head = Buffer.alloc(WAL_HEADER_SIZE);
  if (fs.readSync(fd, head, 0, WAL_HEADER_SIZE, 0) < WAL_HEADER_SIZE)
    return 'it is shorter than a log header';
  const magic = head.readUInt32BE(0);
  if ((magic !== WAL_MAGIC_LE && magic !== WAL_MAGIC_BE) || head.readUInt32BE(4) !== WAL_FORMAT_VERSION)
    return 'it is not an SQLite write-ahead log';
  const bigEndian = magic === WAL_MAGIC_BE;
  let [s0, s1] = walChecksum(head, 0, 24, bigEndian, 0, 0);
  if (s0 !== head.readUInt32BE(24) || s1 !== head.readUInt32BE(28)) return 'its header checksum is wrong';
  const walPageSize = head.readUInt32BE(8);
  if (walPageSize !== pageSize)
    return `it holds pages of ${walPageSize} bytes, the study pages of ${pageSize}`;
  const salt1 = head.readUInt32BE(16);
  const salt2 = head.readUInt32BE(20);
  // Frames count only while their salts and running checksum hold, as SQLite reads them; read one
  // frame at a time, so a long log is never held in memory whole.
  const frame = Buffer.alloc(WAL_FRAME_HEADER_SIZE + pageSize);
  for (let at = WAL_HEADER_SIZE; ; at += frame.length) {
    if (fs.readSync(fd, frame, 0, frame.length, at) < frame.length) break;
    if (frame.readUInt32BE(8) !== salt1 || frame.readUInt32BE(12) !== salt2) break;
    [s0, s1] = walChecksum(frame, 0, 8, bigEndian, s0, s1);
    [s0, s1] = walChecksum(frame, WAL_FRAME_HEADER_SIZE, pageSize, bigEndian, s0, s1);
    if (s0 !== frame.readUInt32BE(16) || s1 !== frame.readUInt32BE(20)) break;
    if (frame.readUInt32BE(0) === 1) {
      const page = WAL_FRAME_HEADER_SIZE;
      if (frame.toString('latin1', page, page + 16) !== SQLITE_MAGIC)
        return 'its copy of the first page is not an SQLite header';
      if (frame.readUInt32BE(page + APPLICATION_ID_OFFSET) !== APPLICATION_ID)
        return 'its copy of the first page is not from a Scalewright study';
    }
  }
  return undefined;
}

/**
 * SQLite's write-ahead log checksum over `length` bytes (a multiple of 8) from `from`, continuing
 * from (s0, s1): for each pair of 32-bit words x0, x1, s0 += x0 + s1 and s1 += x1 + s0 (mod 2³²).
 */
function walChecksum(
  bytes: Buffer,
  from: number,
  length: number,
  bigEndian: boolean,
  s0: number,
  s1: number,
): [number, number] {
  let a = s0;
  let b = s1;
  for (let i = from; i < from + length; i += 8) {
    const x0 = bigEndian ? bytes.readUInt32BE(i) : bytes.readUInt32LE(i);
    const x1 = bigEndian ? bytes.readUInt32BE(i + 4) : bytes.readUInt32LE(i + 4);
    a = (a + x0 + b) >>> 0;
    b = (b + x1 + a) >>> 0;
  }
  return [a, b];
}
