import { spawn, spawnSync } from 'node:child_process';
import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { pathToFileURL } from 'node:url';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { StudyLock } from '../../../db/lock.ts';
import { ROOT } from '../../helpers/cli.ts';
import { tempDir } from '../../helpers/tmp.ts';

/**
 * Taking over a stale lock while other processes try the same: exactly one of them may come away
 * holding it, every time. Each racing process races for a series of studies, one at a time, all
 * starting each race at the same moment; a winner keeps its lock until every race is over, so a
 * racer that arrives late meets a live lock.
 */
const RACERS = 6;
/** Races per run: a stale lock of an ended process, then empty and foreign lock files. */
const RACES = 16;
/** The first race starts this long after the racers are launched, so all are loaded by then. */
const START_DELAY_MS = 4000;
/** Time between the starts of two races. */
const SLOT_MS = 60;

let tmp: ReturnType<typeof tempDir>;
let racer: string;

/** A process id that ran on this host and has ended. */
function deadPid(): number {
  const child = spawnSync(process.execPath, ['-e', 'process.stdout.write(String(process.pid))'], {
    encoding: 'utf8',
  });
  return Number(child.stdout);
}

beforeAll(() => {
  tmp = tempDir('scalewright-lock-');
  racer = path.join(tmp.dir, 'racer.mts');
  const lockModule = JSON.stringify(pathToFileURL(path.join(ROOT, 'db', 'lock.ts')).href);
  fs.writeFileSync(
    racer,
    `import { StudyLock } from ${lockModule};
const [dir, races, startAt, slotMs] = process.argv.slice(2);
const held = [];
const outcomes = [];
for (let k = 0; k < Number(races); k++) {
  const at = Number(startAt) + k * Number(slotMs);
  while (Date.now() < at) {}
  try {
    held.push(StudyLock.acquire(dir + '/race-' + k + '.scalewright', 'racer ' + process.pid));
    outcomes.push('won');
  } catch (error) {
    outcomes.push(error.problem === 'locked' ? 'refused' : 'failed: ' + error.message);
  }
}
process.stdout.write(JSON.stringify(outcomes));
// Hold every lock won until the parent says all racers are done.
process.stdin.once('data', () => {
  for (const lock of held) lock.release();
  process.exit(0);
});
`,
  );
});
afterAll(() => tmp.cleanup());

/** The stale lock of race k: mostly an ended process's, some empty, some not a lock at all. */
function staleLock(k: number): string {
  if (k % 8 === 6) return '';
  if (k % 8 === 7) return '\u0000\u0001garbage{';
  return JSON.stringify({
    pid: deadPid(),
    host: os.hostname(),
    user: 'gone',
    app: 'an ended program',
    since: '',
  });
}

async function race(dir: string): Promise<string[][]> {
  const startAt = Date.now() + START_DELAY_MS;
  const children = Array.from({ length: RACERS }, () =>
    spawn(
      process.execPath,
      ['--import', 'tsx', racer, dir, String(RACES), String(startAt), String(SLOT_MS)],
      { cwd: ROOT, stdio: ['pipe', 'pipe', 'pipe'] },
    ),
  );
  const results = await Promise.all(
    children.map(
      (child) =>
        new Promise<string[]>((resolve, reject) => {
          let out = '';
          let err = '';
          child.stdout.on('data', (d: Buffer) => {
            out += d.toString();
            if (out.endsWith(']')) resolve(JSON.parse(out));
          });
          child.stderr.on('data', (d: Buffer) => {
            err += d.toString();
          });
          child.on('exit', () => reject(new Error(`a racer ended without its outcomes: ${err}`)));
        }),
    ),
  );
  await Promise.all(
    children.map((child) => {
      const ended = new Promise<void>((resolve) => child.once('exit', () => resolve()));
      child.stdin.end('done');
      return ended;
    }),
  );
  return results;
}

describe('taking over a stale lock', () => {
  it(`one of ${RACERS} racing processes wins each of ${RACES} races, and the others are refused`, async () => {
    const dir = path.join(tmp.dir, 'races');
    fs.mkdirSync(dir);
    for (let k = 0; k < RACES; k++)
      fs.writeFileSync(path.join(dir, `race-${k}.scalewright.lock`), staleLock(k));
    const outcomes = await race(dir);
    for (let k = 0; k < RACES; k++) {
      const of = outcomes.map((o) => o[k]);
      expect(
        of.filter((o) => o === 'won'),
        `race ${k}: ${of.join(', ')}`,
      ).toHaveLength(1);
      expect(
        of.filter((o) => o === 'refused'),
        `race ${k}: ${of.join(', ')}`,
      ).toHaveLength(RACERS - 1);
    }
    // Each winner released its lock; no temporary or marker file is left.
    expect(fs.readdirSync(dir)).toEqual([]);
  }, 120_000);
});

describe('the lock within one process', () => {
  it('takes over an empty lock file and a foreign one', () => {
    const study = path.join(tmp.dir, 'single.scalewright');
    for (const bytes of ['', 'not a lock', '{"pid":-1,"host":"x"}']) {
      fs.writeFileSync(`${study}.lock`, bytes);
      const lock = StudyLock.acquire(study, 'test');
      expect(JSON.parse(fs.readFileSync(`${study}.lock`, 'utf8'))).toMatchObject({
        pid: process.pid,
        app: 'test',
      });
      lock.release();
      expect(fs.existsSync(`${study}.lock`)).toBe(false);
    }
  });

  it('says how to recover from a lock held on another host', () => {
    const study = path.join(tmp.dir, 'remote.scalewright');
    fs.writeFileSync(
      `${study}.lock`,
      JSON.stringify({
        pid: 1234,
        host: 'another-host.invalid',
        user: 'kim',
        app: 'Scalewright desktop',
        since: 'x',
      }),
    );
    expect(() => StudyLock.acquire(study, 'test')).toThrow(
      /open for writing in Scalewright desktop by kim .*on another-host\.invalid.*delete the lock file .*remote\.scalewright\.lock/,
    );
    fs.rmSync(`${study}.lock`);
  });

  it('leaves a lock that is not its own in place on release', () => {
    const study = path.join(tmp.dir, 'release.scalewright');
    const lock = StudyLock.acquire(study, 'test');
    fs.writeFileSync(
      `${study}.lock`,
      JSON.stringify({ pid: process.pid, host: os.hostname(), nonce: 'other' }),
    );
    lock.release();
    expect(fs.existsSync(`${study}.lock`)).toBe(true);
    fs.rmSync(`${study}.lock`);
  });
});
