import fs from 'node:fs';
import os from 'node:os';
import { StudyFileError } from './errors.ts';

export interface LockHolder {
  pid: number;
  host: string;
  user: string;
  app: string;
  since: string;
}

/**
 * A writer's lock on a study: a file `<study>.lock` created exclusively beside it, holding who has
 * the study open. A lock left by a process that no longer runs on this host is taken over.
 */
export class StudyLock {
  private constructor(readonly path: string) {}

  static acquire(studyPath: string, app: string): StudyLock {
    const lockPath = `${studyPath}.lock`;
    const holder: LockHolder = {
      pid: process.pid,
      host: os.hostname(),
      user: safeUserName(),
      app,
      since: new Date().toISOString(),
    };
    for (let attempt = 0; attempt < 2; attempt++) {
      try {
        fs.writeFileSync(lockPath, JSON.stringify(holder), { flag: 'wx' });
        return new StudyLock(lockPath);
      } catch (error) {
        if ((error as NodeJS.ErrnoException).code !== 'EEXIST') throw error;
        const other = readHolder(lockPath);
        if (other && isStale(other)) {
          fs.rmSync(lockPath, { force: true });
          continue;
        }
        throw new StudyFileError(
          'locked',
          other
            ? `${studyPath} is open for writing in ${other.app} by ${other.user} (process ${other.pid} on ${other.host}) since ${other.since}; close it there first`
            : `${studyPath} is locked by another program (lock file ${lockPath}); close it there first`,
        );
      }
    }
    throw new StudyFileError('locked', `${studyPath} is locked (lock file ${lockPath})`);
  }

  release(): void {
    fs.rmSync(this.path, { force: true });
  }
}

export function safeUserName(): string {
  try {
    return os.userInfo().username;
  } catch {
    return process.env.USER ?? process.env.USERNAME ?? 'unknown';
  }
}

function readHolder(lockPath: string): LockHolder | undefined {
  try {
    return JSON.parse(fs.readFileSync(lockPath, 'utf8')) as LockHolder;
  } catch {
    return undefined;
  }
}

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
