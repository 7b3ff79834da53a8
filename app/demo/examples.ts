import { writeFileSync } from 'node:fs';
import path from 'node:path';
import {
  DEMO_ATTENTION_ANSWER,
  DEMO_COLUMNS,
  DEMO_MISSING_CODE,
  DEMO_PILOT_ITEMS,
  DEMO_PILOT_SEED,
  generateDemoPilot,
} from './pilot.ts';
import { demoRoundOneFile } from './review.ts';

/** Seed of the example data file: a second invented sample from the demo's population model. */
export const DEMO_EXAMPLE_SEED = DEMO_PILOT_SEED + 1;

/** The map file the README's `project import` uses for the example wave. */
export const DEMO_EXAMPLE_MAP = {
  name: 'Validation wave, autumn (demo)',
  columns: {
    [DEMO_COLUMNS.attention]: { attention: DEMO_ATTENTION_ANSWER },
    [DEMO_COLUMNS.criterion]: 'criterion',
    [DEMO_COLUMNS.group]: 'group',
    [DEMO_COLUMNS.retestLink]: 'ignored',
  },
  missing: [DEMO_MISSING_CODE],
};

/** A measurement model for `stats cfa`: each facet's items (the pilot's items, by facet code). */
function demoModel(): string {
  const factors: Record<string, string[]> = {};
  for (const item of DEMO_PILOT_ITEMS) {
    const facet = item.code.slice(0, 2);
    factors[facet] = [...(factors[facet] ?? []), item.code];
  }
  return `${JSON.stringify({ factors }, null, 2)}\n`;
}

/** Rows of a plain CSV file (no quoted fields) as records by header name. */
function records(csv: string): Record<string, string>[] {
  const [header, ...rows] = csv.trim().split('\n');
  const names = header.split(',');
  return rows.map((row) => Object.fromEntries(row.split(',').map((cell, i) => [names[i], cell])));
}

/**
 * For `stats icc`: each retested respondent's sum over the traffic-confidence items in the pilot
 * and three weeks later (blank when an answer is missing), linked by the retest code.
 */
function demoRetestTotals(): string {
  const demo = generateDemoPilot();
  const items = DEMO_PILOT_ITEMS.filter((it) => it.code.startsWith('TR')).map((it) => it.code);
  const total = (row: Record<string, string>) => {
    const values = items.map((code) => Number(row[code]));
    return values.some((v) => !Number.isFinite(v) || v === DEMO_MISSING_CODE)
      ? ''
      : String(values.reduce((a, b) => a + b, 0));
  };
  const pilot = new Map(
    records(demo.pilotCsv)
      .filter((r) => r[DEMO_COLUMNS.retestLink])
      .map((r) => [r[DEMO_COLUMNS.retestLink], r]),
  );
  const lines = ['retest_code,traffic_pilot,traffic_retest'];
  for (const later of records(demo.retestCsv)) {
    const first = pilot.get(later.retest_code);
    if (first) lines.push(`${later.retest_code},${total(first)},${total(later)}`);
  }
  return `${lines.join('\n')}\n`;
}

/**
 * The invented example files the README's command-line section runs on (kept in assets/examples/,
 * checked against this generator by a test): a second wave of the demo's respondents, the demo
 * panel's first-round ratings, the map file for importing the wave, a four-facet model for the
 * wave, and the demo's pilot and retest totals of one facet.
 */
export function demoExampleFiles(): Record<string, string> {
  return {
    'validation-wave.csv': generateDemoPilot(DEMO_EXAMPLE_SEED).pilotCsv,
    'ratings.csv': demoRoundOneFile(),
    'map.json': `${JSON.stringify(DEMO_EXAMPLE_MAP, null, 2)}\n`,
    'model.json': demoModel(),
    'retest-totals.csv': demoRetestTotals(),
  };
}

/** `npx tsx app/demo/examples.ts` writes the files into assets/examples/. */
const isMain =
  process.argv[1] !== undefined &&
  path.resolve(process.argv[1]) === path.resolve(new URL(import.meta.url).pathname);
if (isMain) {
  const folder = new URL('../../assets/examples/', import.meta.url).pathname;
  for (const [name, text] of Object.entries(demoExampleFiles())) writeFileSync(path.join(folder, name), text);
}
