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
 * holding it, every time.
 */
const RACERS = 6;
const TRIALS = 4;
/** The racers start together at a moment this far ahead of their launch, so all are loaded by then. */
const START_DELAY_MS = 2500;
/** A winner keeps the lock this long, so a late racer meets a live lock rather than none. */
const HOLD_MS = 1500;

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
const [study, startAt, holdMs] = process.argv.slice(2);
while (Date.now() < Number(startAt)) {}
let outcome;
try {
  const lock = StudyLock.acquire(study, 'racer ' + process.pid);
  outcome = 'won';
  setTimeout(() => { lock.release(); process.stdout.write(outcome); }, Number(holdMs));
} catch (error) {
  outcome = error.problem === 'locked' ? 'refused' : 'failed: ' + error.message;
  process.stdout.write(outcome);
}
`,
  );
});
afterAll(() => tmp.cleanup());

function race(study: string): Promise<string[]> {
  const startAt = Date.now() + START_DELAY_MS;
  return Promise.all(
    Array.from(
      { length: RACERS },
      () =>
        new Promise<string>((resolve) => {
          const child = spawn(
            process.execPath,
            ['--import', 'tsx', racer, study, String(startAt), String(HOLD_MS)],
            { cwd: ROOT, stdio: ['ignore', 'pipe', 'pipe'] },
          );
          let out = '';
          let err = '';
          child.stdout.on('data', (d: Buffer) => {
            out += d.toString();
          });
          child.stderr.on('data', (d: Buffer) => {
            err += d.toString();
          });
          child.on('exit', () => resolve(out || `no outcome: ${err}`));
        }),
    ),
  );
}

describe('taking over a stale lock', () => {
  const stale = [
    {
      name: 'a lock whose holder has ended',
      bytes: () =>
        JSON.stringify({
          pid: deadPid(),
          host: os.hostname(),
          user: 'gone',
          app: 'an ended program',
          since: '',
        }),
    },
    { name: 'an empty lock file', bytes: () => '' },
    { name: 'a lock file that is not a lock', bytes: () => '\u0000\u0001garbage{' },
  ];

  for (const [i, kind] of stale.entries()) {
    it(`${kind.name}: one of ${RACERS} racing processes wins, in each of ${i === 0 ? TRIALS : 1} trial(s)`, async () => {
      const trials = i === 0 ? TRIALS : 1;
      for (let trial = 0; trial < trials; trial++) {
        const study = path.join(tmp.dir, `race-${i}-${trial}.scalewright`);
        fs.writeFileSync(`${study}.lock`, kind.bytes());
        const outcomes = await race(study);
        expect(
          outcomes.filter((o) => o === 'won'),
          outcomes.join(', '),
        ).toHaveLength(1);
        expect(
          outcomes.filter((o) => o === 'refused'),
          outcomes.join(', '),
        ).toHaveLength(RACERS - 1);
        // The winner released its lock; no temporary or marker file is left beside the study.
        expect(fs.readdirSync(tmp.dir).filter((f) => f.startsWith(path.basename(study)))).toEqual([]);
      }
    }, 120_000);
  }
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
