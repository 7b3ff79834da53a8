/**
 * Import speed and memory: a 100,000 × 60 Likert CSV (plus id and duration) is written to a temp
 * folder, then in the same run
 *   1. our reading as readDataFile does it (read the file, streamDataset in READ_CHUNK_BYTES pieces:
 *      detect, split, validate, build the compact columns, SHA-256; the file is plain, so it is split
 *      from the bytes), with the peak resident-memory increase sampled during the run;
 *   2. the same reading through papaparse (plainText off), for comparison;
 *   3. papaparse alone, streaming the same file in pieces of the same size, with a chunk callback that
 *      keeps nothing;
 *   4. papaparse alone on the whole decoded string;
 * after one untimed warm-up run of each, timed REPEATS times, alternating, and the medians printed
 * with the ratios. Run it on an otherwise idle machine: other load changes the figures.
 * Targets (issue 4): import ≤ 1.5 × papaparse alone; memory increase ≤ 4 × the file size.
 *
 *     npx tsx test/bench/import.ts [respondents] [items]
 */
import { mkdtempSync, readFileSync, rmSync, statSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { performance } from 'node:perf_hooks';
import { median, papaStream, papaString, writeBenchCsv } from './import-baseline.ts';
import type { ColumnMapping } from '../../app/import/mapping.ts';
import { isPlainText, streamDataset } from '../../app/import/stream-dataset.ts';
import { READ_CHUNK_BYTES } from '../../app/import/read-data-file.ts';

const RESPONDENTS = Number(process.argv[2] ?? 100_000);
const ITEMS = Number(process.argv[3] ?? 60);
const REPEATS = 5;
const TIME_TARGET = 1.5;
const MEMORY_TARGET = 4;

const mapping: ColumnMapping = {
  id: { role: 'id' },
  duration: { role: 'duration' },
  ...Object.fromEntries(
    Array.from({ length: ITEMS }, (_, j) => [`tc${j + 1}`, { role: 'item', itemCode: `TC${j + 1}` }]),
  ),
};

async function* pieces(bytes: Uint8Array): AsyncGenerator<Uint8Array> {
  for (let at = 0; at < bytes.length; at += READ_CHUNK_BYTES) yield bytes.subarray(at, at + READ_CHUNK_BYTES);
}

async function ours(path: string, plain: boolean, sampleRss?: () => void): Promise<number> {
  const started = performance.now();
  const bytes = readFileSync(path);
  const dataset = await streamDataset(pieces(bytes), mapping, {
    plainText: plain && isPlainText(bytes),
    fileName: 'bench.csv',
    scaleMin: 1,
    scaleMax: 5,
    expectedRows: RESPONDENTS,
    onProgress: sampleRss,
  });
  const elapsed = performance.now() - started;
  if (dataset.n !== RESPONDENTS) throw new Error(`expected ${RESPONDENTS} respondents, got ${dataset.n}`);
  return elapsed;
}

async function main(): Promise<void> {
  const dir = mkdtempSync(join(tmpdir(), 'scalewright-bench-'));
  const path = join(dir, 'responses.csv');
  try {
    writeBenchCsv(path, RESPONDENTS, ITEMS);
    const size = statSync(path).size;
    console.log(`file: ${RESPONDENTS} respondents × ${ITEMS} items, ${(size / 1e6).toFixed(1)} MB`);

    global.gc?.();
    const before = process.memoryUsage().rss;
    let peak = before;
    const sample = () => {
      const rss = process.memoryUsage().rss;
      if (rss > peak) peak = rss;
    };
    const first = await ours(path, true, sample);
    sample();
    const rssDelta = peak - before;

    // The first run of each (ours above) also compiles the code; one untimed papaparse run each
    // gives the baselines the same warm start before the timed, alternating repeats.
    await ours(path, false);
    await papaStream(path, RESPONDENTS);
    papaString(path, RESPONDENTS);
    const oursTimes: number[] = [];
    const papaPathTimes: number[] = [];
    const streamTimes: number[] = [];
    const stringTimes: number[] = [];
    for (let r = 0; r < REPEATS; r++) {
      streamTimes.push(await papaStream(path, RESPONDENTS));
      stringTimes.push(papaString(path, RESPONDENTS));
      oursTimes.push(await ours(path, true));
      papaPathTimes.push(await ours(path, false));
    }
    console.log(`first (cold) run of our import: ${first.toFixed(0)} ms`);
    const t = median(oursTimes);
    const s = median(streamTimes);
    const w = median(stringTimes);
    console.log(`papaparse alone, streaming the file:  ${s.toFixed(0)} ms (median of ${REPEATS})`);
    console.log(`papaparse alone, whole string:        ${w.toFixed(0)} ms (median of ${REPEATS})`);
    console.log(`our import (parse, validate, columns): ${t.toFixed(0)} ms (median of ${oursTimes.length})`);
    console.log(
      `the same through papaparse:           ${median(papaPathTimes).toFixed(0)} ms (median of ${papaPathTimes.length})`,
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
