import { z } from 'zod';
import {
  decideItem,
  decideItems,
  mergeFacets,
  splitFacet,
  CORRELATIONS,
  EXTRACTIONS,
  MAX_BOOTSTRAP_RESAMPLES,
  MAX_PA_ITERATIONS,
  MIN_PA_ITERATIONS,
  ROTATIONS,
  MIN_BOOTSTRAP_RESAMPLES,
  type PreparedRound,
  prepareRound,
  purificationView,
  reverseDecision,
  roundDetail,
  storeRound,
} from '../../phases/purification/index.ts';
import { command } from '../define.ts';
import { LongJob } from '../long-job.ts';
import { id, text } from './schemas.ts';

/** Purification rounds run in a worker; each remembers the round it prepared until it is collected. */
const rounds = new LongJob<'purification.round', PreparedRound>('purification.round', {
  notFound: (taskId) => `no purification round is running as task ${taskId}`,
  cancelled: (prepared) => `round ${prepared.number} was cancelled; nothing was stored`,
});

const roundOptions = z.object({
  missing: z.enum(['listwise', 'pairwise']).optional(),
  ciLevel: z.number().gt(0.5).lt(1).optional(),
  bootstrap: z
    .object({
      resamples: z.number().int().min(MIN_BOOTSTRAP_RESAMPLES).max(MAX_BOOTSTRAP_RESAMPLES).optional(),
      seed: z.number().int().min(0).max(0xffff_ffff).optional(),
    })
    .nullable()
    .optional(),
  factor: z
    .object({
      factors: z.number().int().min(1).max(500).optional(),
      extraction: z.enum(EXTRACTIONS).optional(),
      rotation: z.enum(ROTATIONS).optional(),
      correlation: z.enum(CORRELATIONS).optional(),
      iterations: z.number().int().min(MIN_PA_ITERATIONS).max(MAX_PA_ITERATIONS).optional(),
      seed: z.number().int().min(0).max(0xffff_ffff).optional(),
    })
    .nullable()
    .optional(),
});

const reasons = {
  domainRationale: text(10_000).default(''),
  statisticalRationale: text(10_000).default(''),
};

/** Phase 5: purification rounds in a worker, the researcher's item decisions, and the history. */
export const purificationCommands = {
  'purification.view': command(z.object({}), (s) => ({
    ...purificationView(s.study),
    /** Rounds started and not yet collected (the screen picks them up again after a reload). */
    running: rounds
      .running(s)
      .filter(([, prepared]) => prepared.studyPath === s.study.path)
      .map(([taskId, prepared]) => ({ taskId, round: prepared.number })),
  })),
  'purification.round': command(z.object({ id }), (s, input) => roundDetail(s.study, input.id)),

  /** Starts the next round in a worker thread; follow it with task.status, then collect it. */
  'purification.startRound': command(roundOptions, (s, input) => {
    const prepared = prepareRound(s.study, input);
    const taskId = rounds.start(s, prepared.job, prepared);
    return {
      taskId,
      round: prepared.number,
      items: prepared.items.length,
      respondents: prepared.job.data.length,
    };
  }),

  /** Waits for a started round, stores it with its analysis run and log row, and returns it. */
  'purification.collectRound': command(z.object({ taskId: text(64) }), (s, input) =>
    rounds.collect(s, input.taskId, (result, prepared) => storeRound(s.study, prepared, result)),
  ),

  'purification.decide': command(
    z.object({
      roundId: id.optional(),
      itemCode: text(40).trim().min(1, 'name the item'),
      action: z.enum(['drop', 'keep', 'move', 'restore']),
      toFacetId: id.optional(),
      ...reasons,
    }),
    (s, input) => decideItem(s.study, input),
  ),
  'purification.decideMany': command(
    z.object({
      roundId: id.optional(),
      itemCodes: z.array(text(40)).min(1, 'choose at least one item').max(500),
      action: z.enum(['drop', 'keep', 'move', 'restore']),
      toFacetId: id.optional(),
      ...reasons,
    }),
    (s, input) => decideItems(s.study, input),
  ),
  'purification.mergeFacets': command(
    z.object({ fromFacetId: id, intoFacetId: id, ...reasons }),
    (s, input) => mergeFacets(s.study, input),
  ),
  'purification.splitFacet': command(
    z.object({
      facetId: id,
      itemCodes: z.array(text(40)).min(1, 'choose at least one item').max(500),
      newFacet: z.object({ name: text(200), definition: text(10_000) }),
      ...reasons,
    }),
    (s, input) => splitFacet(s.study, input),
  ),
  'purification.reverse': command(z.object({ decisionId: id, ...reasons }), (s, input) =>
    reverseDecision(s.study, input.decisionId, input),
  ),
};
