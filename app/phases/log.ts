import Papa from 'papaparse';
import type { LogFilter } from '../../db/decision-log.ts';
import type { Study } from '../../db/study.ts';

/**
 * The decision log as CSV, narrowed by the same filters as the log screen, oldest row first. Every
 * row carries the head the log had when it was exported (`SEQ:HASH`), so a reader can check later,
 * with `project verify FILE --head SEQ:HASH`, that the study still holds the log this file came from.
 */
export function exportLogCsv(
  study: Study,
  filter: Omit<LogFilter, 'limit' | 'offset'>,
): { fileName: string; text: string; rows: number; head: string | null } {
  const head = study.log.head() ?? null;
  const entries = study.log.list(filter).reverse();
  const data = entries.map((e) => [
    String(e.seq),
    e.at,
    e.actorName,
    e.actorUser,
    e.phase,
    e.kind,
    e.target,
    e.rationale,
    e.runId === null ? '' : String(e.runId),
    JSON.stringify(e.detail),
    e.hash,
    head ?? '',
  ]);
  const text = Papa.unparse(
    {
      fields: [
        'seq',
        'at',
        'who',
        'os_user',
        'phase',
        'kind',
        'target',
        'rationale',
        'run',
        'detail',
        'hash',
        'log_head_at_export',
      ],
      data,
    },
    // A cell starting with =, +, - or @ would be run as a formula by a spreadsheet.
    { newline: '\r\n', escapeFormulae: true },
  );
  const seq = head?.split(':')[0] ?? '0';
  return { fileName: `decision-log-to-row-${seq}.csv`, text: `${text}\r\n`, rows: entries.length, head };
}
