import { type ItemAnalysisInput, analyseItems } from '../engine/reliability.ts';

/** What a job may do while it runs: report progress, and ask whether it should stop. */
export interface JobContext {
  progress(done: number, total: number): void;
  shouldStop(): boolean;
}

/**
 * Every long computation that runs off the main thread, by name. A job is a pure engine call on
 * plain data (structured-clonable in and out); it never touches the study file.
 */
export const JOBS = {
  /** One purification round, with its bootstrap when asked (the slow part). */
  'reliability.analyse': (
    input: Omit<ItemAnalysisInput, 'bootstrap'> & { bootstrap?: { resamples: number; seed: number } },
    ctx: JobContext,
  ) =>
    analyseItems({
      ...input,
      bootstrap: input.bootstrap && {
        ...input.bootstrap,
        onProgress: (done: number, total: number) => ctx.progress(done, total),
        shouldStop: () => ctx.shouldStop(),
      },
    }),
} satisfies Record<string, (input: never, ctx: JobContext) => unknown>;

export type JobName = keyof typeof JOBS;
export type JobInput<K extends JobName> = Parameters<(typeof JOBS)[K]>[0];
export type JobOutput<K extends JobName> = ReturnType<(typeof JOBS)[K]>;
