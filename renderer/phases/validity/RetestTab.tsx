import { CartesianGrid, ResponsiveContainer, Scatter, ScatterChart, Tooltip, XAxis, YAxis } from 'recharts';
import { bounded, pCell, unbounded } from '../../../app/api/format.ts';
import { Panel } from '../../shared/components.tsx';
import { SourceNotes } from '../../shared/source-notes.tsx';
import { QuickRun, RunNote, type View } from './common.tsx';

const TICK = { fontSize: 11, fill: '#4a5567' };

/** Test–retest reliability of the total score: the six ICC forms with intervals, SEM and MDC. */
export function RetestTab({ view, locked }: { view: View; locked: boolean }) {
  const run = view.retestRun;
  const r = run?.results;
  return (
    <Panel title="Test–retest reliability">
      <p className="muted">
        The current retest data
        {view.retest ? ` (“${view.retest.name}”, ${view.retest.respondents} rows)` : ' (none yet)'} linked to
        the first occasion by respondent id or retest link; total score of the model’s items.
      </p>
      {!locked && (
        <QuickRun
          name="validity.runRetest"
          label={run ? 'Analyse the retest again' : 'Analyse the retest'}
          disabled={!view.retest}
        />
      )}
      {run && r && (
        <div data-testid="retest-results">
          <RunNote runId={run.runId} createdAt={run.createdAt} outOfDate={run.outOfDate} />
          <p>
            {r.pairs} respondents of “{r.first.name}” ({r.first.role} data) linked by {r.linkedBy};{' '}
            {r.unmatched} retest rows without a first occasion, {r.incomplete} with a missing answer. SEM ={' '}
            {unbounded(r.sem)} and MDC95 = {unbounded(r.mdc95)} score points, from {r.form}.
          </p>
          <table className="data-table">
            <thead>
              <tr>
                <th>Form</th>
                <th>Model</th>
                <th>Type</th>
                <th className="num">ICC [95% CI]</th>
                <th className="num">F (df)</th>
                <th className="num">p</th>
              </tr>
            </thead>
            <tbody>
              {r.icc.forms.map((f) => (
                <tr key={f.form}>
                  <td>{f.form}</td>
                  <td>{f.model}</td>
                  <td>
                    {f.type}, {f.unit}
                  </td>
                  <td className="num">
                    {bounded(f.value)} [{bounded(f.lower)}, {bounded(f.upper)}]
                  </td>
                  <td className="num">
                    {unbounded(f.F)} ({f.df1}, {f.df2})
                  </td>
                  <td className="num">{pCell(f.p)}</td>
                </tr>
              ))}
            </tbody>
          </table>
          <figure className="chart" aria-label="First against second occasion">
            <figcaption>Total score on the first occasion against the retest</figcaption>
            <ResponsiveContainer width="100%" height={240}>
              <ScatterChart margin={{ top: 6, right: 16, bottom: 20, left: 4 }}>
                <CartesianGrid stroke="#dde2ea" />
                <XAxis type="number" dataKey="x" name="first" tick={TICK} domain={['dataMin', 'dataMax']} />
                <YAxis
                  type="number"
                  dataKey="y"
                  name="retest"
                  tick={TICK}
                  width={44}
                  domain={['dataMin', 'dataMax']}
                />
                <Tooltip />
                <Scatter
                  data={r.points.map(([x, y]) => ({ x, y }))}
                  fill="#2f5d8a"
                  fillOpacity={0.5}
                  isAnimationActive={false}
                />
              </ScatterChart>
            </ResponsiveContainer>
          </figure>
          <SourceNotes ids={['icc.shrout-fleiss', 'icc.mcgraw-wong-ci', 'icc.sem', 'icc.mdc95']} />
        </div>
      )}
    </Panel>
  );
}
