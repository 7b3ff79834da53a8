import fs from 'node:fs';
import path from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { generateDemoPilot } from '../../../app/demo/pilot.ts';
import { reopenPhase } from '../../../app/phases/index.ts';
import { Study } from '../../../db/study.ts';
import { runCli } from '../../helpers/cli.ts';
import { TEST_ACTOR, tempDir } from '../../helpers/tmp.ts';
import { createDemo } from '../../helpers/demo.ts';

let tmp: ReturnType<typeof tempDir>;
let studyFile: string;
let lateFile: string;
let mapFile: string;

/** Spawning the command line is slow on a loaded machine; each step runs a few commands. */
const SLOW = 120_000;

beforeAll(() => {
  tmp = tempDir();
  studyFile = path.join(tmp.dir, 'demo.scalewright');
  // The demo before its validation wave: purification open, no validation data yet.
  createDemo(studyFile, 'purification');
  const study = Study.open(studyFile, { actor: TEST_ACTOR, app: 'test' });
  try {
    reopenPhase(study, 'pilot', 'late paper returns arrived');
  } finally {
    study.close();
  }
  lateFile = path.join(tmp.dir, 'late-returns.csv');
  fs.writeFileSync(lateFile, `${generateDemoPilot().pilotCsv.split('\n').slice(0, 41).join('\n')}\n`);
  mapFile = path.join(tmp.dir, 'map.json');
  fs.writeFileSync(mapFile, JSON.stringify({ name: 'Late returns', missing: [-9] }));
}, SLOW);
afterAll(() => tmp.cleanup());

function logRows(): number {
  const study = Study.open(studyFile, { actor: TEST_ACTOR, app: 'test', mode: 'read' });
  try {
    return study.log.count();
  } finally {
    study.close();
  }
}

describe('project import, datasets and use', () => {
  it(
    'a second pilot import stays beside the current one and says how to switch; project use switches, logged',
    () => {
      const before = logRows();
      const refused = runCli([
        'project',
        'import',
        studyFile,
        '--data',
        lateFile,
        '--role',
        'pilot',
        '--current',
        'yes',
      ]);
      expect(refused.code).toBe(2);
      expect(refused.stderr).toMatch(
        /^error: the new file replaces "Pilot survey, spring \(demo\)".*give --reason TEXT/,
      );
      expect(logRows()).toBe(before);

      const run = runCli([
        'project',
        'import',
        studyFile,
        '--data',
        lateFile,
        '--role',
        'pilot',
        '--map',
        mapFile,
        '--json',
      ]);
      expect(run.stderr).toBe('');
      expect(run.code).toBe(0);
      const imported = JSON.parse(run.stdout);
      expect(imported).toMatchObject({
        datasetId: 3,
        respondents: 40,
        current: false,
        currentDataset: { id: 1 },
      });
      expect(imported.warnings[0]).toBe(
        `dataset 1 "Pilot survey, spring (demo)" stays the current pilot data; to use the new one: project use ${studyFile} --dataset 3 --reason TEXT`,
      );
      expect(logRows()).toBe(before + 1);

      const listed = JSON.parse(runCli(['project', 'datasets', studyFile, '--json']).stdout);
      expect(listed.current).toEqual({ pilot: 1, validation: null, retest: 2 });
      expect(
        listed.datasets.map((d: { id: number; rows: number; current: boolean }) => [d.id, d.rows, d.current]),
      ).toEqual([
        [1, 480, true],
        [2, 90, true],
        [3, 40, false],
      ]);
      expect(listed.datasets[2].sha256).toMatch(/^[0-9a-f]{64}$/);

      const used = runCli([
        'project',
        'use',
        studyFile,
        '--dataset',
        '3',
        '--reason',
        'the late returns alone first',
        '--json',
      ]);
      expect(used.code).toBe(0);
      expect(JSON.parse(used.stdout)).toMatchObject({
        datasetId: 3,
        role: 'pilot',
        previous: { id: 1 },
        reason: 'the late returns alone first',
        logRows: before + 2,
      });
      const table = runCli(['project', 'datasets', studyFile]);
      expect(table.code).toBe(0);
      expect(table.stdout).toMatch(/ 3 {2}pilot {3}Late returns .* yes/);
      expect(table.stdout).toContain('3: current since ');
      for (const line of table.stdout.split('\n')) expect(line.length).toBeLessThanOrEqual(100);
    },
    SLOW,
  );

  it(
    'refuses a wrong call with exit 2 and an unknown or already current dataset with exit 1, leaving the study unchanged',
    () => {
      const before = logRows();
      expect(runCli(['project', 'use', studyFile, '--dataset', '3'])).toMatchObject({
        code: 2,
        stderr: 'error: project use needs --reason TEXT: why this dataset becomes current\n',
      });
      expect(runCli(['project', 'use', studyFile, '--dataset', 'two', '--reason', 'x']).code).toBe(2);
      const unknown = runCli(['project', 'use', studyFile, '--dataset', '9', '--reason', 'x']);
      expect(unknown).toMatchObject({ code: 1, stderr: 'error: dataset 9 does not exist in this study\n' });
      expect(logRows()).toBe(before);
    },
    SLOW,
  );

  it(
    'answers --help on each command with exit 0',
    () => {
      for (const command of ['datasets', 'use', 'import']) {
        const help = runCli(['project', command, '--help']);
        expect(help.code).toBe(0);
        expect(help.stdout).toContain(`usage: scalewright project ${command} FILE`);
        for (const line of help.stdout.split('\n')) expect(line.length).toBeLessThanOrEqual(100);
      }
      expect(runCli(['project', 'import', '--help']).stdout).toContain('--current yes|no');
    },
    SLOW,
  );
});
