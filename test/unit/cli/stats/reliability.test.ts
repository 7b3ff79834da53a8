import { spawnSync } from 'node:child_process';
import { mkdtempSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { fileURLToPath } from 'node:url';
import { afterAll, describe, expect, it } from 'vitest';

const ROOT = fileURLToPath(new URL('../../../..', import.meta.url));
const dir = mkdtempSync(join(tmpdir(), 'scalewright-reliability-'));
afterAll(() => rmSync(dir, { recursive: true, force: true }));

// Invented demo responses: five cycling-confidence items on a 1–5 scale; "repair1" is stored
// reverse-keyed and "route2" uses -99 for "no answer".
const csv = [
  'id,traffic1,traffic2,route1,route2,repair1',
  'p01,4,4,3,4,2',
  'p02,2,3,2,2,4',
  'p03,5,4,4,5,1',
  'p04,3,3,3,-99,3',
  'p05,1,2,2,1,5',
  'p06,4,5,4,4,2',
  'p07,2,2,3,2,4',
  'p08,3,4,3,3,3',
].join('\n');
const good = join(dir, 'pilot.csv');
writeFileSync(good, `${csv}\n`);
const bad = join(dir, 'bad.csv');
writeFileSync(bad, `${csv.replace('p07,2,2,3,2,4', 'p07,2,two,3,2,4')}\n`);

function cli(...args: string[]) {
  const run = spawnSync('npx', ['tsx', 'app/cli/main.ts', 'stats', 'reliability', ...args], {
    cwd: ROOT,
    encoding: 'utf8',
    env: { ...process.env, INIT_CWD: dir },
  });
  return { code: run.status, stdout: run.stdout, stderr: run.stderr };
}

describe('stats reliability (spawned CLI)', () => {
  it('exit 0: prints exactly one JSON object with the contract fields', () => {
    const run = cli(
      '--data',
      good,
      '--items',
      'traffic1,traffic2,route1,route2,repair1',
      '--reverse',
      'repair1',
      '--min',
      '1',
      '--max',
      '5',
      '--missing-codes=-99',
      '--bootstrap',
      '200',
      '--seed',
      '5',
      '--json',
    );
    expect(run.stderr).toBe('');
    expect(run.code).toBe(0);
    expect(run.stdout.trim().split('\n')).toHaveLength(1);
    const out = JSON.parse(run.stdout);
    expect(out.n).toBe(7);
    expect(out.k).toBe(5);
    for (const key of ['alpha', 'alphaStandardized', 'meanInterItemR', 'omegaTotal', 'lambda2']) {
      expect(typeof out[key]).toBe('number');
    }
    // repair1 reversed equals traffic1 in every complete row: the covariance matrix is singular, so
    // Guttman's λ₆ (which needs its inverse) is not defined, and a warning says why.
    expect(out.lambda6).toBeNull();
    expect(out.warnings.join('\n')).toMatch(/Guttman's λ₆ is not reported: .*singular/);
    expect(out.alphaCI).toMatchObject({ method: 'feldt', level: 0.95 });
    expect(out.alphaCI.lower).toBeLessThan(out.alpha);
    expect(out.bootstrapCI).toMatchObject({ method: 'percentile bootstrap', resamples: 200, seed: 5 });
    expect(out.seed).toBe(5);
    expect(out.items.map((i: { name: string }) => i.name)).toEqual([
      'traffic1',
      'traffic2',
      'route1',
      'route2',
      'repair1',
    ]);
    for (const item of out.items) {
      for (const key of ['mean', 'sd', 'correctedItemTotal', 'alphaIfDeleted'])
        expect(typeof item[key]).toBe('number');
    }
    // repair1 reversed as 1 + 5 − x: p01's 2 becomes 4.
    expect(out.items[4].reversed).toBe(true);
    expect(out.items[3].missing).toBe(1);
    expect(out.warnings.some((w: string) => w.includes('left out 1 of 8'))).toBe(true);
    expect(out.data.sha256).toMatch(/^[0-9a-f]{64}$/);
  });

  it('table mode: an aligned table on stdout, warnings on stderr', () => {
    const run = cli('--data', good, '--items', 'traffic1,traffic2,route1', '--missing', 'pairwise');
    expect(run.code).toBe(0);
    expect(run.stdout).toMatch(/Cronbach’s α\s+\.\d{3} {2}(meets|below) \.70\*/);
    expect(run.stdout).toMatch(/Corrected item–total r/);
    for (const line of run.stdout.split('\n')) expect(line.length).toBeLessThanOrEqual(100);
    expect(run.stderr).toMatch(/^warning: only 8 respondents/);
  });

  it('exit 1: a non-numeric value is named by file, row and column', () => {
    const run = cli('--data', bad, '--items', 'traffic1,traffic2', '--json');
    expect(run.code).toBe(1);
    expect(run.stdout).toBe('');
    expect(run.stderr).toMatch(/^error: /);
    expect(run.stderr).toContain(`bad.csv, row 8, column 3 ('traffic2'): value "two" is not a number`);
    expect(run.stderr).not.toMatch(/\n\s+at /);
  });

  it('exit 1: an unknown item name', () => {
    const run = cli('--data', good, '--items', 'traffic1,route9');
    expect(run.code).toBe(1);
    expect(run.stderr).toMatch(/^error: .*no column named "route9"/);
  });

  it('exit 2: --reverse without --min/--max', () => {
    const run = cli('--data', good, '--items', 'traffic1,repair1', '--reverse', 'repair1');
    expect(run.code).toBe(2);
    expect(run.stderr).toMatch(/^error: --reverse needs the declared scale bounds --min and --max/);
  });

  it('lists the methods the run used, the bootstrap only when asked for', () => {
    const plain = JSON.parse(cli('--data', good, '--items', 'traffic1,traffic2,route1', '--json').stdout);
    const ids = plain.methods.map((m: { id: string }) => m.id);
    expect(ids).toEqual(expect.arrayContaining(['alpha.cronbach', 'alpha.feldt-ci', 'omega.total']));
    expect(ids).not.toContain('alpha.bootstrap-ci');
    // Eight respondents: the few-respondents rule (common practice) is cited with the warning it raised.
    expect(ids).toContain('reliability.few-respondents');
    const cronbach = plain.methods.find((m: { id: string }) => m.id === 'alpha.cronbach');
    expect(cronbach.reference).toContain('Psychometrika, 16(3), 297–334');
    const boot = JSON.parse(
      cli('--data', good, '--items', 'traffic1,traffic2,route1', '--bootstrap', '200', '--json').stdout,
    );
    expect(boot.methods.map((m: { id: string }) => m.id)).toContain('alpha.bootstrap-ci');
  });
});
