import { resampleProgress } from '../api/format.ts';
import { simulateEigenvalues } from '../engine/factor/factor-count.ts';
import { EngineError } from '../engine/errors.ts';
import {
  analyseItemFactors,
  type ItemFactorAnalysis,
  type ItemFactorRequest,
} from '../engine/factor/item-factors.ts';
import { polychoricMatrix } from '../engine/factor/polychoric.ts';
import {
  analyseItems,
  analyseScaleAndFacets,
  type ItemAnalysis,
  type ItemAnalysisInput,
} from '../engine/reliability.ts';
import { readDataFileJob } from '../import/read-data-file.ts';
import type { JobContext } from './job-context.ts';
import type { ResponseMatrix } from '../engine/scoring.ts';
import { cfaJob, invarianceJob } from './validity.ts';

type AnalysisJobInput = Omit<ItemAnalysisInput, 'bootstrap' | 'data'> & {
  /** By respondent: a round's rows, as they cross to the worker thread. */
  data: ResponseMatrix;
  bootstrap?: { resamples: number; seed: number };
};

/** A purification round: the whole item set, then each facet's items, with the same options. */
export interface RoundJobInput extends AnalysisJobInput {
  facets: { facetId: number; items: string[] }[];
  /** The factor analysis of the round's items; absent: none. */
  factor?: ItemFactorRequest;
}

export interface RoundJobOutput {
  scale: ItemAnalysis;
  facets: { facetId: number; analysis: ItemAnalysis }[];
  /** Absent in rounds stored before rounds ran a factor analysis; null when none was asked or possible. */
  factor?: ItemFactorAnalysis | null;
  /** Why the factor analysis could not run (e.g. an item without variance), in words. */
  factorRefused?: string | null;
}

export type { JobContext } from './job-context.ts';

/**
 * Every long computation that runs off the main thread, by name. A job is a pure engine call on
 * plain data (structured-clonable in and out), or a promise of one; it never touches the study file.
 */
export const JOBS = {
  /** One purification round, with its bootstrap when asked (the slow part). */
  'reliability.analyse': (input: AnalysisJobInput, ctx: JobContext) =>
    analyseItems({
      ...input,
      bootstrap: input.bootstrap && {
        ...input.bootstrap,
        onProgress: (done: number, total: number) => ctx.progress(done, total),
        shouldStop: () => ctx.shouldStop(),
      },
    }),
  /** One purification round: the scale, then each facet (by id), as `analyseScaleAndFacets` does it. */
  'purification.round': (input: RoundJobInput, ctx: JobContext): RoundJobOutput => {
    const { facets, factor: factorRequest, ...common } = input;
    // One progress scale over every stage: the bootstraps, then the polychoric pairs, then the
    // parallel-analysis replications, each counted in its own units, so the bar never goes back.
    const p = input.names.length;
    const boot = (input.bootstrap?.resamples ?? 0) * (facets.length + 1);
    const pairs = factorRequest?.correlation === 'polychoric' ? (p * (p - 1)) / 2 : 0;
    const total = boot + pairs + (factorRequest?.iterations ?? 0);
    const result = analyseScaleAndFacets({
      ...common,
      facets: facets.map(({ facetId, items }) => ({ facet: facetId, items })),
      bootstrap: input.bootstrap && {
        ...input.bootstrap,
        onProgress: (done: number) =>
          ctx.progress(done, total, resampleProgress(done, input.bootstrap?.resamples ?? 0, facets.length)),
        shouldStop: () => ctx.shouldStop(),
      },
    });
    let factor: ItemFactorAnalysis | null = null;
    let factorRefused: string | null = null;
    if (factorRequest) {
      try {
        factor = analyseItemFactors(input.names, input.data, factorRequest, {
          onProgress: (done, stageTotal, stage) => {
            const before = stage === 'parallel analysis' ? boot + pairs : boot;
            const units = stage === 'parallel analysis' ? factorRequest.iterations : pairs;
            const at = before + (stageTotal > 0 ? (done / stageTotal) * units : units);
            ctx.progress(Math.round(at), total, `${stage}: ${done} of ${stageTotal}`);
          },
          shouldStop: () => ctx.shouldStop(),
        });
      } catch (error) {
        if (!(error instanceof EngineError) || error.code === 'cancelled') throw error;
        factorRefused = error.message;
      }
    }
    return {
      scale: result.scale,
      facets: result.facets.map(({ facet, analysis }) => ({ facetId: facet, analysis })),
      factor,
      factorRefused,
    };
  },
  /**
   * One block of parallel-analysis replications (from … from + count − 1); each replication has its
   * own seeded stream, so blocks may run in any thread and in any order.
   */
  'factor.parallel-block': (
    input: { n: number; p: number; seed: number; from: number; count: number },
    ctx: JobContext,
  ) =>
    simulateEigenvalues({
      ...input,
      onProgress: (done, total) => ctx.progress(done, total),
      shouldStop: () => ctx.shouldStop(),
    }),
  /** A polychoric correlation matrix (the pairs are the slow part). */
  'factor.polychoric': (input: { items: string[]; data: (number | null)[][] }, ctx: JobContext) =>
    polychoricMatrix(input.items, input.data, {
      onProgress: (done, total) => ctx.progress(done, total),
      shouldStop: () => ctx.shouldStop(),
    }),
  /** A confirmatory factor analysis with composite reliability, AVE and HTMT (validity phase). */
  'validity.cfa': cfaJob,
  /** Configural, metric and scalar models across groups (validity phase). */
  'validity.invariance': invarianceJob,
  /** Reads and checks a data file for import (parse, validate, compact columns); nothing is stored. */
  'import.read': readDataFileJob,
} satisfies Record<string, (input: never, ctx: JobContext) => unknown>;

export type JobName = keyof typeof JOBS;
export type JobInput<K extends JobName> = Parameters<(typeof JOBS)[K]>[0];
export type JobOutput<K extends JobName> = Awaited<ReturnType<(typeof JOBS)[K]>>;
