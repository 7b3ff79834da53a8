import { type DatasetSummary, loadEncodedDataset } from '../../../db/repos/datasets.ts';
import { type ItemRecord, listItems } from '../../../db/repos/items.ts';
import { type DecisionRecord, listDecisions, type RoundItem } from '../../../db/repos/purification.ts';
import type { Study } from '../../../db/study.ts';
import { currentPilotDataset } from '../analysis-data.ts';
import { RuleError } from '../errors.ts';

export const PHASE = 'purification';

/** Where each item stands after every decision so far. */
export interface ItemStanding {
  item: ItemRecord;
  /** The drop decision in force, if the item is out. */
  droppedBy: DecisionRecord | null;
  /** The facet the item belongs to now: the pool's, or the latest move's. */
  facetId: number | null;
  /** The move in force, if any. */
  movedBy: DecisionRecord | null;
  decisions: DecisionRecord[];
}

export function standingsOf(items: ItemRecord[], decisions: DecisionRecord[]): Map<number, ItemStanding> {
  const out = new Map<number, ItemStanding>();
  for (const item of items) {
    out.set(item.id, { item, droppedBy: null, facetId: item.facetId, movedBy: null, decisions: [] });
  }
  for (const d of decisions) {
    const s = out.get(d.itemId);
    if (!s) continue;
    s.decisions.push(d);
    if (d.action === 'drop') s.droppedBy = d;
    else if (d.action === 'restore') s.droppedBy = null;
    else if (d.action === 'move') {
      s.facetId = d.toFacetId;
      s.movedBy = d;
    }
  }
  return out;
}

/** Item codes of the dataset's item columns, looked up without regard to letter case. */
function datasetCodes(study: Study, datasetId: number): Map<string, string> {
  const encoded = loadEncodedDataset(study, datasetId);
  const out = new Map<string, string>();
  for (const column of encoded?.columns ?? []) {
    if (column.role === 'item' && column.itemCode) out.set(column.itemCode.toLowerCase(), column.itemCode);
  }
  return out;
}

export interface WorkingSet {
  pilot: DatasetSummary;
  standings: Map<number, ItemStanding>;
  /** Items in the next round: in the pool, in the data, not dropped; pool order. */
  items: RoundItem[];
  /** The dataset's own spelling of each round item's code. */
  dataCodes: string[];
  notInData: string[];
}

export function workingSet(study: Study): WorkingSet {
  const pilot = currentPilotDataset(study);
  if (!pilot) {
    throw new RuleError(
      'no pilot data has been imported yet; import the pilot responses in the Pilot data phase first',
      'no-data',
    );
  }
  const codes = datasetCodes(study, pilot.id);
  const pool = listItems(study).filter((it) => it.state !== 'retired');
  const standings = standingsOf(pool, listDecisions(study));
  const items: RoundItem[] = [];
  const dataCodes: string[] = [];
  const notInData: string[] = [];
  for (const item of pool) {
    const inData = codes.get(item.code.toLowerCase());
    if (!inData) {
      notInData.push(item.code);
      continue;
    }
    const s = standings.get(item.id) as ItemStanding;
    if (s.droppedBy) continue;
    items.push({ itemId: item.id, code: item.code, facetId: s.facetId, keying: item.keying });
    dataCodes.push(inData);
  }
  return { pilot, standings, items, dataCodes, notInData };
}
