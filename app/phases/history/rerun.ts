import { listRuns, type RunRecord } from '../../../db/repos/analysis-runs.ts';
import type { Study } from '../../../db/study.ts';
import { ENGINE_VERSION } from '../../engine/version.ts';
import { InputsGone } from './rerun-kind.ts';
import { RERUN_KINDS } from './rerun-kinds.ts';

export { InputsGone, type RerunKind } from './rerun-kind.ts';

/**
 * Two numbers reproduce when |a − b| ≤ 1e-9 · max(|a|, |b|), or both lie within 1e-12 of each
 * other (values at zero). The same engine on the same inputs is deterministic (seeded streams,
 * fixed summation order), so a re-run normally matches bit for bit; the tolerance only absorbs the
 * last-digit differences another platform's floating point could give.
 */
export const RERUN_TOLERANCE = { relative: 1e-9, absolute: 1e-12 } as const;

/** One field whose recomputed value differs from the stored one. */
export interface FieldDifference {
  /** Where in the results, e.g. `scale.alpha.value` or `items[3].cvi`. */
  field: string;
  stored: unknown;
  recomputed: unknown;
}

export type RerunStatus = 'reproduced' | 'differs' | 'failed' | 'inputs-gone' | 'not-rerun';

export interface RunCheck {
  runId: number;
  phase: string;
  kind: string;
  /** The log row that recorded the run, when one cites it. */
  seq: number | null;
  engineVersion: string;
  /** Whether the run was stored by another engine version than the one that re-ran it. */
  otherEngine: boolean;
  status: RerunStatus;
  /** Why a run was not re-run, its inputs are gone or the re-run failed. */
  note: string | null;
  differences: FieldDifference[];
  /** How many fields differ in all (`differences` lists the first few). */
  differenceCount: number;
}

export interface RerunReport {
  engineVersion: string;
  tolerance: typeof RERUN_TOLERANCE;
  runs: RunCheck[];
  /** Runs of this engine version that no longer reproduce, or whose stored inputs no longer run. */
  breaks: RunCheck[];
  /** Runs of another engine version whose results differ: the engine changed, not the study. */
  engineDifferences: RunCheck[];
}

const MAX_LISTED = 12;

function sameNumber(a: number, b: number): boolean {
  if (a === b) return true;
  const d = Math.abs(a - b);
  return d <= RERUN_TOLERANCE.absolute || d <= RERUN_TOLERANCE.relative * Math.max(Math.abs(a), Math.abs(b));
}

function isRecord(x: unknown): x is Record<string, unknown> {
  return typeof x === 'object' && x !== null && !Array.isArray(x);
}

/**
 * Every leaf where `recomputed` differs from `stored`, as paths. Both are compared as JSON holds
 * them (so NaN and null agree, and a missing key equals an undefined one); numbers within
 * RERUN_TOLERANCE agree.
 */
export function compareResults(stored: unknown, recomputed: unknown, at = ''): FieldDifference[] {
  const out: FieldDifference[] = [];
  const walk = (a: unknown, b: unknown, path: string) => {
    if (typeof a === 'number' && typeof b === 'number') {
      if (!sameNumber(a, b)) out.push({ field: path || '(results)', stored: a, recomputed: b });
      return;
    }
    if (Array.isArray(a) && Array.isArray(b)) {
      if (a.length !== b.length) {
        out.push({ field: `${path}.length`, stored: a.length, recomputed: b.length });
      }
      for (let i = 0; i < Math.min(a.length, b.length); i++) walk(a[i], b[i], `${path}[${i}]`);
      return;
    }
    if (isRecord(a) && isRecord(b)) {
      const keys = [...new Set([...Object.keys(a), ...Object.keys(b)])].sort();
      for (const k of keys) walk(a[k], b[k], path ? `${path}.${k}` : k);
      return;
    }
    if (a !== b) out.push({ field: path || '(results)', stored: a ?? null, recomputed: b ?? null });
  };
  walk(stored, JSON.parse(JSON.stringify(recomputed ?? null)), at);
  return out;
}

/** The log row that recorded each run (the first row citing it). */
function recordingRows(study: Study): Map<number, number> {
  const rows = study.db
    .prepare(
      'SELECT run_id AS runId, min(seq) AS seq FROM decision_log WHERE run_id IS NOT NULL GROUP BY run_id',
    )
    .all() as { runId: number; seq: number }[];
  return new Map(rows.map((r) => [r.runId, r.seq]));
}

/** Re-runs one stored run through its kind's entry in RERUN_KINDS and compares the results. */
export function checkRun(study: Study, run: RunRecord, seq: number | null = null): RunCheck {
  const base = {
    runId: run.id,
    phase: run.phase,
    kind: run.kind,
    seq,
    engineVersion: run.engineVersion,
    otherEngine: run.engineVersion !== ENGINE_VERSION,
    note: null,
    differences: [],
    differenceCount: 0,
  };
  const entry = RERUN_KINDS[run.kind];
  if (!entry) {
    return {
      ...base,
      status: 'not-rerun',
      note: `no re-run is registered for analyses of kind "${run.kind}"`,
    };
  }
  let recomputed: unknown;
  try {
    recomputed = entry.rerun(study, run);
  } catch (e) {
    const gone = e instanceof InputsGone;
    return {
      ...base,
      status: gone ? 'inputs-gone' : 'failed',
      note: gone
        ? (e as Error).message
        : `the ${entry.title} no longer runs on its stored inputs: ${(e as Error).message}`,
    };
  }
  const differences = compareResults(run.results, recomputed);
  return {
    ...base,
    status: differences.length === 0 ? 'reproduced' : 'differs',
    differences: differences.slice(0, MAX_LISTED),
    differenceCount: differences.length,
  };
}

/**
 * Re-runs every stored analysis run from its stored inputs with this engine and compares each
 * result field with the stored one (RERUN_TOLERANCE). The policy for runs stored by another engine
 * version: they are re-run and compared the same way, and a difference is reported apart, as an
 * engine difference, not as a break: the stored result is what that engine computed, and the
 * digest its log row holds still vouches that it was not edited. A run of this engine version that
 * differs, or no longer runs on its stored inputs, is a break. Cost: the sum of the runs' own costs
 * (bootstrap resamples included). Reads only.
 */
export function rerunStoredRuns(study: Study): RerunReport {
  const seqOf = recordingRows(study);
  const runs = listRuns(study).map((run) => checkRun(study, run, seqOf.get(run.id) ?? null));
  const bad = (r: RunCheck) => r.status === 'differs' || r.status === 'failed';
  return {
    engineVersion: ENGINE_VERSION,
    tolerance: RERUN_TOLERANCE,
    runs,
    breaks: runs.filter((r) => bad(r) && !r.otherEngine),
    engineDifferences: runs.filter((r) => bad(r) && r.otherEngine),
  };
}

/** A value as one short line of text, for tables and messages. */
export function shortValue(x: unknown): string {
  const text = typeof x === 'string' ? JSON.stringify(x) : JSON.stringify(x ?? null);
  return text.length > 40 ? `${text.slice(0, 39)}…` : text;
}

/** What is wrong with a run check, without where: "the purification round no longer reproduces: …". */
export function checkProblem(c: RunCheck): string {
  const title = RERUN_KINDS[c.kind]?.title ?? c.kind;
  if (c.status !== 'differs') return c.note ?? `the ${title} ${c.status}`;
  const first = c.differences[0];
  const more = c.differenceCount > 1 ? ` (and ${c.differenceCount - 1} more)` : '';
  return `the ${title} no longer reproduces from its stored inputs: ${first.field} stored ${shortValue(first.stored)}, recomputed ${shortValue(first.recomputed)}${more}`;
}

/** A run check in one line, with where: "run 4 (log row 106): the purification round …". */
export function describeCheck(c: RunCheck): string {
  return `run ${c.runId}${c.seq === null ? '' : ` (log row ${c.seq})`}: ${checkProblem(c)}`;
}
