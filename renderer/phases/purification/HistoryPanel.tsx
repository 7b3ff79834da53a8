import { useState } from 'react';
import { ExportButton } from '../../shared/export-button.tsx';
import type { DecisionView, RoundSummary } from '../../../app/api/contracts/purification.ts';
import { ErrorNote, Panel } from '../../shared/components.tsx';
import { useMutation } from '../../shared/use-command.ts';
import { AlphaHistoryChart } from './charts.tsx';
import { bounded, shortDate } from '../../../app/api/format.ts';
import type { ReliabilityCriterion } from '../../../app/api/contracts/purification.ts';
import { CriterionFootnote } from '../../shared/criterion.tsx';

function ReverseAction({ decision, locked }: { decision: DecisionView; locked: boolean }) {
  const reverse = useMutation('purification.reverse');
  const [open, setOpen] = useState(false);
  const [domain, setDomain] = useState('');
  const [statistics, setStatistics] = useState('');
  if (locked || decision.reversedBy !== null || !decision.inForce) return null;
  const label = decision.action === 'drop' ? 'Restore…' : 'Move back…';
  if (!open) {
    return (
      <button type="button" className="link" onClick={() => setOpen(true)}>
        {label}
      </button>
    );
  }
  return (
    <div className="reverse-form">
      <textarea
        aria-label={`Domain reason for reversing the ${decision.action} of ${decision.itemCode}`}
        placeholder="Construct domain: why the item belongs after all"
        rows={2}
        value={domain}
        onChange={(e) => setDomain(e.target.value)}
      />
      <textarea
        aria-label={`Statistical reason for reversing the ${decision.action} of ${decision.itemCode}`}
        placeholder="Statistics (optional)"
        rows={1}
        value={statistics}
        onChange={(e) => setStatistics(e.target.value)}
      />
      <div className="button-row">
        <button
          type="button"
          className="secondary"
          disabled={reverse.busy || (domain.trim() === '' && statistics.trim() === '')}
          onClick={async () => {
            const done = await reverse.run({
              decisionId: decision.id,
              domainRationale: domain,
              statisticalRationale: statistics,
            });
            if (done !== undefined) setOpen(false);
          }}
        >
          {decision.action === 'drop' ? 'Restore' : 'Move back'}
        </button>
        <button type="button" className="link" onClick={() => setOpen(false)}>
          Cancel
        </button>
      </div>
      <ErrorNote message={reverse.error} />
    </div>
  );
}

/** Rounds over time: alpha across rounds, which items left when and why, and every decision. */
export function HistoryPanel(props: {
  rounds: RoundSummary[];
  decisions: DecisionView[];
  criterion: ReliabilityCriterion;
  selectedRound: number | undefined;
  onSelectRound(id: number): void;
  locked: boolean;
}) {
  const { rounds, decisions } = props;
  const departures = decisions.filter((d) => d.action === 'drop');
  const ACTION: Record<DecisionView['action'], string> = {
    drop: 'dropped',
    keep: 'kept',
    move: 'moved',
    restore: 'restored',
  };
  return (
    <Panel
      title="History"
      aside={
        <span className="muted">
          every round and decision stays in the study ·{' '}
          <ExportButton request={{ kind: 'purification-rounds' }} label="Export rounds (CSV)" />
        </span>
      }
    >
      {rounds.length > 1 && <AlphaHistoryChart rounds={rounds} criterion={props.criterion} />}
      <table className="data-table history-table" aria-label="Rounds">
        <thead>
          <tr>
            <th>Round</th>
            <th>Run</th>
            <th className="num">Items</th>
            <th className="num">n</th>
            <th className="num">α</th>
            <th>CI (Feldt)</th>
            <th>Criterion</th>
            <th className="num">ω</th>
            <th>Left since the round before</th>
          </tr>
        </thead>
        <tbody>
          {rounds.map((r) => (
            <tr key={r.id} className={props.selectedRound === r.id ? 'selected' : undefined}>
              <td className="nowrap">
                <button type="button" className="link" onClick={() => props.onSelectRound(r.id)}>
                  Round {r.number}
                </button>
                {!r.onCurrentData && (
                  <span className="stale" title={r.outOfDate ?? undefined}>
                    older data
                  </span>
                )}
              </td>
              <td className="nowrap muted">
                {shortDate(r.createdAt)} · {r.actor}
              </td>
              <td className="num">{r.k}</td>
              <td className="num" title={r.missingText}>
                {r.n}
              </td>
              <td className="num">{bounded(r.alpha)}</td>
              <td className="nowrap" title={`${Math.round(r.ci.level * 100)}% confidence interval`}>
                {Math.round(r.ci.level * 100) !== 95 && `${Math.round(r.ci.level * 100)}%: `}
                {bounded(r.ci.lower)} to {bounded(r.ci.upper)}
              </td>
              <td>
                <span className={r.meetsCriterion ? 'criterion criterion-met' : 'criterion criterion-below'}>
                  {r.meetsCriterion ? 'meets' : 'below'}
                  <sup>*</sup>
                </span>
              </td>
              <td className="num">{bounded(r.omega)}</td>
              <td>
                {r.left.length > 0 && r.left.join(', ')}
                {r.left.length > 0 && r.returned.length > 0 && ' · '}
                {r.returned.length > 0 && <span className="muted">back: {r.returned.join(', ')}</span>}
                {r.left.length === 0 && r.returned.length === 0 && '—'}
              </td>
            </tr>
          ))}
        </tbody>
      </table>
      <CriterionFootnote criterion={props.criterion} />

      <h3 className="subhead">Items that left</h3>
      {departures.length === 0 ? (
        <p className="muted">No item has been dropped yet.</p>
      ) : (
        <table className="data-table departures" aria-label="Items that left">
          <thead>
            <tr>
              <th>Item</th>
              <th>Round</th>
              <th>Facet</th>
              <th>Why: construct domain</th>
              <th>Why: statistics</th>
              <th>Now</th>
            </tr>
          </thead>
          <tbody>
            {departures.map((d) => (
              <tr key={d.id}>
                <td className="nowrap">{d.itemCode}</td>
                <td className="nowrap">Round {d.roundNumber}</td>
                <td>{d.fromFacet ?? '—'}</td>
                <td className="rationale">
                  {d.domainRationale || <span className="stats-only">statistics only</span>}
                </td>
                <td className="rationale">{d.statisticalRationale || '—'}</td>
                <td className="nowrap">
                  {d.reversedBy !== null ? (
                    <span className="muted">restored later</span>
                  ) : (
                    <>
                      <span className="decision-tag tag-drop">out</span>{' '}
                      <ReverseAction decision={d} locked={props.locked} />
                    </>
                  )}
                </td>
              </tr>
            ))}
          </tbody>
        </table>
      )}

      {decisions.length > 0 && (
        <details className="all-decisions">
          <summary>All {decisions.length} decisions, oldest first</summary>
          <table className="data-table">
            <thead>
              <tr>
                <th>Round</th>
                <th>Item</th>
                <th>Decision</th>
                <th>Reasons</th>
                <th />
              </tr>
            </thead>
            <tbody>
              {decisions.map((d) => (
                <tr key={d.id}>
                  <td className="nowrap">Round {d.roundNumber}</td>
                  <td>{d.itemCode}</td>
                  <td className="nowrap">
                    {ACTION[d.action]}
                    {d.action === 'move' && ` ${d.fromFacet ?? 'no facet'} → ${d.toFacet}`}
                    {d.reversesId !== null && <span className="muted"> (reverses an earlier decision)</span>}
                    {d.statisticsOnly && <span className="stats-only">statistics only</span>}
                  </td>
                  <td className="rationale">
                    {d.domainRationale && <span>Domain: {d.domainRationale} </span>}
                    {d.statisticalRationale && <span>Statistics: {d.statisticalRationale}</span>}
                  </td>
                  <td>{d.action === 'move' && <ReverseAction decision={d} locked={props.locked} />}</td>
                </tr>
              ))}
            </tbody>
          </table>
        </details>
      )}
    </Panel>
  );
}
