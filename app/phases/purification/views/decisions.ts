import { listFacets } from '../../../../db/repos/construct.ts';
import { listItems } from '../../../../db/repos/items.ts';
import {
  type DecisionRecord,
  listDecisions,
  listRounds,
  type RoundRecord,
} from '../../../../db/repos/purification.ts';
import type { Study } from '../../../../db/study.ts';
import { standingsOf } from '../standing.ts';

/** A decision as the history shows it. */
export interface DecisionView extends DecisionRecord {
  roundNumber: number;
  runId: number;
  fromFacet: string | null;
  toFacet: string | null;
  /** The decision that reversed this one, if any. */
  reversedBy: number | null;
  /** Whether this decision still shapes the item set (a drop or move not undone since). */
  inForce: boolean;
}

/** Every decision, oldest first, with its round and what became of it. */
export function decisionViews(study: Study): DecisionView[] {
  const rounds = new Map(listRounds(study).map((r) => [r.id, r]));
  const names = new Map(listFacets(study, { includeRetired: true }).map((f) => [f.id, f.name]));
  const all = listDecisions(study);
  const reversedBy = new Map(
    all.filter((d) => d.reversesId !== null).map((d) => [d.reversesId as number, d.id]),
  );
  const standings = standingsOf(listItems(study), all);
  return all.map((d) => {
    const s = standings.get(d.itemId);
    const round = rounds.get(d.roundId) as RoundRecord;
    return {
      ...d,
      roundNumber: round.number,
      runId: round.runId,
      fromFacet: d.fromFacetId === null ? null : (names.get(d.fromFacetId) ?? null),
      toFacet: d.toFacetId === null ? null : (names.get(d.toFacetId) ?? null),
      reversedBy: reversedBy.get(d.id) ?? null,
      inForce: s !== undefined && (s.droppedBy?.id === d.id || s.movedBy?.id === d.id),
    };
  });
}
