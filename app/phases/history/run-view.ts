import { runDigest } from '../../../db/decision-log.ts';
import { getRun } from '../../../db/repos/analysis-runs.ts';
import type { Study } from '../../../db/study.ts';
import { RuleError } from '../errors.ts';
import { RERUN_KINDS } from './rerun-kinds.ts';
import { checkRun, type RunCheck } from './rerun.ts';

function words(kind: string): string {
  return kind.replace(/-/g, ' ');
}

/** One line about an input: `dataset: "Pilot survey" (id 1)`, `items: 31 (TR01, TR02, …)`. */
function summarize(value: unknown): string {
  if (value === null || value === undefined) return 'none';
  if (Array.isArray(value)) {
    const shown = value
      .slice(0, 4)
      .map((v) =>
        typeof v === 'object' && v !== null
          ? String((v as Record<string, unknown>).code ?? (v as Record<string, unknown>).name ?? '…')
          : String(v),
      );
    return value.length === 0
      ? 'none'
      : `${value.length} (${shown.join(', ')}${value.length > 4 ? ', …' : ''})`;
  }
  if (typeof value === 'object') {
    const parts = Object.entries(value as Record<string, unknown>)
      .filter(([, v]) => v === null || typeof v !== 'object' || Array.isArray(v))
      .map(([k, v]) => `${k}: ${Array.isArray(v) ? v.length : JSON.stringify(v)}`);
    return parts.join('; ');
  }
  return typeof value === 'string' ? value : JSON.stringify(value);
}

/** Keys of results that repeat the run's own inputs or engine version, left out of the headline. */
const ECHOED = new Set(['inputs', 'engineVersion']);

/**
 * Single values of the results, shallowest first, by path, up to `max`: a list gives its length;
 * the echo of the inputs and maps with one entry per item or respondent (over 20 keys) are left out.
 */
function headline(results: unknown, max = 32): RunView['resultsSummary'] {
  const out: RunView['resultsSummary'] = [];
  let level: [string, unknown][] = [['', results]];
  for (let depth = 0; depth < 4 && level.length > 0 && out.length < max; depth++) {
    const next: [string, unknown][] = [];
    for (const [path, x] of level) {
      if (out.length >= max) break;
      if (Array.isArray(x)) {
        if (path) out.push({ name: `${path} (entries)`, value: x.length });
      } else if (x !== null && typeof x === 'object') {
        const entries = Object.entries(x).filter(([k]) => !ECHOED.has(k));
        if (entries.length <= 20) for (const [k, v] of entries) next.push([path ? `${path}.${k}` : k, v]);
      } else if (path && !(typeof x === 'string' && x.length > 80)) {
        out.push({ name: path, value: (x ?? null) as string | number | boolean | null });
      }
    }
    level = next;
  }
  return out;
}

export interface RunView {
  id: number;
  phase: string;
  kind: string;
  title: string;
  createdAt: string;
  actor: string;
  engineVersion: string;
  seed: number | null;
  /** Each input in one line, for reading; `inputs` holds them exactly. */
  inputsSummary: { name: string; text: string }[];
  inputs: Record<string, unknown>;
  options: Record<string, unknown>;
  /** The results' single values (not those inside lists), by path, up to a dozen, for reading. */
  resultsSummary: { name: string; value: string | number | boolean | null }[];
  results: unknown;
  /** The digest of the run as stored now, and the one its log row holds. */
  digest: { now: string | null; logged: string | null; matches: boolean };
  /** The log row that recorded the run, and every later row citing it (decisions resting on it). */
  recordedBy: number | null;
  citedBy: { seq: number; kind: string; target: string }[];
  /** Whether the run can be re-run here. */
  rerunnable: boolean;
}

/** A stored analysis run as the history shows it. Throws RuleError for an unknown run. */
export function runView(study: Study, id: number): RunView {
  const run = getRun(study, id);
  if (!run) throw new RuleError(`the study has no analysis run ${id}`, 'not-found');
  const citing = study.db
    .prepare('SELECT seq, kind, target, run_digest AS digest FROM decision_log WHERE run_id = ? ORDER BY seq')
    .all(id) as { seq: number; kind: string; target: string; digest: string | null }[];
  const logged = citing.find((c) => c.digest !== null)?.digest ?? null;
  const now = runDigest(study.db, id) ?? null;
  return {
    id: run.id,
    phase: run.phase,
    kind: run.kind,
    title: RERUN_KINDS[run.kind]?.title ?? words(run.kind),
    createdAt: run.createdAt,
    actor: run.actor,
    engineVersion: run.engineVersion,
    seed: run.seed ?? null,
    inputsSummary: Object.entries(run.inputs).map(([name, value]) => ({ name, text: summarize(value) })),
    inputs: run.inputs,
    options: run.options,
    resultsSummary: headline(run.results),
    results: run.results,
    digest: { now, logged, matches: logged !== null && logged === now },
    recordedBy: citing[0]?.seq ?? null,
    citedBy: citing.slice(1).map(({ seq, kind, target }) => ({ seq, kind, target })),
    rerunnable: RERUN_KINDS[run.kind] !== undefined,
  };
}

/** Re-runs one stored run from its stored inputs (see rerunStoredRuns) and says whether it reproduces. */
export function rerunOne(study: Study, id: number): RunCheck {
  const run = getRun(study, id);
  if (!run) throw new RuleError(`the study has no analysis run ${id}`, 'not-found');
  const seq = (
    study.db.prepare('SELECT min(seq) AS seq FROM decision_log WHERE run_id = ?').get(id) as {
      seq: number | null;
    }
  ).seq;
  return checkRun(study, run, seq);
}
