import { afterAll, describe, expect, it } from 'vitest';
import { analyseItems } from '../../../app/engine/reliability.ts';
import { createRng } from '../../../app/engine/rng.ts';
import { TaskRunner } from '../../../app/workers/tasks.ts';

const runner = new TaskRunner();
afterAll(() => runner.shutdown());

/** Invented one-factor responses on a 1–5 scale (test data only). */
function responses(n: number, k: number, seed: number): number[][] {
  const rng = createRng(seed);
  return Array.from({ length: n }, () => {
    const f = rng.normal();
    return Array.from({ length: k }, () => Math.min(5, Math.max(1, Math.round(3 + 0.8 * f + rng.normal()))));
  });
}

describe('tasks in worker threads', () => {
  const names = ['a', 'b', 'c', 'd', 'e'];
  const data = responses(300, 5, 7);

  it('returns exactly what the same call returns on the main thread, with progress', async () => {
    const input = { names, data, missing: 'listwise' as const, bootstrap: { resamples: 500, seed: 11 } };
    const task = runner.start('reliability.analyse', input);
    const inWorker = await task.result;
    const here = analyseItems(input);
    expect(inWorker).toEqual(JSON.parse(JSON.stringify(here)));
    expect(runner.status(task.id)).toMatchObject({ state: 'done', total: 500, done: 500 });
  });

  it('stops a task that is cancelled and says so', async () => {
    const big = responses(2_000, 5, 3).map((row, i) => row.map((x, j) => ((i + j) % 17 === 0 ? null : x)));
    const task = runner.start('reliability.analyse', {
      names,
      data: big,
      missing: 'pairwise',
      bootstrap: { resamples: 100_000, seed: 1 },
    });
    await new Promise((resolve) => setTimeout(resolve, 300));
    runner.cancel(task.id);
    await expect(task.result).rejects.toThrow(/stopped after \d+ of 100000 resamples/);
    expect(runner.status(task.id).state).toBe('cancelled');
  });

  it('reports an engine error from the worker as the same message', async () => {
    const task = runner.start('reliability.analyse', { names: ['a'], data: [[1], [2]], missing: 'listwise' });
    await expect(task.result).rejects.toThrow(/at least two items/);
    expect(runner.status(task.id).state).toBe('failed');
  });
});
