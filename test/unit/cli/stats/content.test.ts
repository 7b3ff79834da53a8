import { spawnSync } from 'node:child_process';
import { mkdtempSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { fileURLToPath } from 'node:url';
import { beforeAll, describe, expect, it } from 'vitest';
import { parseCommand } from '../../../../app/cli/command.ts';
import { content } from '../../../../app/cli/stats/content.ts';
import { DataError, UsageError } from '../../../../app/cli/types.ts';

const ROOT = fileURLToPath(new URL('../../../..', import.meta.url));
let dir = '';

function file(name: string, text: string): string {
  const path = join(dir, name);
  writeFileSync(path, text);
  return path;
}

// Invented panel: six experts rate three items of the Everyday Cycling Confidence pool.
const PANEL = [
  'item,expert,relevance,essential,facet',
  ...['4,yes', '4,yes', '3,yes', '4,yes', '3,no', '4,yes'].map((v, e) => `tc1,E${e + 1},${v},traffic`),
  ...['3,yes', '2,no', '4,yes', '2,no', '4,yes', ',yes'].map((v, e) => `rp1,E${e + 1},${v},routes`),
  ...['4,yes', '4,yes', '4,yes', '4,yes', '4,yes', '4,yes'].map((v, e) => `rr1,E${e + 1},${v},repairs`),
].join('\n');

beforeAll(() => {
  dir = mkdtempSync(join(tmpdir(), 'scalewright-content-'));
  file('panel.csv', PANEL);
  file('facets.csv', 'item,facet\ntc1,traffic\nrp1,routes\nrr1,repairs\n');
  file('no-essential.tsv', 'item\texpert\trelevance\ntc1\tE1\t4\ntc1\tE2\t3\ntc1\tE3\t4\n');
  file('wide.csv', 'item,E1,E2,E3\ntc1,4,3,4\nrp1,2,4,\n');
  file('out-of-range.csv', 'item,expert,relevance\ntc1,E1,4\ntc1,E2,5\n');
  file('wrong-columns.csv', 'item,rater,relevance\ntc1,E1,4\n');
  file('duplicate.csv', 'item;expert;relevance\ntc1;E1;4\ntc1;E2;3\ntc1;E1;2\n');
  file('non-numeric.csv', 'item,expert,relevance\ntc1,E1,very\n');
  file('empty.csv', '');
});

/** Runs the CLI from the project root; file names in `args` ending in .csv or .tsv are taken from the temp folder. */
function cli(args: string[]): { status: number | null; stdout: string; stderr: string } {
  const resolved = args.map((a) => (/\.(csv|tsv)$/.test(a) ? join(dir, a) : a));
  const result = spawnSync('npx', ['tsx', 'app/cli/main.ts', 'stats', 'content', ...resolved], {
    cwd: ROOT,
    encoding: 'utf8',
  });
  return { status: result.status, stdout: result.stdout, stderr: result.stderr };
}

describe('stats content (spawned CLI)', () => {
  it('lists the methods the run used with their references, CVR and kappas only when computed', () => {
    const withAll = JSON.parse(
      cli(['--ratings', 'panel.csv', '--item-facets', 'facets.csv', '--json']).stdout,
    );
    const ids = withAll.methods.map((m: { id: string }) => m.id);
    expect(ids).toEqual(expect.arrayContaining(['content.i-cvi', 'content.modified-kappa', 'content.cvr']));
    expect(ids).toContain('agreement.fleiss-kappa');
    const lynn = withAll.methods.find((m: { id: string }) => m.id === 'content.i-cvi');
    // Lynn (1986), Nursing Research 35(6), 382–385.
    expect(lynn.reference).toContain(
      'Lynn, M. R. (1986). Determination and quantification of content validity.',
    );
    const plain = JSON.parse(cli(['--ratings', 'no-essential.tsv', '--json']).stdout);
    const plainIds = plain.methods.map((m: { id: string }) => m.id);
    expect(plainIds).not.toContain('content.cvr');
    expect(plainIds).not.toContain('agreement.fleiss-kappa');
  });

  it('prints exactly one JSON object with the contract fields and exits 0', () => {
    const r = cli(['--ratings', 'panel.csv', '--item-facets', 'facets.csv', '--json']);
    expect(r.status).toBe(0);
    const lines = r.stdout.trim().split('\n');
    expect(lines).toHaveLength(1);
    const json = JSON.parse(lines[0]);
    expect(json.experts).toBe(6);
    expect(json.items.map((it: { item: string }) => it.item)).toEqual(['tc1', 'rp1', 'rr1']);
    const rp1 = json.items[1];
    // rp1: 5 experts rated, 3 relevant → I-CVI .60; Pc = C(5,3)/32; CVR with 6 essential answers, 4 yes.
    expect(rp1.iCvi).toBeCloseTo(0.6, 15);
    expect(rp1.modifiedKappa).toBeCloseTo((0.6 - 10 / 32) / (1 - 10 / 32), 15);
    expect(rp1.cvr).toBeCloseTo(1 / 3, 15);
    expect(rp1.aikenV).toBeCloseTo(10 / 15, 15);
    expect(json.sCviAve).toBeCloseTo((1 + 0.6 + 1) / 3, 15);
    expect(json.sCviUa).toBeCloseTo(2 / 3, 15);
    expect(json.cvrCritical).toBe(1);
    expect(json.warnings).toEqual([
      'relevance ratings missing for 1 item (rp1): each statistic uses the experts who rated the item',
    ]);
    expect(json.facetSorting.itemsUsed).toBe(3);
    expect(r.stderr).toBe('');
  }, 60_000);

  it('prints a readable table and sends warnings to stderr without --json', () => {
    const r = cli(['--ratings', 'panel.csv']);
    expect(r.status).toBe(0);
    expect(r.stdout).toMatch(/S-CVI\/Ave \.87 {3}S-CVI\/UA \.67/);
    expect(r.stdout).toMatch(/rp1: I-CVI \.60 below 1\.00/);
    expect(r.stderr).toMatch(/^warning: relevance ratings missing/m);
  }, 60_000);

  it('gives cvr null and a warning without an essential column', () => {
    const r = cli(['--ratings', 'no-essential.tsv', '--json']);
    expect(r.status).toBe(0);
    const json = JSON.parse(r.stdout);
    expect(json.items[0].cvr).toBeNull();
    expect(json.cvrCritical).toBeNull();
    expect(json.warnings.join('\n')).toMatch(/no essential column: CVR not computed/);
  }, 60_000);

  it.each([
    [
      'out-of-range.csv',
      [],
      /^error: \S*out-of-range\.csv: row 3, column 3 \('relevance'\): rating 5 is outside/,
    ],
    [
      'wrong-columns.csv',
      [],
      /^error: \S*wrong-columns\.csv: row 1, column 2 \('rater'\): unexpected column/,
    ],
    [
      'duplicate.csv',
      [],
      /^error: \S*duplicate\.csv: row 4, column 2 \('expert'\): expert 'E1' already rated/,
    ],
    [
      'non-numeric.csv',
      [],
      /^error: \S*non-numeric\.csv: row 2, column 3 \('relevance'\): 'very' is not a number/,
    ],
    ['empty.csv', [], /^error: file "\S*empty\.csv" is empty/],
    [
      'panel.csv',
      ['--items', 'tc1,rr1'],
      /^error: \S*panel\.csv: row 8, column 1 \('item'\): item 'rp1' is not in/,
    ],
  ])(
    'refuses %s with exit 1 and one error line',
    (name, extra, message) => {
      const r = cli(['--ratings', name, ...extra, '--json']);
      expect(r.status).toBe(1);
      expect(r.stdout).toBe('');
      expect(r.stderr).toMatch(message);
      expect(r.stderr.trim().split('\n')).toHaveLength(1);
    },
    60_000,
  );

  it('exits 2 on usage mistakes', () => {
    const missing = cli(['--json']);
    expect(missing.status).toBe(2);
    expect(missing.stderr).toMatch(/^error: --ratings FILE is required/);
    expect(cli(['--ratings', 'panel.csv', '--scale-min', '4', '--scale-max', '1']).status).toBe(2);
  }, 60_000);
});

describe('stats content (in process)', () => {
  const run = (values: Record<string, string>) => content.run(values, { cwd: dir });

  it('reads the wide layout', async () => {
    const result = await run({ ratings: 'wide.csv' });
    expect(result.json.layout).toBe('wide');
    const items = result.json.items as { item: string; iCvi: number; missing: number }[];
    expect(items[1]).toMatchObject({ item: 'rp1', iCvi: 0.5, missing: 1 });
  });

  it('generalizes the relevant half to other scales', async () => {
    const result = await run({ ratings: 'no-essential.tsv', 'scale-min': '1', 'scale-max': '5' });
    const items = result.json.items as { iCvi: number }[];
    // On 1–5 only 4 and 5 count as relevant: ratings 4, 3, 4 → 2/3.
    expect(items[0].iCvi).toBeCloseTo(2 / 3, 15);
    expect(result.table).toMatch(/relevant = 4–5/);
  });

  it('refuses options that do not apply and names the missing file', async () => {
    const spec = { ...content, name: 'stats content' };
    expect(() => parseCommand(spec, ['--ratings', 'panel.csv', '--data', 'x.csv'])).toThrow(UsageError);
    expect(() => parseCommand(spec, ['--ratings', 'panel.csv', '--min', '1'])).toThrow(
      /--min does not apply to stats content: .*--scale-min and --scale-max/,
    );
    await expect(run({ ratings: 'absent.csv' })).rejects.toThrow(DataError);
    await expect(run({ ratings: 'absent.csv' })).rejects.toThrow(
      'cannot read ratings file "absent.csv": no such file',
    );
  });
});
