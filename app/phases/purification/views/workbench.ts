import { getRun } from '../../../../db/repos/analysis-runs.ts';
import { listFacets } from '../../../../db/repos/construct.ts';
import { currentExclusions } from '../../../../db/repos/datasets.ts';
import { getPhaseStatus } from '../../../../db/repos/phase-state.ts';
import { listRounds, type RoundRecord } from '../../../../db/repos/purification.ts';
import type { Study } from '../../../../db/study.ts';
import { currentPilotDataset, declaredBounds } from '../../analysis-data.ts';
import { PHASE, workingSet } from '../standing.ts';
import { criterionFor, RULES_OF_THUMB } from '../rules/flags.ts';
import { type DecisionView, decisionViews } from './decisions.ts';
import { roundSummaries } from './rounds.ts';

/** An item of the pool as the workbench lists it. */
export interface PoolItemView {
  itemId: number;
  code: string;
  text: string;
  keying: 'forward' | 'reverse';
  facetId: number | null;
  facetName: string | null;
  poolFacetId: number | null;
  status: 'in' | 'dropped' | 'not-in-data';
  droppedBy: DecisionView | null;
}

/** Everything the workbench shows besides one round's detail. */
export function purificationView(study: Study) {
  const pilot = currentPilotDataset(study);
  const facets = listFacets(study, { includeRetired: true });
  const names = new Map(facets.map((f) => [f.id, f.name]));
  const decisions = decisionViews(study);
  const rounds = roundSummaries(study);
  let items: PoolItemView[] = [];
  let next: { items: string[]; respondents: number; excluded: number; pendingDecisions: number } | null =
    null;
  if (pilot) {
    const ws = workingSet(study);
    const inSet = new Set(ws.items.map((it) => it.itemId));
    items = [...ws.standings.values()].map((s) => ({
      itemId: s.item.id,
      code: s.item.code,
      text: s.item.text,
      keying: s.item.keying,
      facetId: s.facetId,
      facetName: s.facetId === null ? null : (names.get(s.facetId) ?? null),
      poolFacetId: s.item.facetId,
      status: inSet.has(s.item.id) ? 'in' : ws.notInData.includes(s.item.code) ? 'not-in-data' : 'dropped',
      droppedBy: s.droppedBy ? (decisions.find((d) => d.id === s.droppedBy?.id) ?? null) : null,
    }));
    const excluded = currentExclusions(study, pilot.id).size;
    const lastRound = listRounds(study).at(-1);
    next = {
      items: ws.items.map((it) => it.code),
      respondents: pilot.respondents - excluded,
      excluded,
      pendingDecisions: lastRound
        ? decisions.filter((d) => d.id > lastDecisionBefore(study, lastRound)).length
        : 0,
    };
  }
  return {
    status: getPhaseStatus(study, PHASE),
    pilot: pilot
      ? {
          id: pilot.id,
          name: pilot.name,
          fileName: pilot.fileName,
          fileSha256: pilot.fileSha256,
          respondents: pilot.respondents,
        }
      : null,
    bounds: declaredBounds(study),
    facets: facets
      .filter((f) => !f.retiredAt)
      .map((f) => ({ id: f.id, name: f.name, definition: f.definition })),
    items,
    next,
    rounds,
    decisions,
    rules: RULES_OF_THUMB,
    criterion: criterionFor(study),
  };
}

/** The id of the last decision taken into account by a round (0 if none). */
export function lastDecisionBefore(study: Study, round: RoundRecord): number {
  const run = getRun(study, round.runId);
  const applied = (run?.inputs as { decisionsApplied?: number[] } | undefined)?.decisionsApplied ?? [];
  return applied.length === 0 ? 0 : Math.max(...applied);
}
