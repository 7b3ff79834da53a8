import type { LogEntry } from '../../db/decision-log.ts';
import type { PhaseId } from '../../db/repos/phase-state.ts';
import { listDecisions } from '../../db/repos/purification.ts';
import type { Study } from '../../db/study.ts';
import { requireOpen } from './change.ts';
import { RuleError } from './errors.ts';
import { includeRespondents } from './pilot/index.ts';
import { reverseDecision } from './purification/index.ts';
import { type MeasurementModel, setMeasurementModel } from './validity/index.ts';

/**
 * "Undo the last change": never a deletion. The most recent change in the decision log is reversed
 * by the phase's own reversal action, which writes a new log row whose detail names the row it
 * reverses (`reverses: N`) and carries the reason the researcher gave. Both rows stay in the log.
 */

/** Log kinds that are records rather than changes: undo looks past them to the change before. */
const RECORDS = new Set(['analysis-run']);

/** Kinds undo reverses, and what the reversal does. */
const UNDOABLE: Record<string, string> = {
  'respondents-excluded': 'brings the excluded respondents back into every analysis',
  'item-dropped': 'restores the item',
  'item-restored': 'drops the item again',
  'item-moved': 'moves the item back to the facet it came from',
  'model-set': 'sets the measurement model back to the one before the change, residual covariances and all',
};

/** Kinds undo does not reverse, and why; anything not listed here is not undoable either. */
export const NOT_UNDOABLE: Record<string, string> = {
  'item-kept': 'keeping an item changed nothing; drop or move it instead',
  'dataset-imported':
    'an imported file is never deleted; withdraw the dataset in the pilot phase, which keeps it on record',
  'items-imported': 'imported items are kept; edit or retire them in the item pool',
  'ratings-imported': 'imported ratings are kept; withdraw them in expert review, which keeps them on record',
  'exclusions-reversed': 'to exclude these respondents again, exclude them with a new reason',
  'signed-off': 'a sign-off is lifted by reopening the phase, with a reason',
  reopened: 'a reopened phase is closed again by signing it off',
  'measure-described':
    'describe the column again in the Validity phase, with a reason; the earlier description stays on record',
  'groups-described':
    'describe the group column again in the Validity phase, with a reason; the earlier description stays on record',
  'evidence-acknowledged':
    'an acknowledgement lapses by itself when what its source shows changes; acknowledge it again then',
  'relation-planned': 'edit or withdraw the planned relation in the Construct phase, with a reason',
  'relation-edited': 'edit the relation again in the Construct phase, with a reason',
  'facet-split':
    'move the items back to the facet they came from (each move is reversed like any move), then retire the new facet in the Construct phase',
};

/** The last change in the log and whether undo can reverse it. */
export interface LastChange {
  seq: number;
  at: string;
  phase: string;
  kind: string;
  target: string;
  rationale: string;
  undoable: boolean;
  /** What undoing does, or why the change cannot be undone. */
  effect: string;
}

function lastChangeRow(study: Study): LogEntry | null {
  for (let offset = 0; ; offset += 50) {
    const page = study.log.list({ limit: 50, offset });
    const found = page.find((e) => !RECORDS.has(e.kind));
    if (found) return found;
    if (page.length < 50) return null;
  }
}

function judge(row: LogEntry): { undoable: boolean; effect: string } {
  if (typeof row.detail.reverses === 'number') {
    return {
      undoable: false,
      effect: `this change already undid row ${row.detail.reverses}; make the change again, with a reason, instead`,
    };
  }
  const effect = UNDOABLE[row.kind];
  if (effect) return { undoable: true, effect };
  return {
    undoable: false,
    effect:
      NOT_UNDOABLE[row.kind] ?? `a "${row.kind}" change is not undone here; change it again in its phase`,
  };
}

/** The most recent change in the decision log (analysis runs aside), or null for an empty log. */
export function lastChange(study: Study): LastChange | null {
  const row = lastChangeRow(study);
  if (!row) return null;
  return {
    seq: row.seq,
    at: row.at,
    phase: row.phase,
    kind: row.kind,
    target: row.target,
    rationale: row.rationale,
    ...judge(row),
  };
}

/**
 * Undoes the most recent change by its phase's reversal action. `seq` must name that change (so the
 * researcher reverses what they were shown); `reason` is required. Throws RuleError, leaving the
 * study unchanged, when the log moved on, the change cannot be undone or its phase is signed off.
 * Returns the new log row's number.
 */
export function undoLastChange(study: Study, request: { seq: number; reason: string }): { seq: number } {
  const reason = request.reason.trim();
  if (reason === '') throw new RuleError('give a reason for undoing this change');
  const row = lastChangeRow(study);
  if (!row) throw new RuleError('the decision log holds no change to undo', 'not-found');
  if (row.seq !== request.seq) {
    throw new RuleError(
      `row ${request.seq} is no longer the last change (row ${row.seq} is); look again before undoing`,
      'stale',
    );
  }
  const verdict = judge(row);
  if (!verdict.undoable)
    throw new RuleError(`row ${row.seq} (${row.kind}) cannot be undone: ${verdict.effect}`);
  requireOpen(study, row.phase as PhaseId);
  const d = row.detail;
  if (row.kind === 'respondents-excluded') {
    includeRespondents(study, Number(d.datasetId), {
      respondents: (d.positions as number[]) ?? [],
      reason,
      reversesRow: row.seq,
    });
  } else if (row.kind === 'model-set') {
    setMeasurementModel(study, d.before as MeasurementModel, `Undo: ${reason}`, { reversesRow: row.seq });
  } else {
    const last = listDecisions(study).at(-1);
    if (!last || last.itemId !== d.itemId || last.action !== d.action) {
      throw new RuleError(`row ${row.seq} no longer matches the latest item decision; nothing was changed`);
    }
    reverseDecision(study, last.id, {
      domainRationale: `Undo: ${reason}`,
      statisticalRationale: '',
      reversesRow: row.seq,
    });
  }
  return { seq: study.log.list({ limit: 1 })[0]?.seq ?? 0 };
}
