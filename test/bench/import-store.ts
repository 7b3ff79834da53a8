/**
 * Import into a study, end to end: a 100,000 × 60 Likert CSV (plus id and duration) is written to a
 * temp folder, then in the same run
 *   1. our import as the command line does it: read the file, plan, read and check it (streaming
 *      parse, validation, compact columns, SHA-256; readDataFile), and store it in a study in one
 *      transaction with its log row (storeImport), with the peak resident-memory increase sampled;
 *   2. papaparse alone, streaming the same file with a chunk callback that keeps nothing;
 *   3. papaparse alone on the whole decoded string;
 * after one untimed warm-up run of each, timed REPEATS times, alternating, medians printed with the
 * ratios, and the store step timed on its own. Each repeat stores into a fresh copy of an empty study.
 * Targets (issue 4): parse + validate + store ≤ 1.5 × papaparse alone; memory increase ≤ 4 × file.
 *
 *     npx tsx test/bench/import-store.ts [respondents] [items]
 */
import { copyFileSync, mkdtempSync, readFileSync, rmSync, statSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { performance } from 'node:perf_hooks';
import { median, papaStream, papaString, writeBenchCsv } from './import-baseline.ts';
import { addFacet } from '../../app/phases/construct/index.ts';
import { addItem } from '../../app/phases/items/index.ts';
import { automaticMapping, planImport, storeImport } from '../../app/phases/pilot/index.ts';
import { readDataFile } from '../../app/import/read-data-file.ts';
import { Study } from '../../db/study.ts';

const RESPONDENTS = Number(process.argv[2] ?? 100_000);
const ITEMS = Number(process.argv[3] ?? 60);
const REPEATS = 7;
const TIME_TARGET = 1.5;
const MEMORY_TARGET = 4;
const ACTOR = { user: 'bench', name: 'Import bench' };

function emptyStudy(path: string): void {
  const study = Study.create(path, { actor: ACTOR, app: 'the import bench' });
  const facet = addFacet(study, 'Bench facet', '');
  for (let j = 1; j <= ITEMS; j++) {
    addItem(study, {
      code: `TC${j}`,
      text: `Bench wording of item ${j}`,
      facetId: facet,
      keying: 'forward',
      sourceType: 'own-drafting',
      sourceNote: '',
    });
  }
  study.close();
}

async function ours(
  dataPath: string,
  studyPath: string,
  sampleRss?: () => void,
): Promise<{ total: number; store: number }> {
  const study = Study.open(studyPath, { actor: ACTOR, app: 'the import bench' });
  try {
    const started = performance.now();
    const bytes = readFileSync(dataPath);
    const { plan, read } = planImport(study, bytes, {
      fileName: 'bench.csv',
      role: 'pilot',
      mapping: automaticMapping(study),
      missingCodes: { text: [], numeric: [] },
      reading: {},
    });
    const result = await readDataFile(read, { progress: () => sampleRss?.(), shouldStop: () => false });
    sampleRss?.();
    const storing = performance.now();
    storeImport(study, plan, result, bytes, { acceptProblems: false });
    const ended = performance.now();
    sampleRss?.();
    if (result.dataset.n !== RESPONDENTS)
      throw new Error(`expected ${RESPONDENTS} respondents, got ${result.dataset.n}`);
    return { total: ended - started, store: ended - storing };
  } finally {
    study.close();
  }
}

async function main(): Promise<void> {
  const dir = mkdtempSync(join(tmpdir(), 'scalewright-bench-'));
  const dataPath = join(dir, 'responses.csv');
  const template = join(dir, 'empty.scalewright');
  let copies = 0;
  const freshStudy = () => {
    const path = join(dir, `study-${copies++}.scalewright`);
    copyFileSync(template, path);
    return path;
  };
  try {
    writeBenchCsv(dataPath, RESPONDENTS, ITEMS);
    emptyStudy(template);
    const size = statSync(dataPath).size;
    console.log(`file: ${RESPONDENTS} respondents × ${ITEMS} items, ${(size / 1e6).toFixed(1)} MB`);

    global.gc?.();
    const before = process.memoryUsage().rss;
    let peak = before;
    const sample = () => {
      const rss = process.memoryUsage().rss;
      if (rss > peak) peak = rss;
    };
    const first = await ours(dataPath, freshStudy(), sample);
    const rssDelta = peak - before;

    await papaStream(dataPath, RESPONDENTS);
    papaString(dataPath, RESPONDENTS);
    const oursTimes: number[] = [];
    const storeTimes: number[] = [];
    const streamTimes: number[] = [];
    const stringTimes: number[] = [];
    for (let r = 0; r < REPEATS; r++) {
      streamTimes.push(await papaStream(dataPath, RESPONDENTS));
      stringTimes.push(papaString(dataPath, RESPONDENTS));
      const path = freshStudy();
      global.gc?.();
      const run = await ours(dataPath, path);
      oursTimes.push(run.total);
      storeTimes.push(run.store);
      rmSync(path, { force: true });
    }
    console.log(`first (cold) run of our import into a study: ${first.total.toFixed(0)} ms`);
    const t = median(oursTimes);
    const s = median(streamTimes);
    const w = median(stringTimes);
    console.log(`papaparse alone, streaming the file:  ${s.toFixed(0)} ms (median of ${REPEATS})`);
    console.log(`papaparse alone, whole string:        ${w.toFixed(0)} ms (median of ${REPEATS})`);
    console.log(
      `our import (parse, validate, store):  ${t.toFixed(0)} ms (median of ${REPEATS}), of which the store ${median(storeTimes).toFixed(0)} ms`,
    );
    console.log(
      `ratio to papaparse streaming: ${(t / s).toFixed(2)}×, to whole string: ${(t / w).toFixed(2)}× (target ≤ ${TIME_TARGET}×)`,
    );
    console.log(
      `resident memory increase during our import: ${(rssDelta / 1e6).toFixed(1)} MB = ${(rssDelta / size).toFixed(2)}× the file (target ≤ ${MEMORY_TARGET}×)`,
    );
  } finally {
    rmSync(dir, { recursive: true, force: true });
  }
}

await main();
