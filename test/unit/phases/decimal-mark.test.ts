import fs from 'node:fs';
import path from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { NO_MISSING_CODES } from '../../../app/import/numbers.ts';
import {
  automaticMapping,
  planImport,
  previewDataFile,
  storeImport,
} from '../../../app/phases/pilot/index.ts';
import { type ReadSettings, readDataFile } from '../../../app/import/read-data-file.ts';
import { listDatasets } from '../../../db/repos/datasets.ts';
import { Study } from '../../../db/study.ts';
import { runCli } from '../../helpers/cli.ts';
import { createStudyWithPool } from '../../helpers/study-data.ts';
import { TEST_ACTOR, tempDir } from '../../helpers/tmp.ts';

const CODES = ['Q1', 'Q2', 'Q3', 'Q4'];
const SLOW = 120_000;

let tmp: ReturnType<typeof tempDir>;
let studyFile: string;

/**
 * A semicolon-separated file whose first 510 respondents write Q1 with a decimal point ("3.0") and
 * whose 590 later ones write it with a decimal comma ("3,0"): the file's start says point, the file
 * as a whole has more commas. Header = row 1, so the first comma is on row 512.
 */
const MIXED = `id;${CODES.join(';')}\n${Array.from(
  { length: 1100 },
  (_, r) => `r${r + 1};${r < 510 ? '3.0' : '3,0'};${(r % 5) + 1};${((r + 2) % 5) + 1};${((r + 4) % 5) + 1}`,
).join('\n')}\n`;

function write(name: string, text: string): string {
  const file = path.join(tmp.dir, name);
  fs.writeFileSync(file, text);
  return file;
}

function withStudy<T>(fn: (study: Study) => Promise<T> | T): Promise<T> {
  const study = Study.open(studyFile, { actor: TEST_ACTOR, app: 'test' });
  return Promise.resolve(fn(study)).finally(() => study.close());
}

async function read(study: Study, text: string, reading: ReadSettings) {
  const bytes = new TextEncoder().encode(text);
  const { plan, read } = planImport(study, bytes, {
    fileName: 'mixed.csv',
    role: 'pilot',
    mapping: automaticMapping(study),
    missingCodes: NO_MISSING_CODES,
    reading,
  });
  return { plan, bytes, result: await readDataFile(read) };
}

beforeAll(() => {
  tmp = tempDir();
  studyFile = path.join(tmp.dir, 'marks.scalewright');
  const study = createStudyWithPool(studyFile, CODES);
  study.close();
});
afterAll(() => tmp.cleanup());

describe('one decimal mark per file, read the same way everywhere', () => {
  it('the preview and the read of the whole file decide from the same rows; an override is respected by both', async () => {
    await withStudy(async (study) => {
      const bytes = new TextEncoder().encode(MIXED);
      const preview = await previewDataFile(study, bytes, 'mixed.csv');
      expect(preview.decimalMark).toBe('.');
      // Read as the command line and the wizard do: with the mark the preview shows ...
      const shown = await read(study, MIXED, { decimalMark: preview.decimalMark });
      // ... and with nothing given: the reader's own detection looks at the same rows.
      const own = await read(study, MIXED, {});
      for (const { result } of [shown, own]) {
        expect(result.dataset.decimalMark).toBe('.');
        expect(result.dataset.problemCount).toBe(590);
        expect(result.dataset.problems[0].message).toBe(
          "row 512, column 'Q1': '3,0' uses the other decimal mark; this file's decimal mark is the point (read as missing)",
        );
      }
      const overridden = await previewDataFile(study, bytes, 'mixed.csv', { decimalMark: ',' });
      expect(overridden.decimalMark).toBe(',');
      const comma = await read(study, MIXED, { decimalMark: ',' });
      expect(comma.result.dataset.decimalMark).toBe(',');
      expect(comma.result.dataset.problems[0].message).toMatch(
        /^row 2, column 'Q1': '3\.0' uses the other decimal mark/,
      );
    });
  });

  it(
    'the command line import and `stats` read the file with the same mark, and take an override',
    () => {
      const file = write('mixed.csv', MIXED);
      const imported = runCli(['project', 'import', studyFile, '--data', file, '--role', 'pilot', '--json']);
      expect(imported.code).toBe(1);
      expect(imported.stderr).toMatch(
        /^error: mixed\.csv was not imported: 590 cells need a look, the first at row 512, column 'Q1': '3,0' uses the other decimal mark/,
      );
      const map = write('comma.json', JSON.stringify({ decimalMark: ',', acceptProblems: true }));
      const asComma = JSON.parse(
        runCli(['project', 'import', studyFile, '--data', file, '--role', 'pilot', '--map', map, '--json'])
          .stdout,
      );
      expect(asComma).toMatchObject({ decimalMark: ',', problemCount: 510 });
      expect(asComma.problems[0]).toMatchObject({ row: 2, column: 'Q1' });

      const stats = runCli(['stats', 'reliability', '--data', file, '--items', CODES.join(','), '--json']);
      expect(stats.code).toBe(1);
      expect(stats.stderr).toBe(
        `error: ${file}, row 512, column 2 ('Q1'): value "3,0" uses the other decimal mark; ` +
          'this file is read with the decimal point (give --decimal-mark comma if that is wrong)\n',
      );
      const statsComma = runCli([
        'stats',
        'reliability',
        '--data',
        file,
        '--items',
        CODES.join(','),
        '--decimal-mark',
        'comma',
      ]);
      expect(statsComma.code).toBe(1);
      expect(statsComma.stderr).toMatch(/row 2, column 2 \('Q1'\): value "3\.0" uses the other decimal mark/);
      expect(
        runCli(['stats', 'reliability', '--data', file, '--items', 'Q1,Q2', '--decimal-mark', 'dot']).code,
      ).toBe(2);
    },
    SLOW,
  );
});

describe('an item answer between the response format points', () => {
  it('4.5 on a 1–5 format is a problem named by row and column; accepted, it is kept as it is', async () => {
    await withStudy(async (study) => {
      const text = 'id;Q1;Q2;Q3;Q4\nr1;4;3;2;1\nr2;4,5;2;3;4\nr3;4,0;1;5;2\n';
      const before = listDatasets(study).length;
      const { plan, bytes, result } = await read(study, text, {});
      expect(result.dataset.decimalMark).toBe(',');
      expect(result.dataset.problems.map((p) => p.message)).toEqual([
        "row 3, column 'Q1': value 4.5 is not one of the response format's points (whole numbers 1 to 5); kept as is",
      ]);
      expect(() => storeImport(study, plan, result, bytes, { acceptProblems: false })).toThrow(
        /1 cell needs a look, the first at row 3, column 'Q1': value 4\.5 is not one of the response format's points/,
      );
      expect(listDatasets(study).length).toBe(before);
    });
  });
});
