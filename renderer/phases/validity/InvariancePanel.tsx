import { useState } from 'react';
import { bounded, pCell, unbounded } from '../../../app/api/format.ts';
import { Panel } from '../../shared/components.tsx';
import { SourceNotes } from '../../shared/source-notes.tsx';
import { call, RunNote, type View, WorkerRun } from './common.tsx';

/** Loadings are bounded statistics; intercepts are on the item's scale. */
function show(step: 'metric' | 'scalar', value: number): string {
  return step === 'metric' ? bounded(value, 2) : unbounded(value, 2);
}

/** Measurement invariance across the levels of a group column: the three steps and what to free when one fails. */
export function InvariancePanel({ view, locked }: { view: View; locked: boolean }) {
  const columns = view.columns.groups;
  const [column, setColumn] = useState(columns[0]?.column ?? '');
  const inv = view.invariance;
  const running = view.running.find((r) => r.kind === 'invariance');
  return (
    <Panel title="Measurement invariance across groups">
      {columns.length === 0 ? (
        <p className="muted">The validation data has no group column.</p>
      ) : (
        !locked && (
          <div className="inline-form">
            <label>
              Groups from{' '}
              <select value={column} onChange={(e) => setColumn(e.target.value)}>
                {columns.map((c) => (
                  <option key={c.column} value={c.column}>
                    {c.column} ({c.levels.map((l) => `${l.name}: ${l.n}`).join(', ')})
                  </option>
                ))}
              </select>
            </label>
            <WorkerRun
              label="Test invariance"
              busyLabel="Configural, metric and scalar models"
              running={running}
              start={() => call('validity.startInvariance', { groupColumn: column })}
            />
          </div>
        )
      )}
      <p className="muted">Groups need at least {view.minimumInvarianceGroup} complete cases each.</p>
      {inv && (
        <div data-testid="invariance-results">
          <RunNote runId={inv.runId} createdAt={inv.createdAt} outOfDate={inv.outOfDate} />
          <p>{inv.results.result.statement}</p>
          <table className="data-table">
            <thead>
              <tr>
                <th>Model</th>
                <th className="num">χ² (df)</th>
                <th className="num">CFI</th>
                <th className="num">RMSEA</th>
                <th className="num">Δχ² (Δdf)</th>
                <th className="num">p</th>
                <th className="num">ΔCFI</th>
                <th>Holds</th>
              </tr>
            </thead>
            <tbody>
              {inv.results.result.steps.map((s) => (
                <tr key={s.step}>
                  <td>{s.step}</td>
                  <td className="num">
                    {unbounded(s.fit.chiSquare)} ({s.fit.df})
                  </td>
                  <td className="num">{bounded(s.fit.cfi)}</td>
                  <td className="num">{bounded(s.fit.rmsea)}</td>
                  <td className="num">
                    {s.deltaChiSquare === null ? '' : `${unbounded(s.deltaChiSquare)} (${s.deltaDf})`}
                  </td>
                  <td className="num">{s.deltaP === null ? '' : pCell(s.deltaP)}</td>
                  <td className="num">{bounded(s.deltaCfi)}</td>
                  <td>{s.holds ? 'yes' : 'no'}</td>
                </tr>
              ))}
            </tbody>
          </table>
          {inv.results.candidates.map((c) => (
            <div key={c.step}>
              <h3 className="sub-head">
                The {c.step} step fails: {c.step === 'metric' ? 'loadings' : 'intercepts'} to consider freeing
              </h3>
              <ul>
                {c.items.map((it) => (
                  <li key={it.item}>
                    {it.item} on {it.factor}:{' '}
                    {it.byGroup.map((g) => `${g.group} ${show(c.step, g.value)}`).join(', ')} (spread{' '}
                    {show(c.step, it.spread)})
                  </li>
                ))}
              </ul>
            </div>
          ))}
          <SourceNotes ids={['invariance.delta-cfi', 'invariance.partial']} />
          <p className="muted">
            With several groups, RMSEA follows the √G convention of the methods registry (rmsea.multigroup).
          </p>
        </div>
      )}
    </Panel>
  );
}
