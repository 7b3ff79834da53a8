import fs from 'node:fs';
import path from 'node:path';
import { afterAll, beforeAll, describe, expect, it, vi } from 'vitest';
import { runCli } from '../../../../app/cli/main.ts';
import { tempDir } from '../../../helpers/tmp.ts';

/**
 * Numbers a double cannot hold (IEEE 754 binary64, the open standard for JavaScript numbers: a
 * 53-bit significand, nothing above about 1.8e308) in a `stats` data file: refused, or warned
 * about, naming the file, row and column. Runs the command line's entry point in this process.
 */
let tmp: ReturnType<typeof tempDir>;
beforeAll(() => {
  tmp = tempDir();
});
afterAll(() => tmp.cleanup());

async function cli(args: string[]): Promise<{ code: number; stdout: string; stderr: string }> {
  let stdout = '';
  let stderr = '';
  const out = vi.spyOn(process.stdout, 'write').mockImplementation((c) => {
    stdout += String(c);
    return true;
  });
  const err = vi.spyOn(process.stderr, 'write').mockImplementation((c) => {
    stderr += String(c);
    return true;
  });
  try {
    return { code: await runCli(args, { cwd: tmp.dir }), stdout, stderr };
  } finally {
    out.mockRestore();
    err.mockRestore();
  }
}

const ROWS = ['1,2,3', '2,3,4', '3,3,5', '4,5,4', '2,2,2', '5,4,5'];

describe('stats on numbers a double cannot hold', () => {
  it('refuses 1e999 naming file, row and column (exit 1)', async () => {
    fs.writeFileSync(path.join(tmp.dir, 'huge.csv'), `a,b,c\n${ROWS.join('\n')}\n3,1e999,4\n`);
    const run = await cli(['stats', 'reliability', '--data', 'huge.csv', '--items', 'a,b,c', '--json']);
    expect(run.code).toBe(1);
    expect(run.stderr).toMatch(
      /^error: huge\.csv, row 8, column .*'?b'?.*: '1e999' is beyond the largest number that can be held/,
    );
    expect(run.stderr.split('\n')).toHaveLength(2);
    expect(run.stderr).not.toMatch(/unexpected failure/);
  });

  it('warns, naming the cell, when a whole number above 2^53 is rounded', async () => {
    fs.writeFileSync(path.join(tmp.dir, 'wide.csv'), `a,b,c\n${ROWS.join('\n')}\n3,9007199254740993,4\n`);
    const run = await cli(['stats', 'reliability', '--data', 'wide.csv', '--items', 'a,b,c', '--json']);
    expect(run.code, run.stderr).toBe(0);
    const out = JSON.parse(run.stdout);
    expect(out.warnings.join('\n')).toMatch(
      /wide\.csv, row 8, .*'b'.*: 9007199254740993 cannot be held exactly and is read as 9007199254740992/,
    );
  });

  it('refuses --min 1e999 as a usage error', async () => {
    fs.writeFileSync(path.join(tmp.dir, 'plain.csv'), `a,b,c\n${ROWS.join('\n')}\n`);
    const run = await cli([
      'stats',
      'reliability',
      '--data',
      'plain.csv',
      '--items',
      'a,b,c',
      '--min',
      '1',
      '--max',
      '1e999',
    ]);
    expect(run.code).toBe(2);
    expect(run.stderr).toBe('error: --max must be a number (got "1e999")\n');
  });
});
