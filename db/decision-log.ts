import crypto from 'node:crypto';
import type Database from 'better-sqlite3';
import { canonicalJson } from './canonical-json.ts';
import { type DigestTracker, hasDigests, rootDigest } from './content-digest.ts';

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
  /** Root digest of the study's content after this row's change (rows written since digests exist). */
  stateDigest?: string;
  /** Digest of the analysis run the row cites: its inputs, options, seed, engine version and results. */
  runDigest?: string;
  prevHash: string;
  hash: string;
}

/** What the log list can be narrowed to; every filter is optional. */
export interface LogFilter {
  phase?: string;
  kind?: string;
  /** An item code: rows whose target is that item. */
  item?: string;
  /** Text searched (case-insensitively) in the target, the rationale and the kind. */
  search?: string;
  limit?: number;
  offset?: number;
}

/** The log's last row as `SEQ:HASH`, the form a researcher records outside the file. */
export const HEAD_PATTERN = /^(\d+):([0-9a-f]{64})$/;

export interface LogBreak {
  seq: number;
  problem: string;
}

export const GENESIS_HASH = '0'.repeat(64);

/** A decision_log row as the file stores it. */
export interface LogRow {
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
  state_digest?: string | null;
  run_digest?: string | null;
  prev_hash: string;
  hash: string;
}

/**
 * The append-only decision log. Each row's hash is SHA-256 over the previous row's hash and the
 * row's canonical JSON; the head (count and last hash) is also kept in study_meta, so that an
 * edited, removed, reordered or truncated log is found by `verify`.
 */
export class DecisionLog {
  /** Whether this file keeps content digests (version 5 on); rows then record the state and runs. */
  private readonly digests: boolean;

  constructor(
    private readonly db: Database.Database,
    /** On a connection that writes: the rows each change touched, digested before its row is appended. */
    private readonly tracker?: DigestTracker,
  ) {
    this.digests = hasDigests(db);
  }

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
    this.tracker?.flush();
    const runId = entry.runId ?? null;
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
      runId,
      stateDigest: this.digests ? rootDigest(this.db) : undefined,
      runDigest: this.digests && runId !== null ? runDigest(this.db, runId) : undefined,
      prevHash: last?.hash ?? GENESIS_HASH,
    };
    const hash = rowHash(body);
    const stored = { stateDigest: body.stateDigest ?? null, runDigest: body.runDigest ?? null };
    this.db
      .prepare(
        this.digests
          ? `INSERT INTO decision_log (seq, at, actor_user, actor_name, phase, kind, target, rationale, detail, run_id, state_digest, run_digest, prev_hash, hash)
             VALUES (@seq, @at, @actorUser, @actorName, @phase, @kind, @target, @rationale, @detail, @runId, @stateDigest, @runDigest, @prevHash, @hash)`
          : `INSERT INTO decision_log (seq, at, actor_user, actor_name, phase, kind, target, rationale, detail, run_id, prev_hash, hash)
             VALUES (@seq, @at, @actorUser, @actorName, @phase, @kind, @target, @rationale, @detail, @runId, @prevHash, @hash)`,
      )
      .run({ ...body, ...(this.digests ? stored : {}), detail: canonicalJson(body.detail), hash });
    this.db
      .prepare(
        "INSERT INTO study_meta (key, value) VALUES ('log_head', ?) ON CONFLICT (key) DO UPDATE SET value = excluded.value",
      )
      .run(`${body.seq}:${hash}`);
    return { ...body, hash };
  }

  /** Rows matching `filter`, newest first. */
  list(filter: LogFilter = {}): LogEntry[] {
    return this.page(filter).entries;
  }

  /** Rows matching `filter`, newest first, and how many match in all (for paging). */
  page(filter: LogFilter = {}): { total: number; entries: LogEntry[] } {
    const params = {
      phase: filter.phase ?? null,
      kind: filter.kind ?? null,
      item: filter.item === undefined ? null : `item ${likeEscape(filter.item)}`,
      search: filter.search?.trim() ? `%${likeEscape(filter.search.trim())}%` : null,
    };
    const where = `(@phase IS NULL OR phase = @phase)
      AND (@kind IS NULL OR kind = @kind)
      AND (@item IS NULL OR target LIKE @item ESCAPE '\\' OR target LIKE @item || ' %' ESCAPE '\\')
      AND (@search IS NULL OR target LIKE @search ESCAPE '\\' OR rationale LIKE @search ESCAPE '\\'
           OR kind LIKE @search ESCAPE '\\' OR replace(kind, '-', ' ') LIKE @search ESCAPE '\\')`;
    const total = (
      this.db.prepare(`SELECT count(*) AS n FROM decision_log WHERE ${where}`).get(params) as { n: number }
    ).n;
    const rows = this.db
      .prepare(`SELECT * FROM decision_log WHERE ${where} ORDER BY seq DESC LIMIT @limit OFFSET @offset`)
      .all({ ...params, limit: filter.limit ?? -1, offset: filter.offset ?? 0 }) as LogRow[];
    return { total, entries: rows.map(entryFromRow) };
  }

  /** The distinct kinds of row the log holds, for filters. */
  kinds(): string[] {
    return this.db.prepare('SELECT DISTINCT kind FROM decision_log ORDER BY kind').pluck().all() as string[];
  }

  /** The last row as `SEQ:HASH`, or undefined while the log is empty. */
  head(): string | undefined {
    const last = this.db.prepare('SELECT seq, hash FROM decision_log ORDER BY seq DESC LIMIT 1').get() as
      | { seq: number; hash: string }
      | undefined;
    return last ? `${last.seq}:${last.hash}` : undefined;
  }

  /** The row at `seq`, if the log holds it. */
  row(seq: number): LogEntry | undefined {
    const raw = this.db.prepare('SELECT * FROM decision_log WHERE seq = ?').get(seq) as LogRow | undefined;
    return raw ? entryFromRow(raw) : undefined;
  }

  /** The latest row that recorded the content's root digest. */
  lastRecordedState(): { seq: number; root: string } | undefined {
    if (!this.digests) return undefined;
    const row = this.db
      .prepare(
        'SELECT seq, state_digest AS root FROM decision_log WHERE state_digest IS NOT NULL ORDER BY seq DESC LIMIT 1',
      )
      .get() as { seq: number; root: string } | undefined;
    return row;
  }

  /** Each analysis run a log row cites with a digest, against that digest recomputed from the run as stored. */
  runBreaks(): { seq: number; runId: number; problem: string }[] {
    if (!this.digests) return [];
    const out: { seq: number; runId: number; problem: string }[] = [];
    const rows = this.db
      .prepare('SELECT seq, run_id, run_digest FROM decision_log WHERE run_digest IS NOT NULL ORDER BY seq')
      .all() as { seq: number; run_id: number | null; run_digest: string }[];
    for (const r of rows) {
      if (r.run_id === null) continue;
      const now = runDigest(this.db, r.run_id);
      if (now === undefined) {
        out.push({ seq: r.seq, runId: r.run_id, problem: `analysis run ${r.run_id} is missing` });
      } else if (now !== r.run_digest) {
        out.push({
          seq: r.seq,
          runId: r.run_id,
          problem: `analysis run ${r.run_id} differs from the digest log row ${r.seq} holds (its inputs, options, seed, engine version or results were edited)`,
        });
      }
    }
    return out;
  }

  /** The latest row of `kind` written by `phase`, if any. */
  latest(phase: string, kind: string): LogEntry | undefined {
    const row = this.db
      .prepare('SELECT * FROM decision_log WHERE phase = ? AND kind = ? ORDER BY seq DESC LIMIT 1')
      .get(phase, kind) as LogRow | undefined;
    return row && entryFromRow(row);
  }

  /** Rows after `seq` written by any of `phases`, leaving out the kinds in `exceptKinds`; oldest first. */
  after(seq: number, phases: readonly string[], exceptKinds: readonly string[]): LogEntry[] {
    if (phases.length === 0) return [];
    const rows = this.db
      .prepare(
        `SELECT * FROM decision_log
         WHERE seq > ? AND phase IN (SELECT value FROM json_each(?)) AND kind NOT IN (SELECT value FROM json_each(?))
         ORDER BY seq`,
      )
      .all(seq, JSON.stringify(phases), JSON.stringify(exceptKinds)) as LogRow[];
    return rows.map(entryFromRow);
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
      const row = entryFromRow(raw);
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

/** Escapes LIKE's wildcards so that user text matches literally (with ESCAPE '\\'). */
function likeEscape(text: string): string {
  return text.replace(/[\\%_]/g, (c) => `\\${c}`);
}

const RUN_PARTS = ['phase', 'kind', 'inputs', 'options', 'seed', 'engine_version', 'results'] as const;

/**
 * The digest of an analysis run as stored: its id, phase, kind, inputs, options, seed, engine
 * version and results, each exactly as the file holds it. Undefined when there is no such run.
 */
export function runDigest(db: Database.Database, runId: number): string | undefined {
  const run = db
    .prepare(`SELECT id, ${RUN_PARTS.join(', ')} FROM analysis_run WHERE id = ?`)
    .safeIntegers(true)
    .get(runId) as Record<string, unknown> | undefined;
  if (!run) return undefined;
  return crypto.createHash('sha256').update(runText(run)).digest('hex');
}

function runText(run: Record<string, unknown>): string {
  return JSON.stringify(['id', ...RUN_PARTS].map((k) => [k, typeof run[k], String(run[k])]));
}

/**
 * A row's hash: SHA-256 over the previous row's hash and the row's canonical JSON (every field but
 * the hash itself; absent digests left out). The one definition the chain is written and checked with.
 */
export function rowHash(body: Omit<LogEntry, 'hash'>): string {
  return crypto.createHash('sha256').update(body.prevHash).update(canonicalJson(body)).digest('hex');
}

/** A stored row as a log entry (its detail parsed, absent digests left out). */
export function entryFromRow(row: LogRow): LogEntry {
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
    ...(row.state_digest !== null ? { stateDigest: row.state_digest } : {}),
    ...(row.run_digest !== null ? { runDigest: row.run_digest } : {}),
    prevHash: row.prev_hash,
    hash: row.hash,
  };
}
