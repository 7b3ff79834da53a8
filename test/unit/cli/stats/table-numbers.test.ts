import { describe, expect, it } from 'vitest';
import { runCli } from '../../../helpers/cli.ts';

// The trade's convention (common practice in reporting style guides for the behavioural sciences):
// a statistic that cannot exceed 1 in magnitude is printed without a leading zero, p never in
// exponent notation. These runs use the invented example files in assets/examples/.
const EXAMPLES = 'assets/examples';
const WAVE = `${EXAMPLES}/validation-wave.csv`;
const EIGHT = ['--items', 'TR01,TR02,TR03,TR04,RP01,RP02,RP03,RP04', '--missing-codes', '-9'];

/** A bounded statistic as the formatter prints it: `.842`, `−.120`, `1.00`, or the dash. */
const BOUNDED = /^(−?\.\d{2,4}|−?1\.\d{2,4}|–)$/;
/** Exponent notation anywhere: `7.39e-7`, `1E+21`. */
const EXPONENT = /\d[eE][+-]?\d/;

function table(args: string[]): string {
  const run = runCli(args);
  expect(run.stderr).not.toMatch(/^error:/m);
  expect(run.code).toBe(0);
  expect(run.stdout).not.toMatch(EXPONENT);
  expect(run.stdout).not.toMatch(/(^|[\s(])-\d/m); // negative numbers use the minus sign
  // a recalled source says so in its numbered note, never in the middle of a sentence
  expect(run.stdout.replace(/\[Details\s+from\s+memory\.\]/g, '')).not.toMatch(/from memory/i);
  return run.stdout;
}

/** The cells of the table rows whose first cell matches `first`, split on runs of 2+ spaces. */
function rows(text: string, first: RegExp): string[][] {
  return text
    .split('\n')
    .map((line) => line.trim().split(/\s{2,}/))
    .filter((cells) => first.test(cells[0]));
}

function expectBounded(cells: string[]): void {
  expect(cells.length).toBeGreaterThan(0);
  for (const cell of cells) expect(cell, cell).toMatch(BOUNDED);
}

describe('command-line tables print numbers in the trade style', () => {
  it('stats cfa: fit indices, standardized loadings, CR/AVE, factor correlations and HTMT', () => {
    const out = table([
      'stats',
      'cfa',
      '--data',
      WAVE,
      '--model',
      `${EXAMPLES}/model.json`,
      '--missing-codes',
      '-9',
    ]);
    for (const index of ['CFI', 'TLI', 'RMSEA', 'SRMR']) {
      const [cells] = rows(out, new RegExp(`^${index}$`));
      expectBounded([cells[0] === index ? cells[1].split(/\s+/)[0] : '']);
    }
    const loadings = rows(out, /^(TR|RP|BH|RR)\d\d$/);
    expect(loadings.length).toBe(31);
    expectBounded(loadings.flatMap((c) => c.slice(4, 7)));
    const reliability = rows(out, /^(TR|RP|BH|RR)$/).filter((c) => c.length === 6);
    expectBounded(reliability.flatMap((c) => c.slice(1, 5)));
    const correlations = rows(out, /^(TR|RP|BH|RR)$/).filter((c) => c.length === 5);
    expectBounded(correlations.flatMap((c) => c.slice(1)));
    expect(out).toMatch(/p = \.\d{3}|p < \.001/);
  });

  it('stats icc: the coefficients and their intervals', () => {
    const out = table([
      'stats',
      'icc',
      '--data',
      `${EXAMPLES}/retest-totals.csv`,
      '--columns',
      'traffic_pilot,traffic_retest',
    ]);
    const forms = rows(out, /^ICC\(/);
    expect(forms.length).toBe(6);
    expectBounded(forms.flatMap((c) => [c[4], ...c[5].split(' to ')]));
    for (const c of forms) expect(c[9]).toMatch(/^(< \.001|\.\d{3}|1\.000)$/);
  });

  it('stats dimensionality: KMO, the determinant without exponent, MAP averages', () => {
    const out = table(['stats', 'dimensionality', '--data', WAVE, ...EIGHT, '--iterations', '20']);
    expectBounded([out.match(/KMO (\S+)/)?.[1] ?? '']);
    expect(out).toMatch(/determinant of R: \.\d+\n/);
    const map = rows(out, /^[1-8]$/);
    expect(map.length).toBe(8);
    expectBounded(map.flatMap((c) => c.slice(-2)));
  });

  it('stats efa: loadings, communalities, factor correlations, fit and omega', () => {
    const out = table(['stats', 'efa', '--data', WAVE, ...EIGHT, '--factors', '2']);
    const items = rows(out, /^(TR|RP)\d\d$/);
    expect(items.length).toBe(8);
    expectBounded(items.flatMap((c) => c.slice(1, 4)));
    expectBounded(
      rows(out, /^F\d$/)
        .filter((c) => c.length === 3)
        .flatMap((c) => c.slice(1)),
    );
    const fit = out.match(/RMSEA (\S+) \(90% CI (\S+) to (\S+)\); TLI (\S+)/);
    expectBounded(fit?.slice(1) ?? []);
    expectBounded([...out.matchAll(/omega (?:hierarchical|total) ([^,\s]+)/g)].map((m) => m[1]));
  });

  it('stats polychoric: the correlation matrix', () => {
    const out = table(['stats', 'polychoric', '--data', WAVE, ...EIGHT]);
    const matrix = rows(out, /^\d \w+$/);
    expect(matrix.length).toBe(8);
    expectBounded(matrix.flatMap((c) => c.slice(1)));
  });
});
