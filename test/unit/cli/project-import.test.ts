import { createHash } from 'node:crypto';
import fs from 'node:fs';
import path from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { DEMO_PILOT_FILE, generateDemoPilot } from '../../../app/demo/pilot.ts';
import { missingCodesOf } from '../../../app/cli/project-import.ts';
import { listDatasets, loadDatasetFile } from '../../../db/repos/datasets.ts';
import { Study } from '../../../db/study.ts';
import { runCli } from '../../helpers/cli.ts';
import { TEST_ACTOR, tempDir } from '../../helpers/tmp.ts';
import DEMO_REFERENCE from '../../reference/fixtures/demo-pilot.json' with { type: 'json' };
import { createDemo } from '../../helpers/demo.ts';

let tmp: ReturnType<typeof tempDir>;
let studyFile: string;
let pilotFile: string;
const demo = generateDemoPilot();

beforeAll(() => {
  tmp = tempDir();
  studyFile = path.join(tmp.dir, 'demo.scalewright');
  // The demo before its validation wave: purification open, no validation data yet.
  createDemo(studyFile, 'purification');
  pilotFile = path.join(tmp.dir, DEMO_PILOT_FILE);
  fs.writeFileSync(pilotFile, demo.pilotCsv);
}, 60_000);
afterAll(() => tmp.cleanup());

function write(name: string, text: string): string {
  const file = path.join(tmp.dir, name);
  fs.writeFileSync(file, text);
  return file;
}

function datasets(): number {
  const study = Study.open(studyFile, { actor: TEST_ACTOR, app: 'test', mode: 'read' });
  try {
    return listDatasets(study).length;
  } finally {
    study.close();
  }
}

describe('project import', () => {
  it('imports validation data with a map file, printing one JSON object, and stores the file byte for byte', () => {
    const map = write(
      'map.json',
      JSON.stringify({
        name: 'Validation wave',
        columns: {
          att_check: { attention: 4 },
          trips_4wk: 'criterion',
          cyclist_type: 'group',
          retest_code: { role: 'ignored' },
        },
        missing: [-9, 'NA'],
      }),
    );
    const before = datasets();
    const run = runCli([
      'project',
      'import',
      studyFile,
      '--data',
      pilotFile,
      '--role',
      'validation',
      '--map',
      map,
      '--json',
    ]);
    expect(run.code).toBe(0);
    expect(run.stdout.trim().split('\n')).toHaveLength(1);
    const out = JSON.parse(run.stdout);
    expect(out).toMatchObject({
      role: 'validation',
      name: 'Validation wave',
      fileName: DEMO_PILOT_FILE,
      respondents: 480,
      excluded: 0,
      encoding: 'utf-8',
      delimiter: 'comma',
      decimalMark: '.',
      missingCodes: { text: ['NA'], numeric: [-9] },
      bounds: { min: 1, max: 5 },
      problemCount: 0,
      // The study's first validation data becomes current by default.
      current: true,
      currentDataset: { id: out.datasetId, name: 'Validation wave' },
    });
    // SHA-256 as node:crypto computes it over the file the user gave.
    expect(out.sha256).toBe(createHash('sha256').update(fs.readFileSync(pilotFile)).digest('hex'));
    expect(out.columns.filter((c: { role: string }) => c.role === 'item')).toHaveLength(31);
    expect(out.columns.find((c: { name: string }) => c.name === 'att_check')).toEqual({
      name: 'att_check',
      role: 'attention',
      correctAnswer: '4',
    });
    expect(out.warnings).toContain(
      'the same file (same SHA-256) was imported before as dataset 1 "Pilot survey, spring (demo)" (pilot)',
    );
    expect(datasets()).toBe(before + 1);
    const study = Study.open(studyFile, { actor: TEST_ACTOR, app: 'test', mode: 'read' });
    try {
      expect(
        Buffer.from(loadDatasetFile(study, out.datasetId) ?? []).equals(fs.readFileSync(pilotFile)),
      ).toBe(true);
      expect(study.log.list({ limit: 2 })).toMatchObject([
        { phase: 'validity', kind: 'dataset-made-current' },
        { phase: 'validity', kind: 'dataset-imported' },
      ]);
    } finally {
      study.close();
    }
  });

  it('prints a readable summary without --json, warnings on stderr', () => {
    const map = write('map-table.json', JSON.stringify({ missing: ['-9'], acceptProblems: true }));
    const run = runCli([
      'project',
      'import',
      studyFile,
      '--data',
      pilotFile,
      '--role',
      'validation',
      '--map',
      map,
    ]);
    expect(run.code).toBe(0);
    expect(run.stdout).toMatch(
      /^imported validation data "cycling-confidence-pilot" into .* as dataset \d+\n/,
    );
    expect(run.stdout).toMatch(/480 respondents, 0 excluded; columns: 31 items, id 'respondent_id'/);
    expect(run.stdout).toMatch(/missing-value codes: blank, -9; declared scale 1 to 5/);
    // Missing answers of TR01 as counted by test/reference/demo_pilot.py (Python's csv module).
    expect(run.stdout).toMatch(new RegExp(`\\nTR01 +item +TR01 +${DEMO_REFERENCE.missingPerItem[0]}\\n`));
    expect(run.stderr).toMatch(/^warning: the same file \(same SHA-256\) was imported before/m);
  });

  it('refuses a file with undeclared codes, naming row and column, and leaves the study unchanged', () => {
    const before = datasets();
    const run = runCli(['project', 'import', studyFile, '--data', pilotFile, '--role', 'validation']);
    expect(run.code).toBe(1);
    expect(run.stdout).toBe('');
    expect(run.stderr).toMatch(
      /^error: cycling-confidence-pilot\.csv was not imported: \d+ cells need a look, the first at row \d+, column '[A-Z]{2}\d\d': value -9 is outside the declared scale 1 to 5 .*declare missing-value codes in the map file .*"acceptProblems": true.*\n$/,
    );
    expect(datasets()).toBe(before);
  });

  it('refuses a signed-off phase and a file that is not a table, with one error line and no trace', () => {
    const before = datasets();
    const signed = runCli(['project', 'import', studyFile, '--data', pilotFile, '--role', 'pilot']);
    expect(signed.code).toBe(1);
    expect(signed.stderr).toBe(
      'error: the Pilot data phase is signed off; reopen it (with a reason) before importing pilot data\n',
    );
    const broken = write('broken.csv', 'respondent_id,TR01,TR02\nr1,"2,3\nr2,4,5\n');
    const run = runCli(['project', 'import', studyFile, '--data', broken, '--role', 'validation', '--json']);
    expect(run.code).toBe(1);
    expect(run.stdout).toBe('');
    expect(run.stderr).toMatch(
      /^error: .*broken\.csv: row 2, column 2 \('TR01'\).*a quoted field is opened and never closed\n$/,
    );
    expect(run.stderr).not.toMatch(/\n\s+at /);
    expect(datasets()).toBe(before);
  });

  it('treats a wrong call or a malformed map file as a usage error (exit 2)', () => {
    const badMap = write('bad-map.json', JSON.stringify({ columns: { TR01: { itme: 'TR01' } } }));
    const notJson = write('not-json.json', '{ columns: ');
    const unknownKey = write('unknown-key.json', JSON.stringify({ colums: {} }));
    const cases: [string[], RegExp][] = [
      [['project', 'import', studyFile, '--role', 'pilot'], /needs --data FILE/],
      [['project', 'import', studyFile, '--data', pilotFile], /needs --role pilot, validation or retest/],
      [['project', 'import', studyFile, '--data', pilotFile, '--role', 'final'], /\(got "final"\)/],
      [['project', 'import', '--data', pilotFile, '--role', 'pilot'], /needs the study FILE/],
      [
        ['project', 'import', studyFile, '--data', pilotFile, '--role', 'retest', '--map', badMap],
        /at columns\.TR01: give a role/,
      ],
      [
        ['project', 'import', studyFile, '--data', pilotFile, '--role', 'retest', '--map', notJson],
        /is not JSON/,
      ],
      [
        ['project', 'import', studyFile, '--data', pilotFile, '--role', 'retest', '--map', unknownKey],
        /colums/,
      ],
      [
        ['project', 'import', studyFile, '--data', pilotFile, '--role', 'retest', '--sheet', 'x'],
        /unknown option/i,
      ],
    ];
    for (const [args, message] of cases) {
      const run = runCli(args);
      expect(run.code, args.join(' ')).toBe(2);
      expect(run.stderr).toMatch(/^error: [^\n]+\n$/);
      expect(run.stderr).toMatch(message);
    }
  }, 120_000);

  it('says which file is missing (exit 1)', () => {
    const run = runCli([
      'project',
      'import',
      studyFile,
      '--data',
      path.join(tmp.dir, 'nope.csv'),
      '--role',
      'pilot',
    ]);
    expect(run.code).toBe(1);
    expect(run.stderr).toMatch(/^error: cannot read data file ".*nope\.csv": no such file\n$/);
  });
});

describe('missingCodesOf', () => {
  it('reads numbers and number-like text as numeric codes, the rest as text', () => {
    expect(missingCodesOf([-9, '99', ' -99.0', 'NA', '.'])).toEqual({
      text: ['NA', '.'],
      numeric: [-9, 99, -99],
    });
  });
});
