import os from 'node:os';
import { EngineError } from '../engine/errors.ts';
import { type SimulatedEigenvalues, simulateEigenvalues } from '../engine/factor/factor-count.ts';
import type { TaskRunner } from './tasks.ts';

/**
 * Replications × p³ below which the simulation runs in the calling thread: starting a worker costs
 * more than it saves (about 2,000 replications at 40 items).
 */
export const IN_THREAD_WORK = 1.5e8;
/** How often the pool adds up its workers' progress. */
const PROGRESS_POLL_MS = 100;

export interface PoolOptions {
  /** Worker threads to use; default: every core the machine reports, or 1 (this thread) for small jobs. */
  threads?: number;
  onProgress?: (done: number, total: number) => void;
  /** Aborting cancels every worker; the promise then rejects with EngineError code `cancelled`. */
  signal?: AbortSignal;
}

/**
 * The simulated eigenvalues of a parallel analysis (simulateEigenvalues) for replications
 * 0 … iterations − 1, split into one contiguous block per worker thread. Each replication draws from
 * its own seeded stream, so the blocks, and the summary made from them, are the same however the
 * replications are split. Small jobs run in the calling thread.
 *
 * Rejects with EngineError (code `cancelled` when aborted) when a worker fails.
 */
export async function simulateEigenvaluesInPool(
  runner: TaskRunner,
  input: { n: number; p: number; seed: number; iterations: number },
  options: PoolOptions = {},
): Promise<SimulatedEigenvalues[]> {
  const { n, p, seed, iterations } = input;
  const chosen = options.threads ?? (iterations * p ** 3 < IN_THREAD_WORK ? 1 : os.availableParallelism());
  const threads = Math.max(1, Math.min(chosen, iterations));
  if (threads === 1) {
    if (options.signal?.aborted) throw new EngineError('parallel analysis was cancelled', 'cancelled');
    return [
      simulateEigenvalues({
        n,
        p,
        seed,
        from: 0,
        count: iterations,
        onProgress: options.onProgress,
        shouldStop: () => options.signal?.aborted === true,
      }),
    ];
  }
  const tasks = Array.from({ length: threads }, (_, t) => {
    const from = Math.floor((t * iterations) / threads);
    const to = Math.floor(((t + 1) * iterations) / threads);
    return runner.start('factor.parallel-block', { n, p, seed, from, count: to - from });
  });
  const cancel = () => {
    for (const task of tasks) runner.cancel(task.id);
  };
  options.signal?.addEventListener('abort', cancel, { once: true });
  const timer = options.onProgress
    ? setInterval(() => {
        let done = 0;
        for (const task of tasks) done += runner.status(task.id).done;
        options.onProgress?.(done, iterations);
      }, PROGRESS_POLL_MS)
    : null;
  try {
    return await Promise.all(tasks.map((task) => task.result));
  } catch (error) {
    cancel();
    throw error;
  } finally {
    if (timer) clearInterval(timer);
    options.signal?.removeEventListener('abort', cancel);
    await Promise.allSettled(tasks.map((task) => runner.result(task.id)));
  }
}
