import { useCallback, useState } from 'react';
import { ExportButton } from '../../shared/export-button.tsx';
import type { DecisionView, RoundSummary } from '../../../app/api/contracts/purification.ts';
import { ErrorNote, Panel } from '../../shared/components.tsx';
import { PhaseControls, SignOffAside } from '../../shared/phase-controls.tsx';
import { useQuery } from '../../shared/use-command.ts';
import { AlphaIfDeletedChart, DistributionChart, ItemTotalChart } from './charts.tsx';
import { DecisionPanel } from './DecisionPanel.tsx';
import { FacetDecision } from './FacetDecision.tsx';
import { FactorPanel } from './FactorPanel.tsx';
import { bounded, plural } from '../../../app/api/format.ts';
import { BatchDecision } from './BatchDecision.tsx';
import { HistoryPanel } from './HistoryPanel.tsx';
import { INITIAL_TABLE_VIEW, ItemTable, type TableView } from './ItemTable.tsx';
import { ReliabilityPanel } from './ReliabilityPanel.tsx';
import { RoundRunner } from './RoundRunner.tsx';
import './purification.css';

/**
 * Phase 5, the purification workbench: run a round on the pilot data, read its item table, charts
 * and reliabilities, decide on items with reasons about the domain and the statistics, and follow
 * the rounds as a history.
 */
export function PurificationScreen() {
  const view = useQuery('purification.view', {});
  const overview = useQuery('study.overview', {});
  const construct = useQuery('construct.get', {});
  const [chosenRound, setChosenRound] = useState<number | undefined>(undefined);
  const [selected, setSelected] = useState<string | undefined>(undefined);
  const [tableView, setTableView] = useState<TableView>(INITIAL_TABLE_VIEW);
  const phase = overview.data?.find((p) => p.id === 'purification');
  const latest = view.data?.rounds.at(-1);
  const roundId = chosenRound ?? latest?.id;
  const stored = useCallback((round: RoundSummary) => {
    setChosenRound(round.id);
  }, []);

  if (view.error) return <ErrorNote message={view.error} />;
  if (!view.data || !phase) return <p className="loading">Loading…</p>;
  const data = view.data;
  const locked = phase.status === 'signed-off';
  const next = data.next;

  return (
    <div className="screen purification">
      <header className="screen-head">
        <div>
          <p className="eyebrow">Phase 5</p>
          <h1>Purification</h1>
          <p className="muted">
            Analyse the items in rounds on the pilot data. Keep, move or drop items with a reason about the
            construct’s domain as well as the statistics; each round starts from the decisions before it.
          </p>
        </div>
      </header>
      {locked && (
        <p className="locked-note">
          This phase is signed off. Reopen it (with a reason) to run rounds or decide.
        </p>
      )}

      {!data.pilot || !next ? (
        <div className="two-column">
          <Panel title="No pilot data yet">
            <p>
              Import the pilot responses in the Pilot data phase. The first round then analyses every item of
              the pool that the data maps to a column.
            </p>
          </Panel>
          <SignOffAside phase={phase} />
        </div>
      ) : (
        <>
          <section className="panel run-panel" aria-label="Next round">
            <div className="run-facts">
              <p>
                <strong>Next: round {(latest?.number ?? 0) + 1}</strong> on{' '}
                {plural(next.items.length, 'item')} of “{data.pilot.name}” ({data.pilot.fileName}, SHA-256{' '}
                {data.pilot.fileSha256.slice(0, 12)}…): {plural(next.respondents, 'respondent')} after{' '}
                {plural(next.excluded, 'exclusion')}. Reverse-keyed items are scored {data.bounds.min} +{' '}
                {data.bounds.max} − x; the stored answers are not changed.
              </p>
              {next.pendingDecisions > 0 && latest && (
                <p className="pending-note" role="status">
                  {plural(next.pendingDecisions, 'decision')} since round {latest.number}: run round{' '}
                  {latest.number + 1} to see their effect.
                </p>
              )}
              {data.items.some((it) => it.status === 'not-in-data') && (
                <p className="hint">
                  Not in the pilot data (no mapped column):{' '}
                  {data.items
                    .filter((it) => it.status === 'not-in-data')
                    .map((it) => it.code)
                    .join(', ')}
                </p>
              )}
            </div>
            <RoundRunner
              nextNumber={(latest?.number ?? 0) + 1}
              items={next.items.length}
              disabled={locked || next.items.length < 2}
              facets={new Set(data.items.filter((it) => it.status === 'in').map((it) => it.facetId)).size}
              running={data.running[0]}
              onStored={stored}
            />
          </section>

          {data.rounds.length > 0 && (
            <nav className="round-tabs" aria-label="Rounds">
              {data.rounds.map((r) => (
                <button
                  key={r.id}
                  type="button"
                  className={r.id === roundId ? 'round-tab active' : 'round-tab'}
                  aria-current={r.id === roundId ? 'true' : undefined}
                  onClick={() => setChosenRound(r.id)}
                >
                  Round {r.number}
                  <span className="tab-alpha">α {bounded(r.alpha)}</span>
                </button>
              ))}
            </nav>
          )}

          {roundId === undefined ? (
            <div className="two-column">
              <Panel title="No round yet">
                <p>
                  Round 1 will analyse {plural(next.items.length, 'item')} on{' '}
                  {plural(next.respondents, 'respondent')}. It runs in the background; you can cancel it.
                </p>
              </Panel>
              <SignOffAside phase={phase} />
            </div>
          ) : (
            <RoundView
              roundId={roundId}
              selected={selected}
              onSelect={setSelected}
              facets={data.facets}
              decisions={data.decisions}
              locked={locked}
              anchors={construct.data?.construct.anchors ?? []}
              tableView={tableView}
              onTableView={setTableView}
            />
          )}

          {data.rounds.length > 0 && (
            <>
              <HistoryPanel
                rounds={data.rounds}
                decisions={data.decisions}
                criterion={data.criterion}
                selectedRound={roundId}
                onSelectRound={setChosenRound}
                locked={locked}
              />
              <div className="signoff-row">
                <Panel title="Sign-off">
                  <PhaseControls phase={phase} />
                </Panel>
              </div>
            </>
          )}
        </>
      )}
    </div>
  );
}

function RoundView(props: {
  roundId: number;
  selected: string | undefined;
  onSelect(code: string): void;
  facets: { id: number; name: string; definition: string }[];
  decisions: DecisionView[];
  locked: boolean;
  anchors: string[];
  tableView: TableView;
  onTableView(view: TableView): void;
}) {
  const round = useQuery('purification.round', { id: props.roundId });
  if (round.error) return <ErrorNote message={round.error} />;
  // A query keeps its last answer while the next loads: never show one round's numbers under another's tab.
  if (!round.data || round.data.summary.id !== props.roundId)
    return <p className="loading">Loading round…</p>;
  const detail = round.data;
  const row = detail.rows.find((r) => r.code === props.selected) ?? undefined;
  return (
    <div className="workbench">
      <div className="workbench-main">
        <ReliabilityPanel detail={detail} />
        <Panel
          title="Items"
          aside={
            <span className="muted">
              click a row to decide on the item · click a header to sort ·{' '}
              <ExportButton request={{ kind: 'purification-items', roundId: detail.summary.id }} />
            </span>
          }
        >
          <ItemTable
            rows={detail.rows}
            facets={detail.facets}
            rules={detail.rules}
            selected={props.selected}
            onSelect={props.onSelect}
            view={props.tableView}
            onView={props.onTableView}
          />
        </Panel>
        {detail.isLatest && !props.locked && <BatchDecision detail={detail} decisions={props.decisions} />}
        <FactorPanel detail={detail} />
        {detail.isLatest && !props.locked && <FacetDecision detail={detail} facets={props.facets} />}
        <Panel title="Charts">
          <div className="chart-pair">
            <AlphaIfDeletedChart rows={detail.rows} alpha={detail.scale.alpha.value} />
            <ItemTotalChart rows={detail.rows} threshold={detail.thresholds.minCorrectedItemTotal} />
          </div>
          <DistributionChart rows={detail.rows} min={detail.bounds.min} anchors={props.anchors} />
        </Panel>
      </div>
      <aside className="workbench-side">
        {row ? (
          <DecisionPanel
            row={row}
            detail={detail}
            facets={props.facets}
            history={props.decisions.filter((d) => d.itemId === row.itemId)}
            locked={props.locked}
          />
        ) : (
          <section className="panel decision-panel">
            <h2>Decide on an item</h2>
            <p className="muted">
              Pick an item in the table to see it beside its facet’s definition and to drop, keep or move it
              with your reasons.
            </p>
          </section>
        )}
      </aside>
    </div>
  );
}
