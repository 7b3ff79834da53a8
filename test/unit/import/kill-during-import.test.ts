import { type ChildProcess, spawn } from 'node:child_process';
import { createHash } from 'node:crypto';
import fs from 'node:fs';
import path from 'node:path';
import { pathToFileURL } from 'node:url';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { decodeColumn } from '../../../app/engine/columnar.ts';
import { addFacet } from '../../../app/phases/construct/index.ts';
import { addItem } from '../../../app/phases/items/index.ts';
import { listDatasets, loadDatasetFile, loadEncodedDataset } from '../../../db/repos/datasets.ts';
import { Study } from '../../../db/study.ts';
import { ROOT } from '../../helpers/cli.ts';
import { TEST_ACTOR, tempDir } from '../../helpers/tmp.ts';

/** A file big enough that reading it and storing it each take a noticeable time. */
const RESPONDENTS = 60_000;
const ITEMS = 60;
/** Fixed seed of the linear congruential generator that fills the test file (test data only). */
const DATA_SEED = 7;
/** Each child is given this long to start before a timed kill is counted from its first mark. */
const START_TIMEOUT_MS = 30_000;

let tmp: ReturnType<typeof tempDir>;
let baseStudy: string;
let dataFile: string;
let childScript: string;
let fileHash: string;

function writeData(file: string): void {
  let state = DATA_SEED;
  const next = () => {
    state = (Math.imul(state, 1664525) + 1013904223) >>> 0;
    return state / 4294967296;
  };
  const lines = [['id', ...Array.from({ length: ITEMS }, (_, j) => `k${j + 1}`)].join(',')];
  for (let i = 0; i < RESPONDENTS; i++) {
    lines.push(
      [`r${i}`, ...Array.from({ length: ITEMS }, () => String(1 + Math.floor(next() * 5)))].join(','),
    );
  }
  fs.writeFileSync(file, `${lines.join('\n')}\n`);
}

/**
 * The child: opens the study, reads the file through the import path and stores it, printing a mark
 * before each step, then waits to be killed. Written to the temp folder with absolute imports.
 */
function writeChild(file: string): void {
  const at = (p: string) => JSON.stringify(pathToFileURL(path.join(ROOT, p)).href);
  fs.writeFileSync(
    file,
    `import fs from 'node:fs';
import { Study } from ${at('db/study.ts')};
import { automaticMapping, planImport, storeImport } from ${at('app/phases/pilot/index.ts')};
import { readDataFile } from ${at('app/import/read-data-file.ts')};
const [studyPath, dataPath] = process.argv.slice(2);
const study = Study.open(studyPath, { actor: { user: 'kill', name: 'Kill test' }, app: 'the kill test' });
const bytes = fs.readFileSync(dataPath);
process.stdout.write('reading\\n');
const { plan, read } = planImport(study, bytes, {
  fileName: 'big.csv', role: 'pilot', mapping: automaticMapping(study), missingCodes: { text: [], numeric: [] }, reading: {},
});
const result = await readDataFile(read);
process.stdout.write('storing\\n');
storeImport(study, plan, result, bytes, { acceptProblems: false });
process.stdout.write('stored\\n');
setInterval(() => undefined, 1000);
`,
  );
}

beforeAll(() => {
  tmp = tempDir('scalewright-kill-');
  baseStudy = path.join(tmp.dir, 'base.scalewright');
  const study = Study.create(baseStudy, { actor: TEST_ACTOR, app: 'test' });
  const facet = addFacet(study, 'Test facet', '');
  for (let j = 1; j <= ITEMS; j++) {
    addItem(study, {
      code: `K${j}`,
      text: `Test wording of item ${j}`,
      facetId: facet,
      keying: 'forward',
      sourceType: 'own-drafting',
      sourceNote: '',
    });
  }
  study.close();
  dataFile = path.join(tmp.dir, 'big.csv');
  writeData(dataFile);
  fileHash = createHash('sha256').update(fs.readFileSync(dataFile)).digest('hex');
  childScript = path.join(tmp.dir, 'child.mts');
  writeChild(childScript);
});
afterAll(() => tmp.cleanup());

type When = { afterMark: 'reading' | 'storing' | 'stored'; delayMs: number };

/** Runs the child on a fresh copy of the study and SIGKILLs it at `when`; returns the marks it printed. */
async function killDuringImport(file: string, when: When): Promise<string[]> {
  fs.copyFileSync(baseStudy, file);
  const child: ChildProcess = spawn(process.execPath, ['--import', 'tsx', childScript, file, dataFile], {
    cwd: ROOT,
    stdio: ['ignore', 'pipe', 'pipe'],
  });
  const marks: string[] = [];
  let stderr = '';
  child.stderr?.on('data', (d: Buffer) => {
    stderr += d.toString();
  });
  const exited = new Promise<void>((resolve) => child.once('exit', () => resolve()));
  await new Promise<void>((resolve, reject) => {
    const timer = setTimeout(
      () => reject(new Error(`the child never printed "${when.afterMark}": ${stderr}`)),
      START_TIMEOUT_MS,
    );
    child.stdout?.on('data', (d: Buffer) => {
      for (const mark of d.toString().split('\n').filter(Boolean)) {
        marks.push(mark);
        if (mark === when.afterMark) {
          clearTimeout(timer);
          setTimeout(() => {
            child.kill('SIGKILL');
            resolve();
          }, when.delayMs);
        }
      }
    });
    child.once('exit', () => {
      clearTimeout(timer);
      resolve();
    });
  });
  await exited;
  expect(stderr).toBe('');
  return marks;
}

describe('killing the process during an import', () => {
  const moments: When[] = [
    { afterMark: 'reading', delayMs: 0 },
    { afterMark: 'reading', delayMs: 150 },
    { afterMark: 'reading', delayMs: 400 },
    { afterMark: 'storing', delayMs: 0 },
    { afterMark: 'storing', delayMs: 15 },
    { afterMark: 'storing', delayMs: 40 },
    { afterMark: 'stored', delayMs: 0 },
  ];

  it('leaves a study that opens, verifies, and holds either the whole dataset or none of it', async () => {
    const outcomes: string[] = [];
    for (const [i, when] of moments.entries()) {
      const file = path.join(tmp.dir, `killed-${i}.scalewright`);
      const marks = await killDuringImport(file, when);
      // The killed writer's lock is stale and is taken over; the open runs quick_check.
      const study = Study.open(file, { actor: TEST_ACTOR, app: 'test' });
      try {
        const integrity = study.db.pragma('integrity_check') as { integrity_check: string }[];
        expect(integrity.map((r) => r.integrity_check)).toEqual(['ok']);
        expect(study.log.verify()).toEqual([]);
        const stored = listDatasets(study);
        const logged = study.log.list({ phase: 'pilot' }).filter((e) => e.kind === 'dataset-imported');
        expect(logged).toHaveLength(stored.length);
        expect(stored.length).toBeLessThanOrEqual(1);
        if (marks.includes('stored')) expect(stored).toHaveLength(1);
        if (!marks.includes('storing')) expect(stored).toHaveLength(0);
        if (stored.length === 1) {
          const d = stored[0];
          expect(d).toMatchObject({ respondents: RESPONDENTS, fileSha256: fileHash });
          const bytes = loadDatasetFile(study, d.id) ?? new Uint8Array();
          expect(createHash('sha256').update(bytes).digest('hex')).toBe(fileHash);
          const encoded = loadEncodedDataset(study, d.id);
          expect(encoded?.columns).toHaveLength(ITEMS);
          expect(encoded?.columns.every((c) => decodeColumn(c.encoded).length === RESPONDENTS)).toBe(true);
        } else {
          expect(study.db.prepare('SELECT count(*) AS n FROM dataset_column').get()).toEqual({ n: 0 });
        }
        outcomes.push(`${when.afterMark}+${when.delayMs}ms: ${marks.join('>')} → ${stored.length} dataset`);
      } finally {
        study.close();
      }
    }
    // Printed for the record: which moments the kills actually hit.
    console.log(outcomes.join('\n'));
  }, 180_000);
});
