import crypto from 'node:crypto';
import fs from 'node:fs';
import path from 'node:path';
import { fileURLToPath } from 'node:url';
import { Worker } from 'node:worker_threads';
import { EngineError } from '../engine/errors.ts';
import type { JobInput, JobName, JobOutput } from './jobs.ts';

export type TaskState = 'running' | 'done' | 'failed' | 'cancelled';

export interface TaskStatus {
  id: string;
  job: JobName;
  state: TaskState;
  done: number;
  total: number;
  /** What is being counted, in words, when the job says. */
  note?: string;
  error?: string;
}

/**
 * Where the worker's code is: the bundled worker.cjs beside the Electron main bundle, the bundled
 * worker.mjs beside the command line's bundle, or next to this file as TypeScript when run from
 * source (tsx, tests).
 */
function workerEntry(): string | URL {
  const bundled = typeof __dirname === 'string' ? path.join(__dirname, 'worker.cjs') : '';
  if (bundled && fs.existsSync(bundled)) return bundled;
  // The command line's bundle (app/cli/dist/main.mjs) has its worker bundled beside it.
  const beside = new URL('./worker.mjs', import.meta.url);
  if (beside.protocol === 'file:' && fs.existsSync(fileURLToPath(beside))) return beside;
  return new URL('./worker-from-source.mjs', import.meta.url);
}

interface Running {
  status: TaskStatus;
  stop: Int32Array;
  worker: Worker;
  promise: Promise<unknown>;
}

/**
 * Runs engine jobs in worker threads so the main process (and the UI it serves) never waits on a
 * computation; each task reports progress and can be cancelled. Finished tasks are kept until
 * their result is collected.
 */
export class TaskRunner {
  private readonly tasks = new Map<string, Running>();

  start<K extends JobName>(job: K, input: JobInput<K>): { id: string; result: Promise<JobOutput<K>> } {
    const id = crypto.randomUUID();
    const stopBuffer = new SharedArrayBuffer(4);
    const worker = new Worker(workerEntry(), { workerData: { job, input, stop: stopBuffer } });
    const status: TaskStatus = { id, job, state: 'running', done: 0, total: 0 };
    const promise = new Promise<JobOutput<K>>((resolve, reject) => {
      worker.on(
        'message',
        (message: {
          type: string;
          done?: number;
          total?: number;
          note?: string;
          value?: unknown;
          error?: { message: string; code: string };
        }) => {
          if (message.type === 'progress') {
            status.done = message.done ?? 0;
            status.total = message.total ?? 0;
            if (message.note === undefined) delete status.note;
            else status.note = message.note;
          } else if (message.type === 'done') {
            status.state = 'done';
            status.done = status.total;
            resolve(message.value as JobOutput<K>);
          } else if (message.type === 'failed') {
            const cancelled = message.error?.code === 'cancelled';
            status.state = cancelled ? 'cancelled' : 'failed';
            status.error = message.error?.message ?? 'the job failed';
            reject(new EngineError(message.error?.message ?? 'the job failed', message.error?.code));
          }
        },
      );
      worker.on('error', (error) => {
        status.state = 'failed';
        status.error = error.message;
        reject(new EngineError(`the ${job} job stopped unexpectedly: ${error.message}`, 'internal'));
      });
      worker.on('exit', (code) => {
        if (status.state === 'running') {
          status.state = 'failed';
          status.error = `the worker exited with code ${code}`;
          reject(new EngineError(`the ${job} job stopped unexpectedly (exit code ${code})`, 'internal'));
        }
      });
    });
    promise.catch(() => undefined);
    this.tasks.set(id, { status, stop: new Int32Array(stopBuffer), worker, promise });
    return { id, result: promise };
  }

  status(id: string): TaskStatus {
    const task = this.tasks.get(id);
    if (!task) throw new EngineError(`there is no task ${id}`, 'not-found');
    return { ...task.status };
  }

  /** Asks the job to stop at its next check; the task then ends as "cancelled". */
  cancel(id: string): void {
    const task = this.tasks.get(id);
    if (!task) throw new EngineError(`there is no task ${id}`, 'not-found');
    Atomics.store(task.stop, 0, 1);
  }

  async result(id: string): Promise<unknown> {
    const task = this.tasks.get(id);
    if (!task) throw new EngineError(`there is no task ${id}`, 'not-found');
    try {
      return await task.promise;
    } finally {
      this.tasks.delete(id);
    }
  }

  async shutdown(): Promise<void> {
    await Promise.all([...this.tasks.values()].map((t) => t.worker.terminate()));
    this.tasks.clear();
  }
}
