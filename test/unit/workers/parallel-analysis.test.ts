import { afterAll, describe, expect, it } from 'vitest';
import { simulateEigenvalues } from '../../../app/engine/factor/factor-count.ts';
import { simulateEigenvaluesInPool } from '../../../app/workers/parallel-analysis.ts';
import { TaskRunner } from '../../../app/workers/tasks.ts';

const runner = new TaskRunner();
afterAll(() => runner.shutdown());

describe('parallel analysis in the worker pool', () => {
  it('splits the replications across threads with the same result as one thread, and reports progress', async () => {
    const input = { n: 200, p: 10, seed: 42, iterations: 600 };
    const seen: number[] = [];
    const blocks = await simulateEigenvaluesInPool(runner, input, {
      threads: 2,
      onProgress: (done) => seen.push(done),
    });
    expect(blocks).toHaveLength(2);
    const whole = simulateEigenvalues({ n: 200, p: 10, seed: 42, from: 0, count: 600 });
    const merged = new Float64Array(600 * 10);
    for (const b of blocks) merged.set(b.components, b.from * 10);
    expect(Array.from(merged)).toEqual(Array.from(whole.components));
    expect(seen.length).toBeGreaterThan(0);
  }, 120_000);

  it('cancels every worker when aborted', async () => {
    const controller = new AbortController();
    const run = simulateEigenvaluesInPool(
      runner,
      { n: 500, p: 40, seed: 1, iterations: 400_000 },
      { threads: 2, signal: controller.signal },
    );
    setTimeout(() => controller.abort(), 300);
    await expect(run).rejects.toThrow(/cancelled/);
  }, 120_000);
});
