import { type FacetRecord, listFacets } from '../../../../db/repos/construct.ts';
import { getItemByCode, listItems } from '../../../../db/repos/items.ts';
import {
  type DecisionAction,
  getDecision,
  insertDecision,
  listDecisions,
  listRounds,
  type RoundRecord,
} from '../../../../db/repos/purification.ts';
import type { Study } from '../../../../db/study.ts';
import { changeInPhase, requireOpen } from '../../change.ts';
import { RuleError } from '../../errors.ts';
import { PHASE, type ItemStanding, standingsOf } from '../standing.ts';
import { type DecisionView, decisionViews } from '../views/decisions.ts';

export interface DecisionRequest {
  /** The round the decision is made on; default the latest. Only the latest round takes decisions. */
  roundId?: number;
  itemCode: string;
  action: DecisionAction;
  /** For a move: the facet the item goes to. */
  toFacetId?: number;
  /** How the item relates to the construct's domain (the facet's definition). */
  domainRationale: string;
  /** What the round's statistics show. */
  statisticalRationale: string;
  /** Set when the decision undoes the change logged in this row (its `seq`). */
  reversesRow?: number;
  /** Set when the move is part of merging or splitting facets: shown in its log row. */
  group?: { kind: 'merge' | 'split'; from: string; to: string };
}

/**
 * One decision, with one pair of reasons, on several items at once: each item still gets its own
 * decision and its own log row, and either every one is recorded or (when one is refused) none is.
 * Returns the new decisions' ids in the order of `itemCodes`.
 */
export function decideItems(
  study: Study,
  request: Omit<DecisionRequest, 'itemCode'> & { itemCodes: string[] },
): number[] {
  const codes = [...new Set(request.itemCodes.map((c) => c.trim()))].filter((c) => c !== '');
  if (codes.length === 0) throw new RuleError('choose at least one item for the decision');
  const { itemCodes: _all, ...common } = request;
  return study.db.transaction(() => codes.map((itemCode) => decideItem(study, { ...common, itemCode })))();
}

const ACTION_VERB: Record<DecisionAction, string> = {
  drop: 'dropping',
  keep: 'keeping',
  move: 'moving',
  restore: 'restoring',
};

const ACTION_KIND: Record<DecisionAction, string> = {
  drop: 'item-dropped',
  keep: 'item-kept',
  move: 'item-moved',
  restore: 'item-restored',
};

function latestRound(study: Study, roundId: number | undefined): RoundRecord {
  const rounds = listRounds(study);
  const latest = rounds.at(-1);
  if (!latest) throw new RuleError('run a round first: decisions are made on a round’s results', 'no-round');
  if (roundId === undefined || roundId === latest.id) return latest;
  const asked = rounds.find((r) => r.id === roundId);
  if (!asked) throw new RuleError(`there is no purification round ${roundId} in this study`, 'not-found');
  throw new RuleError(
    `decisions are made on the latest round (round ${latest.number}); round ${asked.number} is kept as history`,
  );
}

function activeFacet(study: Study, id: number): FacetRecord {
  const facet = listFacets(study).find((f) => f.id === id);
  if (!facet) throw new RuleError(`facet ${id} is not an active facet of this study`, 'not-found');
  return facet;
}

/**
 * Records a drop, keep, move or restore of one item on the latest round, with both rationales, in
 * the log (its row cites the round's analysis run). A drop without a domain rationale is accepted
 * and marked "statistics only"; a move needs one; every decision needs at least one of the two.
 * A restore reverses the drop in force; a drop reverses a keep or restore in force; a move back
 * to the facet an item came from reverses that move. Returns the decision id.
 */
export function decideItem(study: Study, request: DecisionRequest): number {
  requireOpen(study, PHASE);
  const round = latestRound(study, request.roundId);
  const item = getItemByCode(study, request.itemCode.trim());
  if (!item) throw new RuleError(`there is no item "${request.itemCode}" in the item pool`, 'not-found');
  const domain = request.domainRationale.trim();
  const statistical = request.statisticalRationale.trim();
  const standing = standingsOf([item], listDecisions(study)).get(item.id) as ItemStanding;
  const inRound = round.items.some((it) => it.itemId === item.id);
  const action = request.action;
  const what = `${ACTION_VERB[action]} item ${item.code}`;
  if (action === 'restore') {
    if (!standing.droppedBy)
      throw new RuleError(`item ${item.code} is not dropped, so there is nothing to restore`);
  } else {
    if (standing.droppedBy) {
      const by = decisionViews(study).find((d) => d.id === standing.droppedBy?.id);
      throw new RuleError(
        `item ${item.code} was dropped in round ${by?.roundNumber}; restore it before ${ACTION_VERB[action]} it`,
      );
    }
    if (!inRound) {
      throw new RuleError(
        `item ${item.code} was not analysed in round ${round.number}; run a round that includes it first`,
      );
    }
  }
  let toFacet: FacetRecord | null = null;
  if (action === 'move') {
    if (request.toFacetId === undefined) throw new RuleError(`say which facet item ${item.code} moves to`);
    toFacet = activeFacet(study, request.toFacetId);
    if (toFacet.id === standing.facetId) {
      throw new RuleError(`item ${item.code} is already in facet "${toFacet.name}"`);
    }
    if (domain === '') {
      throw new RuleError(
        `moving item ${item.code} to facet "${toFacet.name}" is a judgement about the construct’s domain: say how its content fits that facet’s definition`,
      );
    }
  } else if (request.toFacetId !== undefined) {
    throw new RuleError(`only a move names a facet to go to; ${what} does not`);
  }
  if (domain === '' && statistical === '') {
    throw new RuleError(
      `give a rationale for ${what}: how it relates to the construct’s domain, and what the statistics show`,
    );
  }
  let reversesId: number | null = null;
  const last = standing.decisions.at(-1);
  if (action === 'restore') reversesId = standing.droppedBy?.id ?? null;
  else if (action === 'drop' && last && (last.action === 'keep' || last.action === 'restore'))
    reversesId = last.id;
  else if (action === 'move' && standing.movedBy && standing.movedBy.fromFacetId === toFacet?.id) {
    reversesId = standing.movedBy.id;
  }
  const statisticsOnly = action === 'drop' && domain === '';
  const names = new Map(listFacets(study, { includeRetired: true }).map((f) => [f.id, f.name]));
  const fromFacet = standing.facetId === null ? null : (names.get(standing.facetId) ?? null);
  const reversed = reversesId === null ? null : getDecision(study, reversesId);
  const lines: string[] = [];
  if (statisticsOnly) lines.push('Statistics only: no reason about the construct’s domain was given.');
  else if (domain !== '') lines.push(`Domain: ${domain}`);
  if (statistical !== '') lines.push(`Statistics: ${statistical}`);
  return changeInPhase(
    study,
    {
      phase: PHASE,
      kind: ACTION_KIND[action],
      target: `item ${item.code}${toFacet ? ` to facet "${toFacet.name}"` : ''}${statisticsOnly ? ' (statistics only)' : ''}${request.group ? ` (${request.group.kind === 'merge' ? 'merging' : 'splitting'} facet "${request.group.from}")` : ''}`,
      rationale: lines.join('\n'),
      runId: round.runId,
      detail: {
        round: round.number,
        itemId: item.id,
        code: item.code,
        action,
        fromFacet,
        toFacet: toFacet?.name ?? null,
        domainRationale: domain,
        statisticalRationale: statistical,
        statisticsOnly,
        reversesDecision: reversed ? { action: reversed.action, decidedAt: reversed.decidedAt } : null,
        ...(request.reversesRow === undefined ? {} : { reverses: request.reversesRow }),
        ...(request.group ? { group: request.group } : {}),
      },
    },
    () =>
      insertDecision(study, {
        roundId: round.id,
        itemId: item.id,
        itemCode: item.code,
        action,
        fromFacetId: standing.facetId,
        toFacetId: toFacet?.id ?? null,
        domainRationale: domain,
        statisticalRationale: statistical,
        statisticsOnly,
        reversesId,
      }),
  );
}

/**
 * Reverses an earlier decision with a new one on the latest round: a drop by a restore, a restore by
 * a drop, a move by a move back. Only a decision still in force can be reversed; a keep changes
 * nothing, so it is withdrawn by dropping or moving the item instead. Returns the new decision id.
 */
export function reverseDecision(
  study: Study,
  decisionId: number,
  rationale: { domainRationale: string; statisticalRationale: string; reversesRow?: number },
): number {
  const d = getDecision(study, decisionId);
  if (!d) throw new RuleError(`there is no item decision ${decisionId} in this study`, 'not-found');
  const view = decisionViews(study).find((v) => v.id === decisionId) as DecisionView;
  if (view.reversedBy !== null) {
    throw new RuleError(`that ${d.action} of item ${d.itemCode} has already been reversed`);
  }
  const standing = standingsOf(listItems(study), listDecisions(study)).get(d.itemId);
  const code = standing?.item.code ?? d.itemCode;
  if (d.action === 'keep') {
    throw new RuleError(
      `keeping item ${code} changed nothing to undo; to take it out, drop it (the drop records that it reverses this keep)`,
    );
  }
  if (d.action === 'drop') {
    if (standing?.droppedBy?.id !== d.id)
      throw new RuleError(`that drop of item ${code} is no longer in force`);
    return decideItem(study, { itemCode: code, action: 'restore', ...rationale });
  }
  if (d.action === 'restore') {
    const lastDropOrRestore = standing?.decisions
      .filter((x) => x.action === 'drop' || x.action === 'restore')
      .at(-1);
    if (lastDropOrRestore?.id !== d.id || standing?.droppedBy) {
      throw new RuleError(`that restore of item ${code} is no longer in force`);
    }
    return decideItem(study, { itemCode: code, action: 'drop', ...rationale });
  }
  if (standing?.movedBy?.id !== d.id) throw new RuleError(`that move of item ${code} is no longer in force`);
  if (d.fromFacetId === null)
    throw new RuleError(`item ${code} had no facet before that move, so there is none to move it back to`);
  return decideItem(study, { itemCode: code, action: 'move', toFacetId: d.fromFacetId, ...rationale });
}
