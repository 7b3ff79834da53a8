import { canonicalJson } from '../canonical-json.ts';
import type { Study } from '../study.ts';

export interface RunInput {
  phase: string;
  /** Which analysis, e.g. "reliability". */
  kind: string;
  /** Exactly what it ran on: dataset id and hash, item set, keys, exclusions. */
  inputs: Record<string, unknown>;
  options: Record<string, unknown>;
  seed?: number | null;
  /** The engine version that computed `results`. */
  engineVersion: string;
  results: unknown;
}

export interface RunRecord extends RunInput {
  id: number;
  createdAt: string;
  actor: string;
}

interface RunRow {
  id: number;
  phase: string;
  kind: string;
  inputs: string;
  options: string;
  seed: number | null;
  engine_version: string;
  results: string;
  created_at: string;
  actor: string;
}

/** Call inside a transaction (see recordRun in app/phases/change.ts). */
export function insertRun(study: Study, run: RunInput): number {
  return Number(
    study.db
      .prepare(
        `INSERT INTO analysis_run (phase, kind, inputs, options, seed, engine_version, results, created_at, actor)
         VALUES (?, ?, ?, ?, ?, ?, ?, ?, ?)`,
      )
      .run(
        run.phase,
        run.kind,
        canonicalJson(run.inputs),
        canonicalJson(run.options),
        run.seed ?? null,
        run.engineVersion,
        JSON.stringify(run.results),
        new Date().toISOString(),
        study.actor.name,
      ).lastInsertRowid,
  );
}

function fromRow(row: RunRow): RunRecord {
  return {
    id: row.id,
    phase: row.phase,
    kind: row.kind,
    inputs: JSON.parse(row.inputs),
    options: JSON.parse(row.options),
    seed: row.seed,
    engineVersion: row.engine_version,
    results: JSON.parse(row.results),
    createdAt: row.created_at,
    actor: row.actor,
  };
}

export function getRun(study: Study, id: number): RunRecord | undefined {
  const row = study.db.prepare('SELECT * FROM analysis_run WHERE id = ?').get(id) as RunRow | undefined;
  return row ? fromRow(row) : undefined;
}

export function listRuns(study: Study, filter: { phase?: string; kind?: string } = {}): RunRecord[] {
  return (
    study.db
      .prepare(
        'SELECT * FROM analysis_run WHERE (@phase IS NULL OR phase = @phase) AND (@kind IS NULL OR kind = @kind) ORDER BY id',
      )
      .all({ phase: filter.phase ?? null, kind: filter.kind ?? null }) as RunRow[]
  ).map(fromRow);
}
