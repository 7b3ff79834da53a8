import crypto from 'node:crypto';
import type Database from 'better-sqlite3';
import { canonicalJson } from './canonical-json.ts';

export interface Actor {
  /** The operating-system user name. */
  user: string;
  /** The name the researcher chose to show in the log (editable). */
  name: string;
}

export interface LogEntry {
  seq: number;
  at: string;
  actorUser: string;
  actorName: string;
  phase: string;
  kind: string;
  target: string;
  rationale: string;
  detail: Record<string, unknown>;
  runId: number | null;
  prevHash: string;
  hash: string;
}

export interface LogBreak {
  seq: number;
  problem: string;
}

export const GENESIS_HASH = '0'.repeat(64);

interface LogRow {
  seq: number;
  at: string;
  actor_user: string;
  actor_name: string;
  phase: string;
  kind: string;
  target: string;
  rationale: string;
  detail: string;
  run_id: number | null;
  prev_hash: string;
  hash: string;
}

/**
 * The append-only decision log. Each row's hash is SHA-256 over the previous row's hash and the
 * row's canonical JSON; the head (count and last hash) is also kept in study_meta, so that an
 * edited, removed, reordered or truncated log is found by `verify`.
 */
export class DecisionLog {
  constructor(private readonly db: Database.Database) {}

  /** Appends one row. Call inside the transaction that makes the change it records. */
  append(
    actor: Actor,
    entry: {
      phase: string;
      kind: string;
      target: string;
      rationale?: string;
      detail?: Record<string, unknown>;
      runId?: number | null;
    },
  ): LogEntry {
    const last = this.db.prepare('SELECT seq, hash FROM decision_log ORDER BY seq DESC LIMIT 1').get() as
      | { seq: number; hash: string }
      | undefined;
    const body = {
      seq: (last?.seq ?? 0) + 1,
      at: new Date().toISOString(),
      actorUser: actor.user,
      actorName: actor.name,
      phase: entry.phase,
      kind: entry.kind,
      target: entry.target,
      rationale: entry.rationale ?? '',
      detail: entry.detail ?? {},
      runId: entry.runId ?? null,
      prevHash: last?.hash ?? GENESIS_HASH,
    };
    const hash = rowHash(body);
    this.db
      .prepare(
        `INSERT INTO decision_log (seq, at, actor_user, actor_name, phase, kind, target, rationale, detail, run_id, prev_hash, hash)
         VALUES (@seq, @at, @actorUser, @actorName, @phase, @kind, @target, @rationale, @detail, @runId, @prevHash, @hash)`,
      )
      .run({ ...body, detail: canonicalJson(body.detail), hash });
    this.db
      .prepare(
        "INSERT INTO study_meta (key, value) VALUES ('log_head', ?) ON CONFLICT (key) DO UPDATE SET value = excluded.value",
      )
      .run(`${body.seq}:${hash}`);
    return { ...body, hash };
  }

  list(filter: { phase?: string; limit?: number; offset?: number } = {}): LogEntry[] {
    const rows = this.db
      .prepare(
        `SELECT * FROM decision_log WHERE (@phase IS NULL OR phase = @phase) ORDER BY seq DESC LIMIT @limit OFFSET @offset`,
      )
      .all({
        phase: filter.phase ?? null,
        limit: filter.limit ?? -1,
        offset: filter.offset ?? 0,
      }) as LogRow[];
    return rows.map(fromRow);
  }

  count(): number {
    return (this.db.prepare('SELECT count(*) AS n FROM decision_log').get() as { n: number }).n;
  }

  /** Walks the whole chain; an empty array means it is intact. */
  verify(): LogBreak[] {
    const breaks: LogBreak[] = [];
    let expectedPrev = GENESIS_HASH;
    let expectedSeq = 1;
    let lastSeq = 0;
    let lastHash = GENESIS_HASH;
    for (const raw of this.db
      .prepare('SELECT * FROM decision_log ORDER BY seq')
      .iterate() as Iterable<LogRow>) {
      const row = fromRow(raw);
      if (row.seq !== expectedSeq) {
        breaks.push({ seq: row.seq, problem: `row ${expectedSeq} is missing (the log jumps to ${row.seq})` });
      }
      if (row.prevHash !== expectedPrev) {
        breaks.push({
          seq: row.seq,
          problem: 'its link to the row before does not match (a row was removed or reordered)',
        });
      }
      const { hash, ...body } = row;
      if (rowHash(body) !== hash) {
        breaks.push({ seq: row.seq, problem: 'its content does not match its hash (the row was edited)' });
      }
      expectedPrev = hash;
      expectedSeq = row.seq + 1;
      lastSeq = row.seq;
      lastHash = hash;
    }
    const head = (
      this.db.prepare("SELECT value FROM study_meta WHERE key = 'log_head'").get() as
        | { value: string }
        | undefined
    )?.value;
    const actualHead = lastSeq === 0 ? undefined : `${lastSeq}:${lastHash}`;
    if (head !== actualHead) {
      breaks.push({
        seq: lastSeq,
        problem: `the log ends at row ${lastSeq}, but the study records its last row as ${head?.split(':')[0] ?? 'none'} (rows were removed from the end)`,
      });
    }
    return breaks;
  }
}

function rowHash(body: Omit<LogEntry, 'hash'>): string {
  return crypto.createHash('sha256').update(body.prevHash).update(canonicalJson(body)).digest('hex');
}

function fromRow(row: LogRow): LogEntry {
  return {
    seq: row.seq,
    at: row.at,
    actorUser: row.actor_user,
    actorName: row.actor_name,
    phase: row.phase,
    kind: row.kind,
    target: row.target,
    rationale: row.rationale,
    detail: JSON.parse(row.detail) as Record<string, unknown>,
    runId: row.run_id,
    prevHash: row.prev_hash,
    hash: row.hash,
  };
}
