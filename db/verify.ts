import { contentBreaks, storedFileBreaks } from './content-digest.ts';
import { HEAD_PATTERN } from './decision-log.ts';
import type { Study } from './study.ts';

/** Which check found a break. */
export type BreakCheck =
  | 'file'
  | 'log'
  | 'stored-file'
  | 'analysis-run'
  | 'content'
  | 'digests'
  | 'head'
  // An analysis run that no longer reproduces from its stored inputs (checked in app/phases/history).
  | 'rerun';

/** One break: what was found, and where (log row, table and row, columns). */
export interface IntegrityBreak {
  check: BreakCheck;
  seq?: number;
  table?: string;
  row?: string;
  columns?: string[];
  problem: string;
}

export interface VerifyReport {
  intact: boolean;
  fileIntact: boolean;
  logRows: number;
  /** The log's last row as `SEQ:HASH` (what to record outside the file). */
  head: string | null;
  /** The head checked with `--head`, and whether the log still holds it. */
  headChecked: { head: string; held: boolean } | null;
  breaks: IntegrityBreak[];
}

/** Parses `SEQ:HASH`; undefined when malformed. */
export function parseHead(text: string): { seq: number; hash: string } | undefined {
  const match = HEAD_PATTERN.exec(text.trim().toLowerCase());
  if (!match) return undefined;
  const seq = Number(match[1]);
  return Number.isSafeInteger(seq) && seq >= 1 ? { seq, hash: match[2] } : undefined;
}

/**
 * Checks everything a study holds: the SQLite file's integrity, the decision log's hash chain,
 * every stored file against its SHA-256, every analysis run against the digest its log rows hold,
 * and the content against the state the last log row recorded; with `head` (`SEQ:HASH`, recorded
 * outside the file), that the log still holds that row with that hash, which no rewrite of the
 * file can fake. Throws on a malformed head; call `parseHead` first to report it as a usage error.
 */
export function verifyStudy(study: Study, options: { head?: string } = {}): VerifyReport {
  const breaks: IntegrityBreak[] = [];
  const integrity = (study.db.pragma('integrity_check') as { integrity_check: string }[])
    .map((r) => r.integrity_check)
    .filter((r) => r !== 'ok');
  for (const problem of integrity) breaks.push({ check: 'file', problem });
  for (const b of study.log.verify()) breaks.push({ check: 'log', seq: b.seq, problem: b.problem });
  breaks.push(...storedFileBreaks(study.db));
  for (const b of study.log.runBreaks())
    breaks.push({
      check: 'analysis-run',
      seq: b.seq,
      table: 'analysis_run',
      row: `id ${b.runId}`,
      problem: b.problem,
    });
  breaks.push(...contentBreaks(study.db, study.log.lastRecordedState()));

  let headChecked: VerifyReport['headChecked'] = null;
  if (options.head !== undefined) {
    const wanted = parseHead(options.head);
    if (!wanted)
      throw new Error(
        `"${options.head}" is not a log head; it reads SEQ:HASH (a row number, a colon, 64 hex digits)`,
      );
    const row = study.log.row(wanted.seq);
    const text = `${wanted.seq}:${wanted.hash}`;
    const held = row?.hash === wanted.hash;
    headChecked = { head: text, held };
    if (!row) {
      breaks.push({
        check: 'head',
        seq: wanted.seq,
        problem: `the log no longer holds row ${wanted.seq} of the recorded head (it has ${study.log.count()} rows)`,
      });
    } else if (!held) {
      breaks.push({
        check: 'head',
        seq: wanted.seq,
        problem: `row ${wanted.seq} now has hash ${row.hash}, not the recorded ${wanted.hash} (the log was rewritten after the head was recorded)`,
      });
    }
  }
  return {
    intact: breaks.length === 0,
    fileIntact: integrity.length === 0,
    logRows: study.log.count(),
    head: study.log.head() ?? null,
    headChecked,
    breaks,
  };
}

/** Where a break is, in words: "log row 12", "item_revision (id 3): text". */
export function breakPlace(b: IntegrityBreak): string {
  const parts: string[] = [];
  if (b.table) parts.push(b.row ? `${b.table} (${b.row})` : b.table);
  if (
    b.seq !== undefined &&
    (b.check === 'log' || b.check === 'head' || b.check === 'analysis-run' || b.check === 'rerun')
  )
    parts.push(`log row ${b.seq}`);
  if (b.check === 'file') parts.push('the SQLite file');
  return parts.join(', ');
}
