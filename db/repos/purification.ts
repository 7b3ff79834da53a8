import type { Study } from '../study.ts';

/** One item as a round analysed it: which item, in which facet, keyed which way. */
export interface RoundItem {
  itemId: number;
  code: string;
  facetId: number | null;
  keying: 'forward' | 'reverse';
}

export interface RoundRecord {
  id: number;
  number: number;
  datasetId: number;
  items: RoundItem[];
  runId: number;
  startedFromRound: number | null;
  createdAt: string;
}

export const DECISION_ACTIONS = ['drop', 'keep', 'move', 'restore'] as const;
export type DecisionAction = (typeof DECISION_ACTIONS)[number];

export interface NewDecision {
  roundId: number;
  itemId: number;
  itemCode: string;
  action: DecisionAction;
  fromFacetId: number | null;
  toFacetId: number | null;
  domainRationale: string;
  statisticalRationale: string;
  statisticsOnly: boolean;
  reversesId: number | null;
}

export interface DecisionRecord extends NewDecision {
  id: number;
  decidedAt: string;
  decidedBy: string;
}

interface RoundRow {
  id: number;
  number: number;
  dataset_id: number;
  items: string;
  run_id: number;
  started_from_round: number | null;
  created_at: string;
}

function roundFromRow(row: RoundRow): RoundRecord {
  return {
    id: row.id,
    number: row.number,
    datasetId: row.dataset_id,
    items: JSON.parse(row.items) as RoundItem[],
    runId: row.run_id,
    startedFromRound: row.started_from_round,
    createdAt: row.created_at,
  };
}

/** Call inside the transaction that stores the round's analysis run. Returns the round id. */
export function insertRound(study: Study, round: Omit<RoundRecord, 'id' | 'createdAt'>): number {
  return Number(
    study.db
      .prepare(
        `INSERT INTO purification_round (number, dataset_id, items, run_id, started_from_round, created_at)
         VALUES (?, ?, ?, ?, ?, ?)`,
      )
      .run(
        round.number,
        round.datasetId,
        JSON.stringify(round.items),
        round.runId,
        round.startedFromRound,
        new Date().toISOString(),
      ).lastInsertRowid,
  );
}

/** Every round, oldest first. */
export function listRounds(study: Study): RoundRecord[] {
  return (study.db.prepare('SELECT * FROM purification_round ORDER BY number').all() as RoundRow[]).map(
    roundFromRow,
  );
}

export function getRound(study: Study, id: number): RoundRecord | undefined {
  const row = study.db.prepare('SELECT * FROM purification_round WHERE id = ?').get(id) as
    | RoundRow
    | undefined;
  return row ? roundFromRow(row) : undefined;
}

interface DecisionRow {
  id: number;
  round_id: number;
  item_id: number;
  item_code: string;
  action: DecisionAction;
  from_facet_id: number | null;
  to_facet_id: number | null;
  domain_rationale: string;
  statistical_rationale: string;
  statistics_only: number;
  reverses_id: number | null;
  decided_at: string;
  decided_by: string;
}

function decisionFromRow(row: DecisionRow): DecisionRecord {
  return {
    id: row.id,
    roundId: row.round_id,
    itemId: row.item_id,
    itemCode: row.item_code,
    action: row.action,
    fromFacetId: row.from_facet_id,
    toFacetId: row.to_facet_id,
    domainRationale: row.domain_rationale,
    statisticalRationale: row.statistical_rationale,
    statisticsOnly: row.statistics_only === 1,
    reversesId: row.reverses_id,
    decidedAt: row.decided_at,
    decidedBy: row.decided_by,
  };
}

/** Call inside the transaction that logs the decision. Returns the decision id. */
export function insertDecision(study: Study, d: NewDecision): number {
  return Number(
    study.db
      .prepare(
        `INSERT INTO purification_decision (round_id, item_id, item_code, action, from_facet_id, to_facet_id,
           domain_rationale, statistical_rationale, statistics_only, reverses_id, decided_at, decided_by)
         VALUES (?, ?, ?, ?, ?, ?, ?, ?, ?, ?, ?, ?)`,
      )
      .run(
        d.roundId,
        d.itemId,
        d.itemCode,
        d.action,
        d.fromFacetId,
        d.toFacetId,
        d.domainRationale,
        d.statisticalRationale,
        d.statisticsOnly ? 1 : 0,
        d.reversesId,
        new Date().toISOString(),
        study.actor.name,
      ).lastInsertRowid,
  );
}

/** Every decision in the order made. */
export function listDecisions(study: Study): DecisionRecord[] {
  return (study.db.prepare('SELECT * FROM purification_decision ORDER BY id').all() as DecisionRow[]).map(
    decisionFromRow,
  );
}

export function getDecision(study: Study, id: number): DecisionRecord | undefined {
  const row = study.db.prepare('SELECT * FROM purification_decision WHERE id = ?').get(id) as
    | DecisionRow
    | undefined;
  return row ? decisionFromRow(row) : undefined;
}
