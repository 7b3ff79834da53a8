import crypto from 'node:crypto';
import fs from 'node:fs';
import os from 'node:os';
import { StudyFileError } from './errors.ts';

export interface LockHolder {
  pid: number;
  host: string;
  user: string;
  app: string;
  since: string;
  /** Random per acquisition, so that a holder can tell its own lock file from any other. */
  nonce?: string;
}

/** Rounds of "look, take over, look again" before acquire gives up on a lock that keeps changing. */
const MAX_ROUNDS = 50;
/** Wait between rounds while another process is in the middle of taking a stale lock over. */
const ROUND_WAIT_MS = 10;
/**
 * Depth of takeover markers (see StudyLock.acquire): a marker left by a process that died while
 * taking a lock over is taken over in turn, up to this depth.
 */
const MAX_MARKER_DEPTH = 4;

/**
 * A writer's lock on a study: a file `<study>.lock` beside it, holding who has the study open.
 *
 * The lock file is only ever put in place whole: the holder is written to a temporary file first,
 * which is then hard-linked to the lock's name (failing if a lock exists) or renamed over it. A lock
 * whose holder no longer runs on this host, an empty lock file and one that is not a lock at all are
 * taken over; so that racing processes cannot both take over the same stale lock, replacing a lock
 * file whose bytes hash to G needs the marker `<study>.lock.takeover-G`, which only one process can
 * create (the same rule takes over a marker left by a process that died while holding it).
 */
export class StudyLock {
  private constructor(
    readonly path: string,
    private readonly nonce: string,
  ) {}

  static acquire(studyPath: string, app: string): StudyLock {
    const lockPath = `${studyPath}.lock`;
    const holder: LockHolder = {
      pid: process.pid,
      host: os.hostname(),
      user: safeUserName(),
      app,
      since: new Date().toISOString(),
      nonce: crypto.randomBytes(12).toString('hex'),
    };
    const mine = JSON.stringify(holder);
    const temp = `${lockPath}.${holder.nonce}.tmp`;
    try {
      fs.writeFileSync(temp, mine, { flag: 'wx' });
    } catch (error) {
      throw lockFileError(studyPath, lockPath, error);
    }
    try {
      for (let round = 0; round < MAX_ROUNDS; round++) {
        if (tryLink(temp, lockPath, studyPath)) return new StudyLock(lockPath, holder.nonce as string);
        const seen = readBytes(lockPath);
        if (seen === undefined) continue;
        const other = parseHolder(seen);
        if (other && !isStale(other)) throw lockedError(studyPath, lockPath, other);
        const outcome = replaceStale(lockPath, seen, temp, lockPath, 0);
        if (outcome === 'replaced' && readBytes(lockPath)?.toString('utf8') === mine)
          return new StudyLock(lockPath, holder.nonce as string);
        if (outcome === 'busy') sleep(ROUND_WAIT_MS);
      }
    } finally {
      fs.rmSync(temp, { force: true });
    }
    throw new StudyFileError(
      'locked',
      `${studyPath} is locked: its lock file ${lockPath} kept changing while it was being taken over; if no Scalewright has the study open, delete ${lockPath} and try again`,
    );
  }

  /** Removes the lock file, if it is still this lock's (it is never someone else's to remove). */
  release(): void {
    const current = readBytes(this.path);
    if (current !== undefined && parseHolder(current)?.nonce === this.nonce) {
      fs.rmSync(this.path, { force: true });
    }
  }
}

/**
 * Replaces `target` (whose bytes were `seen`) with a copy of `temp`, if `target` still holds `seen`
 * and no other process is replacing it. 'replaced' when this process did; 'changed' when `target`
 * no longer holds `seen`; 'busy' when a live process holds the marker for `seen`.
 */
function replaceStale(
  lockPath: string,
  seen: Buffer,
  temp: string,
  target: string,
  depth: number,
): 'replaced' | 'changed' | 'busy' {
  const marker = `${lockPath}.takeover-${crypto.createHash('sha256').update(seen).digest('hex').slice(0, 32)}`;
  if (!tryLink(temp, marker, lockPath)) {
    const markerBytes = readBytes(marker);
    if (markerBytes === undefined) return 'changed';
    const taker = parseHolder(markerBytes);
    if ((taker && !isStale(taker)) || depth >= MAX_MARKER_DEPTH) return 'busy';
    // The marker's maker died while taking the lock over: take its marker over first.
    if (replaceStale(lockPath, markerBytes, temp, marker, depth + 1) !== 'replaced') return 'busy';
  }
  try {
    // Holding the marker for `seen`, no other process can replace `target` while it holds `seen`.
    if (!readBytes(target)?.equals(seen)) return 'changed';
    const staged = `${temp}.${depth}.stage`;
    fs.copyFileSync(temp, staged);
    fs.renameSync(staged, target);
    return 'replaced';
  } finally {
    fs.rmSync(marker, { force: true });
  }
}

/** Links `from` to `to` unless `to` exists: an atomic create of a complete file. */
function tryLink(from: string, to: string, studyPath: string): boolean {
  try {
    fs.linkSync(from, to);
    return true;
  } catch (error) {
    if ((error as NodeJS.ErrnoException).code === 'EEXIST') return false;
    throw lockFileError(studyPath, to, error);
  }
}

function lockedError(studyPath: string, lockPath: string, other: LockHolder): StudyFileError {
  const elsewhere = other.host !== os.hostname();
  return new StudyFileError(
    'locked',
    `${studyPath} is open for writing in ${other.app} by ${other.user} (process ${other.pid} on ${other.host}) since ${other.since}; close it there first${
      elsewhere
        ? `, or, if no Scalewright on ${other.host} has it open any more, delete the lock file ${lockPath}`
        : ''
    }`,
  );
}

function lockFileError(studyPath: string, lockPath: string, error: unknown): StudyFileError {
  const code = (error as NodeJS.ErrnoException).code;
  const reason =
    code === 'EACCES' || code === 'EPERM' || code === 'EROFS'
      ? 'the folder is not writable'
      : (code ?? (error as Error).message);
  return new StudyFileError(
    'not-writable',
    `${studyPath} cannot be opened for writing: its lock file ${lockPath} cannot be written (${reason}); open it read-only, or copy it to a folder you can write to`,
  );
}

export function safeUserName(): string {
  try {
    return os.userInfo().username;
  } catch {
    return process.env.USER ?? process.env.USERNAME ?? 'unknown';
  }
}

function readBytes(file: string): Buffer | undefined {
  try {
    return fs.readFileSync(file);
  } catch {
    return undefined;
  }
}

/** The holder named in a lock file's bytes, or undefined for an empty or foreign file. */
function parseHolder(bytes: Buffer): LockHolder | undefined {
  try {
    const value = JSON.parse(bytes.toString('utf8')) as Partial<LockHolder> | null;
    if (
      value === null ||
      typeof value !== 'object' ||
      !Number.isSafeInteger(value.pid) ||
      (value.pid as number) <= 0 ||
      typeof value.host !== 'string'
    )
      return undefined;
    return {
      pid: value.pid as number,
      host: value.host,
      user: String(value.user ?? 'unknown'),
      app: String(value.app ?? 'another program'),
      since: String(value.since ?? 'an unknown time'),
      ...(typeof value.nonce === 'string' ? { nonce: value.nonce } : {}),
    };
  } catch {
    return undefined;
  }
}

/** A lock is stale when its holder was a process on this host that no longer runs. */
function isStale(holder: LockHolder): boolean {
  if (holder.host !== os.hostname()) return false;
  if (holder.pid === process.pid) return false;
  try {
    process.kill(holder.pid, 0);
    return false;
  } catch (error) {
    return (error as NodeJS.ErrnoException).code === 'ESRCH';
  }
}

function sleep(ms: number): void {
  Atomics.wait(new Int32Array(new SharedArrayBuffer(4)), 0, 0, ms);
}
