import { useState } from 'react';
import { PHASE_TITLES } from '../../../app/phases/titles.ts';
import type { LogEntry } from '../../../db/decision-log.ts';
import type { PhaseId } from '../../../db/repos/phase-state.ts';
import { ErrorNote, formatTime } from '../../shared/components.tsx';
import { useMutation, useQuery } from '../../shared/use-command.ts';

export function DecisionLogScreen() {
  const [phase, setPhase] = useState<PhaseId | ''>('');
  const log = useQuery('log.list', phase === '' ? { limit: 500 } : { phase, limit: 500 });
  const verify = useMutation('log.verify');
  const [result, setResult] = useState<
    { rows: number; breaks: { seq: number; problem: string }[] } | undefined
  >();

  return (
    <div className="screen">
      <header className="screen-head">
        <div>
          <p className="eyebrow">Audit trail</p>
          <h1>Decision log</h1>
          <p className="muted">
            Every change, with who made it, when and why. Rows are chained by SHA-256, so an edited, removed
            or reordered row is detected.
          </p>
        </div>
        <div className="head-actions">
          <select
            aria-label="Filter by phase"
            value={phase}
            onChange={(e) => setPhase(e.target.value as PhaseId | '')}
          >
            <option value="">All phases</option>
            {Object.entries(PHASE_TITLES).map(([id, title]) => (
              <option key={id} value={id}>
                {title}
              </option>
            ))}
          </select>
          <button type="button" className="secondary" onClick={async () => setResult(await verify.run({}))}>
            Verify chain
          </button>
        </div>
      </header>
      {result && (
        <p className={result.breaks.length === 0 ? 'verify-ok' : 'error-note'} role="status">
          {result.breaks.length === 0
            ? `Chain intact: ${result.rows} rows checked.`
            : `Chain broken: ${result.breaks.map((b) => `row ${b.seq}: ${b.problem}`).join('; ')}`}
        </p>
      )}
      <ErrorNote message={log.error ?? verify.error} />
      {log.data && (
        <table className="data-table log-table">
          <thead>
            <tr>
              <th className="num">#</th>
              <th>When</th>
              <th>Who</th>
              <th>Phase</th>
              <th>What</th>
              <th>Target</th>
              <th>Rationale</th>
            </tr>
          </thead>
          <tbody>
            {log.data.entries.map((entry) => (
              <LogRow key={entry.seq} entry={entry} />
            ))}
          </tbody>
        </table>
      )}
    </div>
  );
}

/** One row; a click shows what changed (before and after), the run it rests on, and its hash. */
function LogRow({ entry }: { entry: LogEntry }) {
  const [open, setOpen] = useState(false);
  return (
    <>
      <tr className={open ? 'log-row open' : 'log-row'} onClick={() => setOpen(!open)}>
        <td className="num">{entry.seq}</td>
        <td className="nowrap">{formatTime(entry.at)}</td>
        <td title={entry.actorUser}>{entry.actorName}</td>
        <td>{PHASE_TITLES[entry.phase as PhaseId] ?? entry.phase}</td>
        <td>{entry.kind.replaceAll('-', ' ')}</td>
        <td>{entry.target}</td>
        <td className="rationale">{entry.rationale}</td>
      </tr>
      {open && (
        <tr className="log-detail">
          <td />
          <td colSpan={6}>
            <dl>
              {entry.runId !== null && (
                <>
                  <dt>Analysis run</dt>
                  <dd>#{entry.runId}</dd>
                </>
              )}
              <dt>Details</dt>
              <dd>
                <pre>{JSON.stringify(entry.detail, null, 2)}</pre>
              </dd>
              <dt>Hash</dt>
              <dd className="hash">{entry.hash}</dd>
              <dt>Operating-system user</dt>
              <dd>{entry.actorUser}</dd>
            </dl>
          </td>
        </tr>
      )}
    </>
  );
}
