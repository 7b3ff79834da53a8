import { useState } from 'react';
import type { RunCheck } from '../../../app/api/contracts/history.ts';
import { call } from '../../api/client.ts';
import { ErrorNote, formatTime } from '../../shared/components.tsx';
import { historyLink } from '../../shared/history-links.ts';
import { useQuery } from '../../shared/use-command.ts';

function short(x: unknown): string {
  const text = JSON.stringify(x ?? null);
  return text.length > 60 ? `${text.slice(0, 59)}…` : text;
}

/** The outcome of re-running the run from its stored inputs, field by field where it differs. */
function RerunResult({ check }: { check: RunCheck }) {
  if (check.status === 'reproduced') {
    return (
      <p className="verify-ok" role="status">
        Reproduced: every result field recomputed from the stored inputs matches the stored one.
      </p>
    );
  }
  if (check.status !== 'differs') {
    return (
      <p className="error-note" role="status">
        {check.note}
      </p>
    );
  }
  return (
    <div className="error-note" role="status">
      <p>
        {check.differenceCount} result field{check.differenceCount === 1 ? '' : 's'} no longer reproduce
        {check.otherEngine ? ` (stored by engine ${check.engineVersion}, another version)` : ''}:
      </p>
      <table className="data-table rerun-table">
        <thead>
          <tr>
            <th>Field</th>
            <th>Stored</th>
            <th>Recomputed</th>
          </tr>
        </thead>
        <tbody>
          {check.differences.map((d) => (
            <tr key={d.field}>
              <td>
                <code>{d.field}</code>
              </td>
              <td>{short(d.stored)}</td>
              <td>{short(d.recomputed)}</td>
            </tr>
          ))}
        </tbody>
      </table>
    </div>
  );
}

/**
 * A stored analysis run as the decisions citing it rest on: what it read (inputs), how (options
 * and seed), which engine computed it, its results, and its digest against the one its log row
 * holds; it can be re-run here from its stored inputs.
 */
export function RunDetail({ id }: { id: number }) {
  const run = useQuery('history.run', { id });
  const [check, setCheck] = useState<RunCheck | undefined>();
  const [busy, setBusy] = useState(false);
  const [error, setError] = useState<string | undefined>();
  const r = run.data;

  async function rerun() {
    setBusy(true);
    setError(undefined);
    try {
      setCheck(await call('history.rerun', { id }));
    } catch (e) {
      setError((e as Error).message);
    } finally {
      setBusy(false);
    }
  }

  return (
    <div className="screen">
      <header className="screen-head">
        <div>
          <p className="eyebrow">
            <a href="#/log">Decision log</a> › Stored analysis run
          </p>
          <h1>
            Run #{id}
            {r ? `: ${r.title}` : ''}
          </h1>
          {r && (
            <p className="muted">
              Stored {formatTime(r.createdAt)} by {r.actor}, in the {r.phase} phase.
            </p>
          )}
        </div>
        <div className="head-actions">
          {r?.rerunnable && (
            <button type="button" className="secondary" disabled={busy} onClick={rerun}>
              {busy ? 'Re-running…' : 'Re-run from stored inputs'}
            </button>
          )}
        </div>
      </header>
      <ErrorNote message={run.error ?? error} />
      {check && <RerunResult check={check} />}
      {r && (
        <>
          <dl className="run-facts">
            <dt>Engine version</dt>
            <dd>{r.engineVersion}</dd>
            <dt>Seed</dt>
            <dd>{r.seed ?? 'none (not randomized)'}</dd>
            <dt>Recorded in</dt>
            <dd>
              {r.recordedBy === null ? (
                'no log row'
              ) : (
                <a href={historyLink.row(r.recordedBy)}>log row {r.recordedBy}</a>
              )}
            </dd>
            <dt>Decisions resting on it</dt>
            <dd>
              {r.citedBy.length === 0
                ? 'none yet'
                : r.citedBy.map((c, i) => (
                    <span key={c.seq}>
                      {i > 0 && ', '}
                      <a href={historyLink.row(c.seq)}>
                        row {c.seq}: {c.kind.replaceAll('-', ' ')} ({c.target})
                      </a>
                    </span>
                  ))}
            </dd>
            <dt>Digest</dt>
            <dd>
              <code className="hash">{r.digest.now}</code>{' '}
              <span className={r.digest.matches ? 'badge badge-signed-off' : 'badge badge-needs-review'}>
                {r.digest.matches ? 'matches its log row' : 'differs from its log row'}
              </span>
            </dd>
          </dl>
          <h2 className="run-section">Inputs</h2>
          <table className="data-table run-inputs" aria-label="Inputs">
            <tbody>
              {r.inputsSummary.map((line) => (
                <tr key={line.name}>
                  <th scope="row">{line.name}</th>
                  <td>{line.text}</td>
                </tr>
              ))}
            </tbody>
          </table>
          <h2 className="run-section">Results</h2>
          <table className="data-table run-inputs run-results-summary" aria-label="Results">
            <tbody>
              {r.resultsSummary.map((line) => (
                <tr key={line.name}>
                  <th scope="row">{line.name}</th>
                  <td>{typeof line.value === 'number' ? String(line.value) : JSON.stringify(line.value)}</td>
                </tr>
              ))}
            </tbody>
          </table>
          <h2 className="run-section">Options</h2>
          <pre className="run-json">{JSON.stringify(r.options, null, 2)}</pre>
          <details className="run-results">
            <summary>Results as stored (JSON)</summary>
            <pre className="run-json">{JSON.stringify(r.results, null, 2)}</pre>
          </details>
          <details>
            <summary>Inputs as stored (JSON)</summary>
            <pre className="run-json">{JSON.stringify(r.inputs, null, 2)}</pre>
          </details>
        </>
      )}
    </div>
  );
}
