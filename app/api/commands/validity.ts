import { z } from 'zod';
import { EngineError } from '../../engine/errors.ts';
import { RuleError } from '../../phases/errors.ts';
import {
  acknowledgeSource,
  describeGroups,
  describeMeasure,
  type PreparedCfa,
  type PreparedInvariance,
  prepareCfa,
  prepareInvariance,
  runRelations,
  runRetest,
  setMeasurementModel,
  storeCfa,
  storeInvariance,
  validityRunDetail,
  validityView,
} from '../../phases/validity/index.ts';
import { EVIDENCE_SOURCES } from '../../phases/validity/evidence.ts';
import type { CfaJobOutput, InvarianceJobOutput } from '../../workers/validity.ts';
import { command } from '../define.ts';
import type { Session } from '../session.ts';
import { id, rationale, text } from './schemas.ts';

type Prepared = { kind: 'cfa'; prepared: PreparedCfa } | { kind: 'invariance'; prepared: PreparedInvariance };

/** CFA and invariance runs started in a worker and not yet collected, per session, by task id. */
const running = new WeakMap<Session, Map<string, Prepared>>();

function runningOf(session: Session): Map<string, Prepared> {
  let map = running.get(session);
  if (!map) {
    map = new Map();
    running.set(session, map);
  }
  return map;
}

const name = text(200).trim().min(1, 'name the column');
const itemCode = text(40).trim().min(1, 'name the item');

const model = z.object({
  factors: z
    .array(z.object({ name: text(200), items: z.array(itemCode).max(500) }))
    .min(1, 'the model needs at least one factor')
    .max(50),
  orthogonal: z.boolean(),
  residualCovariances: z.array(z.object({ a: itemCode, b: itemCode, rationale: text(10_000) })).max(200),
});

/** Phase 6: validity evidence: the measurement model, the analyses (CFA and invariance in a worker), acknowledgements. */
export const validityCommands = {
  'validity.view': command(z.object({}), (s) => ({
    ...validityView(s.study),
    running: [...runningOf(s).entries()]
      .filter(([, p]) => p.prepared.studyPath === s.study.path)
      .map(([taskId, p]) => ({ taskId, kind: p.kind })),
  })),
  'validity.run': command(z.object({ id }), (s, input) => validityRunDetail(s.study, input.id)),

  'validity.setModel': command(z.object({ model, rationale }), (s, input) =>
    setMeasurementModel(s.study, input.model, input.rationale),
  ),
  'validity.describeMeasure': command(
    z.object({
      column: name,
      relationId: id.nullable(),
      timing: z.enum(['concurrent', 'predictive']),
      reliability: z.number().nullable(),
      rationale,
    }),
    (s, { column, rationale: why, ...setting }) => describeMeasure(s.study, column, setting, why),
  ),
  'validity.describeGroups': command(
    z.object({ column: name, relationId: id.nullable(), higher: text(200), lower: text(200), rationale }),
    (s, { column, rationale: why, ...setting }) => describeGroups(s.study, column, setting, why),
  ),
  'validity.acknowledge': command(
    z.object({
      source: z.enum(EVIDENCE_SOURCES.map((x) => x.id) as [string, ...string[]]),
      note: rationale,
    }),
    (s, input) =>
      acknowledgeSource(s.study, input.source as (typeof EVIDENCE_SOURCES)[number]['id'], input.note),
  ),

  /** Starts a CFA of the model in force in a worker thread; follow it with task.status, then collect it. */
  'validity.startCfa': command(z.object({}), (s) => {
    const prepared = prepareCfa(s.study);
    const task = s.tasks.start('validity.cfa', prepared.job);
    runningOf(s).set(task.id, { kind: 'cfa', prepared });
    return { taskId: task.id, respondents: prepared.inputs.n, items: prepared.inputs.items.length };
  }),
  /** Starts an invariance test across the levels of a group column in a worker thread. */
  'validity.startInvariance': command(z.object({ groupColumn: name }), (s, input) => {
    const prepared = prepareInvariance(s.study, input.groupColumn);
    const task = s.tasks.start('validity.invariance', prepared.job);
    runningOf(s).set(task.id, { kind: 'invariance', prepared });
    return { taskId: task.id, groups: prepared.job.groups.map((g) => g.name) };
  }),
  /** Waits for a started analysis, stores it with its run and log row, and returns the run id. */
  'validity.collect': command(z.object({ taskId: text(64) }), async (s, input) => {
    const map = runningOf(s);
    const entry = map.get(input.taskId);
    if (!entry) throw new RuleError(`no validity analysis is running as task ${input.taskId}`, 'not-found');
    try {
      const result = await s.tasks.result(input.taskId);
      return entry.kind === 'cfa'
        ? { runId: storeCfa(s.study, entry.prepared, result as CfaJobOutput) }
        : { runId: storeInvariance(s.study, entry.prepared, result as InvarianceJobOutput) };
    } catch (error) {
      if (error instanceof EngineError && error.code === 'cancelled')
        throw new RuleError('the analysis was cancelled; nothing was stored', 'cancelled');
      throw error;
    } finally {
      map.delete(input.taskId);
    }
  }),
  'validity.runRelations': command(z.object({}), (s) => ({ runId: runRelations(s.study) })),
  'validity.runRetest': command(z.object({}), (s) => ({ runId: runRetest(s.study) })),
};
