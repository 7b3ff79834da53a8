import { spawnSync } from 'node:child_process';
import { mkdtempSync, readFileSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { fileURLToPath } from 'node:url';
import { beforeAll, describe, expect, it } from 'vitest';
import { parseCommand } from '../../../../app/cli/command.ts';
import { cfa, parseModelFile } from '../../../../app/cli/stats/cfa.ts';
import { icc } from '../../../../app/cli/stats/icc.ts';
import { DataError } from '../../../../app/cli/types.ts';

const ROOT = fileURLToPath(new URL('../../../..', import.meta.url));
// Reference fixtures: test/reference/cfa.py (scipy optimizer) and test/reference/validity.py (scipy).
const cfaFixture = JSON.parse(
  readFileSync(new URL('../../../reference/fixtures/cfa.json', import.meta.url), 'utf8'),
);
const validityFixture = JSON.parse(
  readFileSync(new URL('../../../reference/fixtures/validity.json', import.meta.url), 'utf8'),
);
let dir = '';

function file(name: string, text: string): string {
  const path = join(dir, name);
  writeFileSync(path, text);
  return path;
}

beforeAll(() => {
  dir = mkdtempSync(join(tmpdir(), 'scalewright-cfa-'));
  const names: string[] = cfaFixture.names;
  // The fixture's responses, with an invented riding-area column for the invariance test.
  file(
    'ecc.csv',
    [
      `id,area,${names.join(',')}`,
      ...cfaFixture.data.map(
        (row: number[], i: number) => `r${i + 1},${i % 2 ? 'north' : 'south'},${row.join(',')}`,
      ),
    ].join('\n'),
  );
  file('model.json', JSON.stringify({ factors: cfaFixture.models.threeFactors.factors }));
  file(
    'model-resid.json',
    JSON.stringify({
      factors: cfaFixture.models.withResidualCovariance.factors,
      residualCovariances: [{ a: 'c8', b: 'c9', rationale: 'both items mention night riding' }],
    }),
  );
  file('unknown-column.json', JSON.stringify({ factors: { A: ['c1', 'c2', 'c99'] } }));
  file('not-json.json', '{"factors": {"A": ["c1", "c2"\n');
  file(
    'retest.csv',
    [
      'id,t1,t2,t3',
      ...validityFixture.icc.retest.data.map((r: number[], i: number) => `p${i},${r.join(',')}`),
    ].join('\n'),
  );
  file('retest-gaps.csv', 'id,t1,t2\np1,3,4\np2,,5\np3,5,5\np4,2,3\np5,4,4\n');
});

function cli(args: string[]): { status: number | null; stdout: string; stderr: string } {
  const resolved = args.map((a) => (/\.(csv|json)$/.test(a) ? join(dir, a) : a));
  const result = spawnSync('npx', ['tsx', 'app/cli/main.ts', 'stats', ...resolved], {
    cwd: ROOT,
    encoding: 'utf8',
  });
  return { status: result.status, stdout: result.stdout, stderr: result.stderr };
}

describe('stats cfa (spawned CLI)', () => {
  it('prints one JSON object with the contract fields, matching the scipy fixture', () => {
    const r = cli(['cfa', '--data', 'ecc.csv', '--model', 'model.json', '--json']);
    expect(r.status).toBe(0);
    const out = JSON.parse(r.stdout);
    const e = cfaFixture.models.threeFactors.expected;
    expect(out.n).toBe(400);
    expect(out.df).toBe(e.df);
    expect(Math.abs(out.chiSquare - e.chiSquare) / e.chiSquare).toBeLessThan(1e-7);
    for (const k of ['cfi', 'tli', 'rmsea', 'srmr']) expect(Math.abs(out[k] - e[k])).toBeLessThan(1e-7);
    expect(Math.abs(out.rmseaCI[0] - e.rmseaCI[0])).toBeLessThan(1e-6);
    expect(Math.abs(out.p - e.p) / e.p).toBeLessThan(1e-5);
    expect(Object.keys(out.standardizedLoadings)).toEqual(cfaFixture.names);
    expect(Math.abs(out.standardizedLoadings.c1 - e.standardizedLoadings[0])).toBeLessThan(1e-4);
    expect(out.factorCorrelations).toHaveLength(3);
    expect(Object.keys(out.compositeReliability)).toEqual(['A', 'B', 'C']);
    expect(Object.keys(out.ave)).toEqual(['A', 'B', 'C']);
    expect(out.htmt.map((h: { a: string; b: string }) => `${h.a}-${h.b}`)).toEqual(['A-B', 'A-C', 'B-C']);
    expect(out.methods.map((m: { id: string }) => m.id)).toContain('fit.cfi');
    expect(out.warnings).toEqual([]);
  });

  it('fits a residual covariance from the model file and tests invariance across --group', () => {
    const r = cli(['cfa', '--data', 'ecc.csv', '--model', 'model-resid.json', '--group', 'area', '--json']);
    expect(r.status).toBe(0);
    const out = JSON.parse(r.stdout);
    const e = cfaFixture.models.withResidualCovariance.expected;
    expect(Math.abs(out.chiSquare - e.chiSquare) / e.chiSquare).toBeLessThan(1e-7);
    expect(out.invariance.groups).toEqual(['north', 'south']);
    expect(out.invariance.steps.map((s: { step: string }) => s.step)).toEqual([
      'configural',
      'metric',
      'scalar',
    ]);
    expect(out.invariance.statement).toMatch(/invariance was reached|Not even configural/);
  });

  it('prints tables no wider than 100 columns, with the caution', () => {
    const r = cli(['cfa', '--data', 'ecc.csv', '--model', 'model.json', '--group', 'area']);
    expect(r.status).toBe(0);
    for (const line of r.stdout.split('\n')) expect([...line].length).toBeLessThanOrEqual(100);
    expect(r.stdout).toMatch(/not validated for diagnosis, hiring, admission/);
  });

  it('exits 1 naming the column a model names that the data lack, and 2 on usage errors', () => {
    const unknown = cli(['cfa', '--data', 'ecc.csv', '--model', 'unknown-column.json']);
    expect(unknown.status).toBe(1);
    expect(unknown.stderr).toMatch(
      /^error: the model in .*unknown-column.json names a column the data lack: .*"c99"/,
    );
    const help = cli(['cfa', '--help']);
    expect(help.status).toBe(0);
    expect(help.stdout).toMatch(/^usage: scalewright stats cfa/);
  });
});

describe('stats cfa (in process): the model file is checked, saying what and where', () => {
  const run = (values: Record<string, string>) => cfa.run(values, { cwd: dir });

  it('names invalid JSON and wrong shapes', async () => {
    await expect(run({ data: 'ecc.csv', model: 'not-json.json' })).rejects.toThrow(
      /not-json.json is not valid JSON/,
    );
    expect(() => parseModelFile('m.json', '[]')).toThrow('m.json: the model must be a JSON object');
    expect(() => parseModelFile('m.json', '{"factor": {}}')).toThrow('unknown key "factor"');
    expect(() => parseModelFile('m.json', '{"factors": {}}')).toThrow('"factors" names no factor');
    expect(() => parseModelFile('m.json', '{"factors": {"A": ["c1", 2]}}')).toThrow(
      'factors.A[1] must be a column name',
    );
    expect(() => parseModelFile('m.json', '{"factors": {"A": ["c1"]}, "orthogonal": "yes"}')).toThrow(
      '"orthogonal" must be true or false',
    );
    expect(() =>
      parseModelFile(
        'm.json',
        '{"factors": {"A": ["c1", "c2"]}, "residualCovariances": [{"a": "c1", "b": "c7"}]}',
      ),
    ).toThrow('names "c7", which no factor lists');
    expect(() => parseModelFile('m.json', '{"factors": {"A": ["c1", "c1"]}}')).toThrow(
      'lists item "c1" twice',
    );
    expect(() => parseModelFile('m.json', '{"factors": {"A": ["c1"]}, "residualCovariances": {}}')).toThrow(
      '"residualCovariances" must be an array',
    );
  });

  it('refuses options that do not apply, and asks for the model', async () => {
    await expect(run({ data: 'ecc.csv' })).rejects.toThrow(/^--model FILE.json is required/);
    expect(() =>
      parseCommand({ ...cfa, name: 'stats cfa' }, [
        '--data',
        'ecc.csv',
        '--model',
        'm.json',
        '--items',
        'c1',
      ]),
    ).toThrow(/--items does not apply to stats cfa: the items come from the model file/);
    await expect(run({ data: 'ecc.csv', model: 'model.json', missing: 'pairwise' })).rejects.toThrow(
      'complete cases only',
    );
    await expect(run({ data: 'ecc.csv', model: 'model.json', group: 'c1' })).rejects.toThrow(
      'is an item of the model',
    );
    await expect(run({ data: 'ecc.csv', model: 'model.json', group: 'region' })).rejects.toThrow(DataError);
  });
});

describe('stats icc', () => {
  it('prints the six forms with the contract fields, matching the scipy fixture', () => {
    const r = cli(['icc', '--data', 'retest.csv', '--columns', 't1,t2,t3', '--json']);
    expect(r.status).toBe(0);
    const out = JSON.parse(r.stdout);
    expect(out.n).toBe(40);
    expect(out.k).toBe(3);
    expect(out.forms.map((f: { form: string }) => f.form)).toEqual([
      'ICC(1,1)',
      'ICC(2,1)',
      'ICC(3,1)',
      'ICC(1,k)',
      'ICC(2,k)',
      'ICC(3,k)',
    ]);
    for (const f of out.forms) {
      const e = validityFixture.icc.retest.expected[f.form];
      for (const k of ['value', 'lower', 'upper', 'F', 'df1', 'df2'])
        expect(Math.abs(f[k] - e[k])).toBeLessThan(1e-7);
      expect(Object.keys(f)).toEqual([
        'form',
        'model',
        'type',
        'unit',
        'value',
        'lower',
        'upper',
        'F',
        'df1',
        'df2',
        'p',
      ]);
    }
    expect(out.measurementError.basis).toBe('ICC(2,1)');
    expect(out.methods.map((m: { id: string }) => m.id)).toEqual([
      'icc.shrout-fleiss',
      'icc.mcgraw-wong-ci',
      'icc.sem',
      'icc.mdc95',
    ]);
  });

  it('drops incomplete targets with a warning, and refuses what it cannot use', async () => {
    const out = await icc.run({ data: 'retest-gaps.csv', columns: 't1,t2' }, { cwd: dir });
    expect(out.json.n).toBe(4);
    expect(out.warnings.join(' ')).toMatch(/1 target\(s\) with a missing rating were left out/);
    await expect(icc.run({ data: 'retest.csv', columns: 't1' }, { cwd: dir })).rejects.toThrow(
      'at least two',
    );
    expect(() =>
      parseCommand({ ...icc, name: 'stats icc' }, ['--data', 'retest.csv', '--items', 't1,t2']),
    ).toThrow('--columns');
    await expect(icc.run({ data: 'retest.csv', columns: 't1,t9' }, { cwd: dir })).rejects.toThrow(
      'no column named "t9"',
    );
    await expect(icc.run({ data: 'retest.csv' }, { cwd: dir })).rejects.toThrow(/^--columns is required/);
  });
});
