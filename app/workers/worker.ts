import { parentPort, workerData } from 'node:worker_threads';
import { EngineError } from '../engine/errors.ts';
import { type JobContext, JOBS, type JobName } from './jobs.ts';

/** Runs one job in a worker thread; progress and the result go back as messages. */
interface Start {
  job: JobName;
  input: unknown;
  /** Int32Array over a SharedArrayBuffer: element 0 becomes 1 when the job should stop. */
  stop: SharedArrayBuffer;
}

const PROGRESS_INTERVAL_MS = 100;

const { job, input, stop } = workerData as Start;
const flag = new Int32Array(stop);
let lastReport = 0;
const context: JobContext = {
  progress(done, total, note) {
    const now = Date.now();
    if (now - lastReport < PROGRESS_INTERVAL_MS && done !== total) return;
    lastReport = now;
    parentPort?.postMessage({ type: 'progress', done, total, note });
  },
  shouldStop: () => Atomics.load(flag, 0) === 1,
};
// A job may return a promise (reading a file is asynchronous); the result is posted once it settles.
Promise.resolve()
  .then(() => {
    const run = JOBS[job] as (input: unknown, ctx: JobContext) => unknown;
    if (!run) throw new EngineError(`there is no job named "${job}"`);
    return run(input, context);
  })
  .then((value) => parentPort?.postMessage({ type: 'done', value }))
  .catch((error) => {
    const e = error as Error & { code?: string };
    parentPort?.postMessage({
      type: 'failed',
      error: { name: e.name, message: e.message, code: e instanceof EngineError ? e.code : 'internal' },
    });
  });
