import { listRuns } from '../../../db/repos/analysis-runs.ts';
import { getPhaseStatus } from '../../../db/repos/phase-state.ts';
import type { Study } from '../../../db/study.ts';
import { methodEntry } from '../../engine/methods/index.ts';
import type { CfaJobOutput, InvarianceJobOutput } from '../../workers/validity.ts';
import { currentDataset } from '../analysis-data.ts';
import { PHASE, retainedItems, sideColumns } from './data.ts';
import { EVIDENCE_SOURCES, evidenceSources, latestRelations, latestRetest } from './evidence.ts';
import { modelInForce } from './model.ts';
import { acknowledgements } from './rules.ts';
import { groupSettings, measureSettings, plannedRelations } from './settings.ts';
import { latestRun, MIN_INVARIANCE_GROUP, validityRun } from './structure.ts';
import { hypothesisTiming } from './timing.ts';

/** The rules of thumb the screens show beside the values, straight from the methods registry. */
const RULE_IDS = [
  'cfa.cutoffs',
  'rmsea.bands',
  'cr.criterion',
  'fornell-larcker',
  'htmt',
  'invariance.delta-cfi',
  'invariance.partial',
  'cfa.residual-hint',
  'validity.hypotheses',
  'effect.bands',
  'icc.mdc95',
] as const;

function rules() {
  return RULE_IDS.map((id) => {
    const e = methodEntry(id);
    return {
      id,
      name: e.name,
      wording: e.kind === 'rule' ? e.wording : null,
      thresholds: e.kind === 'rule' ? e.thresholds : {},
      commonPractice: e.commonPractice === true,
      fromMemory: e.references.some((r) => r.fromMemory === true),
    };
  });
}

/** Everything the validity screens show, read from the study in one call. */
export function validityView(study: Study) {
  const validation = currentDataset(study, 'validation') ?? null;
  const retest = currentDataset(study, 'retest') ?? null;
  const retained = retainedItems(study);
  const inForce = modelInForce(study);
  const side = validation ? sideColumns(study, validation.id) : null;
  const measures = measureSettings(study);
  const groups = groupSettings(study);
  const timing = hypothesisTiming(study);
  const sources = evidenceSources(study);
  const acks = acknowledgements(study);
  const cfa = latestRun<CfaJobOutput>(study, 'cfa');
  const invariance = latestRun<InvarianceJobOutput>(study, 'invariance');
  return {
    status: getPhaseStatus(study, PHASE),
    validation: validation && {
      id: validation.id,
      name: validation.name,
      fileName: validation.fileName,
      fileSha256: validation.fileSha256,
      respondents: validation.respondents,
    },
    retest: retest && { id: retest.id, name: retest.name, respondents: retest.respondents },
    retained: { round: retained.round, items: retained.items },
    model: {
      ...inForce.model,
      source: inForce.source,
      rationale: inForce.decision?.rationale ?? null,
      withoutFacet: inForce.withoutFacet,
    },
    columns: {
      measures: side
        ? [...side.measures.keys()].map((column) => ({ column, setting: measures.get(column) ?? null }))
        : [],
      groups: side
        ? [...side.groups.entries()].map(([column, labels]) => {
            const counts = new Map<string, number>();
            for (const l of labels)
              if (l.trim() !== '') counts.set(l.trim(), (counts.get(l.trim()) ?? 0) + 1);
            return {
              column,
              levels: [...counts.entries()]
                .sort(([a], [b]) => a.localeCompare(b))
                .map(([name, n]) => ({ name, n })),
              setting: groups.get(column) ?? null,
            };
          })
        : [],
    },
    minimumInvarianceGroup: MIN_INVARIANCE_GROUP,
    relations: plannedRelations(study).map((r) => ({
      ...r,
      timing: timing.find((t) => t.relationId === r.id) ?? null,
    })),
    sources: sources.map((s) => ({ ...s, acknowledgement: acks.find((a) => a.source === s.id) ?? null })),
    sourceIds: EVIDENCE_SOURCES.map((s) => s.id),
    cfa: cfa && {
      runId: cfa.run.id,
      createdAt: cfa.run.createdAt,
      outOfDate: cfa.outOfDate,
      inputs: cfa.inputs,
      results: cfa.results,
    },
    invariance: invariance && {
      runId: invariance.run.id,
      createdAt: invariance.run.createdAt,
      outOfDate: invariance.outOfDate,
      inputs: invariance.inputs,
      results: invariance.results,
    },
    relationsRun: (() => {
      const r = latestRelations(study);
      return r && { runId: r.run.id, createdAt: r.run.createdAt, outOfDate: r.outOfDate, results: r.results };
    })(),
    retestRun: (() => {
      const r = latestRetest(study);
      return r && { runId: r.run.id, createdAt: r.run.createdAt, outOfDate: r.outOfDate, results: r.results };
    })(),
    runs: listRuns(study, { phase: PHASE }).map((r) => ({
      id: r.id,
      kind: r.kind,
      createdAt: r.createdAt,
      engineVersion: r.engineVersion,
    })),
    rules: rules(),
  };
}

export type ValidityView = ReturnType<typeof validityView>;

/** One stored run of the phase, with its inputs, options and results. */
export function validityRunDetail(study: Study, id: number) {
  const r = validityRun(study, id);
  return { run: r.run, outOfDate: r.outOfDate };
}
