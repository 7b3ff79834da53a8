import { useEffect, useState } from 'react';
import type { CommandOutput } from '../../../app/api/commands.ts';
import { ErrorNote, Panel } from '../../shared/components.tsx';
import { SignOffAside } from '../../shared/phase-controls.tsx';
import { useMutation, useQuery } from '../../shared/use-command.ts';
import { STAT_LABELS, bounded, plural } from '../../../app/api/format.ts';
import { ReviewPacket } from './ReviewPacket.tsx';
import { RatingsPanel, RoundDetail, RoundSummary } from './RoundDetail.tsx';
import './review.css';

type View = CommandOutput<'review.get'>;

const PACKET_ROUTE = /^#\/phase\/review\/packet\/(\d+)/;

function usePacketRoute(): number | null {
  const [hash, setHash] = useState(window.location.hash);
  useEffect(() => {
    const onChange = () => setHash(window.location.hash);
    window.addEventListener('hashchange', onChange);
    return () => window.removeEventListener('hashchange', onChange);
  }, []);
  const match = PACKET_ROUTE.exec(hash);
  return match ? Number(match[1]) : null;
}

/** Phase 3: review rounds, or the printable packet of one round (#/phase/review/packet/ID). */
export function ReviewScreen() {
  const packet = usePacketRoute();
  return packet === null ? <ReviewWorkspace /> : <ReviewPacket roundId={packet} />;
}

function ReviewWorkspace() {
  const view = useQuery('review.get', {});
  const overview = useQuery('study.overview', {});
  const [selected, setSelected] = useState<number | null>(null);
  const phase = overview.data?.find((p) => p.id === 'review');
  if (view.error) return <ErrorNote message={view.error} />;
  if (!view.data || !phase) return <p className="loading">Loading…</p>;
  const locked = phase.status === 'signed-off';
  const rounds = view.data.rounds;
  const round = rounds.find((r) => r.id === selected) ?? rounds.at(-1);

  return (
    <div className="screen review-screen">
      <header className="screen-head">
        <div>
          <p className="eyebrow">Phase 3</p>
          <h1>Expert review</h1>
          <p className="muted">
            Send the items to a panel, import their ratings, read the content-validity statistics, and decide
            on each flagged item.
          </p>
        </div>
      </header>
      <div className="two-column">
        <div className="column-main">
          {locked && (
            <p className="locked-note">
              This phase is signed off. Reopen it (with a reason) to change it; the review packets stay
              available.
            </p>
          )}
          <nav className="round-tabs" aria-label="Review rounds">
            {rounds.map((r) => (
              <button
                type="button"
                key={r.id}
                className={r.id === round?.id ? 'round-tab active' : 'round-tab'}
                aria-pressed={r.id === round?.id}
                onClick={() => setSelected(r.id)}
              >
                <span className="round-tab-title">Round {r.number}</span>
                <span className="round-tab-meta">
                  {plural(r.items.length, 'item')} ·{' '}
                  {r.report ? `S-CVI/Ave ${bounded(r.report.sCviAve, 2)}` : 'no ratings yet'}
                </span>
              </button>
            ))}
            {!locked && <NewRound view={view.data} onCreated={setSelected} />}
          </nav>
          {round ? (
            <>
              <RoundSummary round={round} locked={locked} />
              <RatingsPanel
                key={round.id}
                round={round}
                maxFileBytes={view.data.maxFileBytes}
                locked={locked}
              />
            </>
          ) : (
            <Panel title="No review round yet">
              <p className="muted">
                Start a round: it covers the {plural(view.data.keptItems, 'item')} kept for review in the item
                pool. Then add the panel, set the rating form, print the packet, and import the ratings when
                they come back.
              </p>
            </Panel>
          )}
        </div>
        <SignOffAside phase={phase} />
      </div>
      {round && (
        <RoundDetail
          key={round.id}
          round={round}
          locked={locked}
          anchors={view.data.relevanceAnchors}
          benchmarks={view.data.benchmarks}
        />
      )}
      {view.data.comparison.rounds.length > 1 && <CompareRounds comparison={view.data.comparison} />}
    </div>
  );
}

function NewRound({ view, onCreated }: { view: View; onCreated(id: number): void }) {
  const add = useMutation('review.addRound');
  const [open, setOpen] = useState(false);
  const [label, setLabel] = useState('');
  const [scope, setScope] = useState<'kept' | 'revised'>('kept');
  const hasRounds = view.rounds.length > 0;
  if (!open) {
    return (
      <div className="new-round-row">
        <button type="button" className="secondary" onClick={() => setOpen(true)}>
          Start a new round…
        </button>
      </div>
    );
  }
  return (
    <form
      className="new-round"
      onSubmit={async (e) => {
        e.preventDefault();
        const id = await add.run({ label, scope });
        if (id !== undefined) {
          onCreated(id);
          setOpen(false);
          setLabel('');
        }
      }}
    >
      <input
        aria-label="Round label"
        placeholder="What this round is for (optional)"
        value={label}
        onChange={(e) => setLabel(e.target.value)}
      />
      <label className="inline-radio">
        <input type="radio" name="scope" checked={scope === 'kept'} onChange={() => setScope('kept')} />
        All {plural(view.keptItems, 'item')} kept for review
      </label>
      {hasRounds && (
        <label className="inline-radio">
          <input
            type="radio"
            name="scope"
            checked={scope === 'revised'}
            onChange={() => setScope('revised')}
          />
          Only the {plural(view.rewordedSinceRated, 'item')} reworded since last rated
        </label>
      )}
      <button type="submit" className="primary" disabled={add.busy}>
        Start round
      </button>
      <button type="button" className="link" onClick={() => setOpen(false)}>
        Cancel
      </button>
      {hasRounds && <p className="hint">The panel and the rating form are copied from the previous round.</p>}
      <ErrorNote message={add.error} />
    </form>
  );
}

function CompareRounds({ comparison }: { comparison: View['comparison'] }) {
  const [all, setAll] = useState(false);
  const shown = comparison.rows.filter((row) => Object.keys(row.cells).length > 1 || row.newInLatest);
  const rows = all ? comparison.rows : shown;
  const latest = comparison.rounds.at(-1);
  return (
    <Panel
      title="Rounds side by side"
      aside={
        <label className="inline-check">
          <input type="checkbox" checked={all} onChange={(e) => setAll(e.target.checked)} /> Show every item (
          {comparison.rows.length}), not only the {shown.length} rated again or new in round {latest}
        </label>
      }
    >
      <div className="table-scroll">
        <table className="data-table compare-table">
          <thead>
            <tr>
              <th rowSpan={2}>Item</th>
              {comparison.rounds.map((n) => (
                <th key={n} colSpan={2} className="round-group">
                  Round {n}
                </th>
              ))}
            </tr>
            <tr>
              {comparison.rounds.map((n) => [
                <th key={`${n}-i`} className="num">
                  {STAT_LABELS.iCvi}
                </th>,
                <th key={`${n}-k`} className="num">
                  {STAT_LABELS.modifiedKappa}
                </th>,
              ])}
            </tr>
          </thead>
          <tbody>
            {rows.map((row) => (
              <tr key={row.code} data-code={row.code}>
                <td className="nowrap">
                  {row.code}
                  {row.newInLatest && <span className="tag-note"> new in round {latest}</span>}
                </td>
                {comparison.rounds.map((n) => {
                  const cell = row.cells[n];
                  const flagged = (cell?.flags.length ?? 0) > 0;
                  return [
                    <td key={`${n}-i`} className={`num${flagged ? ' cell-flagged' : ''}`}>
                      {cell === undefined ? '' : bounded(cell?.iCvi, 2)}
                    </td>,
                    <td key={`${n}-k`} className={`num${flagged ? ' cell-flagged' : ''}`}>
                      {cell === undefined ? '' : bounded(cell?.modifiedKappa, 2)}
                    </td>,
                  ];
                })}
              </tr>
            ))}
          </tbody>
        </table>
        <table
          className="data-table compare-table compare-scale"
          aria-label="Scale-level content validity by round"
        >
          <thead>
            <tr>
              <th>Scale</th>
              {comparison.rounds.map((n) => (
                <th key={n} className="num">
                  Round {n}
                </th>
              ))}
            </tr>
          </thead>
          <tbody>
            {comparison.scale.map((line) => (
              <tr key={line.label} data-statistic={line.label}>
                <th scope="row">{line.label}</th>
                {comparison.rounds.map((n) => (
                  <td key={n} className="num">
                    {bounded(line.values[n], 2)}
                  </td>
                ))}
              </tr>
            ))}
          </tbody>
        </table>
      </div>
      <p className="hint">
        A blank cell: the item was not part of that round. The S-CVI of each round covers that round’s own
        items.
      </p>
    </Panel>
  );
}
