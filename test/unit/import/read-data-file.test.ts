import path from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { DEMO_PILOT_ITEMS, generateDemoPilot } from '../../../app/demo/pilot.ts';
import { EngineError } from '../../../app/engine/errors.ts';
import { buildDataset } from '../../../app/import/dataset.ts';
import { proposeMapping } from '../../../app/import/mapping.ts';
import { NO_MISSING_CODES } from '../../../app/import/numbers.ts';
import { parseTable, TableError } from '../../../app/import/parse-table.ts';
import { RuleError } from '../../../app/phases/errors.ts';
import { automaticMapping, planImport, storeImport } from '../../../app/phases/pilot/index.ts';
import {
  dataFileKind,
  READ_CHUNK_BYTES,
  readDataFile,
  readDataFileJob,
  readDelimitedFileNow,
  type ReadRequest,
} from '../../../app/import/read-data-file.ts';
import { listDatasets, loadDatasetFile } from '../../../db/repos/datasets.ts';
import type { Study } from '../../../db/study.ts';
import { createStudyWithPool } from '../../helpers/study-data.ts';
import { tempDir } from '../../helpers/tmp.ts';
import { CORPUS } from './broken-corpus.ts';
import { makeWorkbook } from './xlsx-writer.ts';
import { utf8 } from '../../helpers/bytes.ts';

const POOL = ['tc1', 'tc2', 'q1', 'q2'];
const BOUNDS = { min: 1, max: 5 };

let tmp: ReturnType<typeof tempDir>;
let study: Study;
beforeAll(() => {
  tmp = tempDir();
  study = createStudyWithPool(path.join(tmp.dir, 's.scalewright'), POOL);
});
afterAll(() => {
  study.close();
  tmp.cleanup();
});

function request(bytes: Uint8Array, fileName = 'data.csv'): ReadRequest {
  return {
    fileName,
    bytes,
    mapping: (header) => proposeMapping(header, POOL).mapping,
    missingCodes: { text: [], numeric: [-9] },
    bounds: BOUNDS,
    reading: {},
  };
}

describe('dataFileKind', () => {
  it('goes by a known extension, else by the first bytes', () => {
    const zip = Uint8Array.from([0x50, 0x4b, 0x03, 0x04, 0]);
    const ole = Uint8Array.from([0xd0, 0xcf, 0x11, 0xe0, 0]);
    expect(dataFileKind('a.xlsx', utf8('id,q1'))).toBe('workbook');
    expect(dataFileKind('a.XLS', utf8('id,q1'))).toBe('workbook');
    expect(dataFileKind('a.csv', zip)).toBe('delimited');
    expect(dataFileKind('export', zip)).toBe('workbook');
    expect(dataFileKind('export', ole)).toBe('workbook');
    expect(dataFileKind('export', utf8('id,q1'))).toBe('delimited');
  });
});

describe('readDataFile', () => {
  it('streams a file in pieces and gives what the synchronous reader gives', async () => {
    const [header, ...body] = generateDemoPilot().pilotCsv.trimEnd().split('\n');
    const bytes = utf8(`${[header, ...Array.from({ length: 8 }, () => body).flat()].join('\n')}\n`);
    expect(bytes.length).toBeGreaterThan(READ_CHUNK_BYTES);
    const codes = DEMO_PILOT_ITEMS.map((it) => it.code);
    const demo = { ...request(bytes), mapping: (header: string[]) => proposeMapping(header, codes).mapping };
    const progress: number[] = [];
    const streamed = await readDataFile(demo, {
      progress: (done, total) => {
        expect(total).toBe(bytes.length);
        progress.push(done);
      },
      shouldStop: () => false,
    });
    const now = readDelimitedFileNow(demo);
    expect(now.dataset.columns.filter((c) => c.role === 'item')).toHaveLength(codes.length);
    expect(progress.length).toBeGreaterThan(1);
    expect(progress.at(-1)).toBe(bytes.length);
    expect([...progress].sort((a, b) => a - b)).toEqual(progress);
    expect(streamed.sha256).toBe(now.sha256);
    expect(streamed.header).toEqual(now.header);
    expect(streamed.mapping).toEqual(now.mapping);
    expect(streamed.dataset.ids).toEqual(now.dataset.ids);
    expect(streamed.dataset.columns).toEqual(now.dataset.columns);
    expect(streamed.dataset.problems).toEqual(now.dataset.problems);
  });

  it('stops when asked, between pieces, and says nothing was stored', async () => {
    const bytes = utf8(`id,q1\n${'r,3\n'.repeat((3 * READ_CHUNK_BYTES) / 4)}`);
    let asked = 0;
    const read = readDataFile(request(bytes), { progress: () => undefined, shouldStop: () => ++asked > 2 });
    await expect(read).rejects.toThrow(EngineError);
    await expect(
      readDataFile(request(bytes), { progress: () => undefined, shouldStop: () => true }),
    ).rejects.toThrow(/reading "data.csv" was cancelled; nothing was stored/);
  });

  it('reads an .xlsx workbook sheet with the same rules', async () => {
    const book = makeWorkbook([
      {
        name: 'Responses',
        rows: [
          ['id', 'q1', 'q2'],
          ['r1', 1, -9],
          ['r2', 7, 'NA'],
        ],
      },
    ]);
    const read = await readDataFile({ ...request(book, 'pilot.xlsx'), reading: { sheet: 'Responses' } });
    expect(read).toMatchObject({ kind: 'workbook', sheet: 'Responses', encoding: 'xlsx', delimiter: '' });
    expect(read.dataset.ids).toEqual(['r1', 'r2']);
    expect(read.dataset.problems.map((p) => p.message)).toEqual([
      "row 3, column 'q1': value 7 is outside the declared scale 1 to 5 (kept as is, not clipped)",
      "row 3, column 'q2': 'NA' is not a number (read as missing; declare it as a missing-value code if it means no answer)",
    ]);
    await expect(
      readDataFile({ ...request(book, 'pilot.xlsx'), reading: { sheet: 'Other' } }),
    ).rejects.toThrow(/has no sheet "Other"; its sheets are "Responses"/);
  });

  it('as the worker job, reports a file that cannot be read with the code "file"', async () => {
    const bad = {
      ...request(utf8('id,q1\nr1,"2\n')),
      mapping: { q1: { role: 'item' as const, itemCode: 'q1' } },
    };
    const job = readDataFileJob(bad, { progress: () => undefined, shouldStop: () => false });
    await expect(job).rejects.toMatchObject({
      code: 'file',
      message: expect.stringMatching(/row 2, column 2/),
    });
  });
});

/**
 * The broken-file corpus through the study import path (plan, read, store): each file either imports,
 * with its warnings, or gets a clear message naming row and column; none crashes and none changes the
 * study unless it is stored. The expected outcome comes from parseTable + buildDataset with the same
 * mapping and options, the pure layer the corpus was written for.
 */
describe('the broken-file corpus through the study import path', () => {
  const state = () => ({
    log: study.log.count(),
    head: study.meta('log_head'),
    datasets: listDatasets(study).length,
  });

  for (const entry of CORPUS) {
    it(entry.name, async () => {
      const parse = entry.parse ?? {};
      // The study's response format: whole-number points within its bounds.
      const options = {
        missingCodes: NO_MISSING_CODES,
        scaleMin: BOUNDS.min,
        scaleMax: BOUNDS.max,
        wholePoints: true,
      };
      let oracle: { error?: TableError; problems?: number; warnings?: string[] } = {};
      try {
        const table = parseTable(entry.bytes, parse);
        const mapping = entry.dataset?.mapping ?? proposeMapping(table.header, POOL).mapping;
        const built = buildDataset(table, mapping, options);
        oracle = { problems: built.problemCount, warnings: built.warnings };
      } catch (error) {
        if (!(error instanceof TableError)) throw error;
        oracle = { error };
      }

      const before = state();
      const fileName = `${entry.name.replace(/[^a-z0-9]+/gi, '-')}.csv`;
      let outcome: { id?: number; error?: Error } = {};
      try {
        const { plan, read } = planImport(study, entry.bytes, {
          fileName,
          role: 'pilot',
          mapping: entry.dataset?.mapping ?? automaticMapping(study),
          missingCodes: NO_MISSING_CODES,
          reading: { delimiter: parse.delimiter, encoding: parse.encoding },
        });
        const result = await readDataFile({ ...read, maxBytes: parse.maxBytes });
        outcome = {
          // Stored beside the others, not current: one log row per import.
          id: storeImport(study, plan, result, entry.bytes, {
            acceptProblems: false,
            current: { makeCurrent: false },
          }),
        };
      } catch (error) {
        outcome = { error: error as Error };
      }

      if (oracle.error) {
        const error = outcome.error;
        expect(error, 'a clear refusal').toBeInstanceOf(TableError);
        const t = error as TableError;
        expect(t.row).toBe(oracle.error.row);
        expect(t.column).toBe(oracle.error.column);
        if (oracle.error.row !== undefined)
          expect(t.message).toMatch(new RegExp(`row ${oracle.error.row}\\b`));
        expect(t.message).not.toMatch(/undefined|NaN|\n\s+at /);
        expect(state()).toEqual(before);
      } else if ((oracle.problems ?? 0) > 0) {
        expect(outcome.error).toBeInstanceOf(RuleError);
        expect((outcome.error as RuleError).code).toBe('problems');
        expect(outcome.error?.message).toMatch(/cells? needs? a look, the first at row \d+, column '[^']+'/);
        expect(state()).toEqual(before);
      } else {
        expect(outcome.error).toBeUndefined();
        expect(state()).toEqual({
          ...before,
          log: before.log + 1,
          head: study.meta('log_head'),
          datasets: before.datasets + 1,
        });
        expect(Array.from(loadDatasetFile(study, outcome.id ?? 0) ?? [])).toEqual(Array.from(entry.bytes));
        const detail = study.log.list({ limit: 1 })[0].detail as { warnings: string[] };
        for (const expected of 'warnings' in entry.expect ? (entry.expect.warnings ?? []) : []) {
          expect(
            detail.warnings.some((w) => expected.test(w)),
            `warning ${expected}`,
          ).toBe(true);
        }
      }
    });
  }

  it('holds at least 25 broken files', () => {
    expect(CORPUS.length).toBeGreaterThanOrEqual(25);
  });
});
