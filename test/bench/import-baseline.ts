/**
 * What the import benchmarks share: the bench file (an invented 1–5 Likert CSV with an id and a
 * duration column) and the baseline they are measured against, papaparse alone on the same file.
 * Not a benchmark itself (test/bench/run.ts skips this file).
 */
import { createReadStream, readFileSync, writeFileSync } from 'node:fs';
import { performance } from 'node:perf_hooks';
import Papa from 'papaparse';
import { READ_CHUNK_BYTES } from '../../app/import/read-data-file.ts';

/** Fixed seed of the linear congruential generator that fills the file (bench data only). */
const DATA_SEED = 20261201;

export function writeBenchCsv(path: string, respondents: number, items: number): void {
  let state = DATA_SEED;
  const next = () => {
    state = (Math.imul(state, 1664525) + 1013904223) >>> 0;
    return state / 4294967296;
  };
  const header = ['id', ...Array.from({ length: items }, (_, j) => `tc${j + 1}`), 'duration'].join(',');
  const lines = [header];
  for (let i = 0; i < respondents; i++) {
    const cells = [`r${i + 1}`];
    const trait = next();
    for (let j = 0; j < items; j++) {
      const u = next();
      cells.push(u < 0.01 ? '' : String(1 + Math.min(4, Math.floor(trait * 3 + u * 2.5))));
    }
    cells.push(String(200 + Math.floor(next() * 600)));
    lines.push(cells.join(','));
  }
  writeFileSync(path, `${lines.join('\n')}\n`);
}

export function median(xs: number[]): number {
  const s = [...xs].sort((a, b) => a - b);
  return s[s.length >> 1];
}

/** Papaparse streaming the file in the import's piece size, keeping nothing: milliseconds. */
export function papaStream(path: string, respondents: number): Promise<number> {
  const started = performance.now();
  return new Promise((resolve, reject) => {
    let rows = 0;
    Papa.parse(createReadStream(path, { encoding: 'utf8', highWaterMark: READ_CHUNK_BYTES }), {
      delimiter: ',',
      chunk: (results: Papa.ParseResult<string[]>) => {
        rows += results.data.length;
      },
      complete: () =>
        rows > respondents ? resolve(performance.now() - started) : reject(new Error('short parse')),
      error: reject,
    });
  });
}

/** Papaparse on the whole decoded file: milliseconds. */
export function papaString(path: string, respondents: number): number {
  const started = performance.now();
  const result = Papa.parse<string[]>(readFileSync(path, 'utf8'), { delimiter: ',' });
  if (result.data.length <= respondents) throw new Error('short parse');
  return performance.now() - started;
}
