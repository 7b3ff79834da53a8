import {
  Bar,
  BarChart,
  CartesianGrid,
  ErrorBar,
  ResponsiveContainer,
  Scatter,
  ScatterChart,
  Tooltip,
  XAxis,
  YAxis,
} from 'recharts';
import { bounded, pCell, unbounded } from '../../../app/api/format.ts';
import type { GroupResult, MeasureResult } from '../../../app/api/contracts/validity.ts';
import { Panel } from '../../shared/components.tsx';
import { SourceNotes } from '../../shared/source-notes.tsx';
import { GroupForm, MeasureForm } from './ColumnSettings.tsx';
import { QuickRun, RunNote, type View } from './common.tsx';

const INK = '#4a5567';
const ACCENT = '#2f5d8a';
const TICK = { fontSize: 11, fill: INK };

function MeasureChart({ m, scoreName }: { m: MeasureResult; scoreName: string }) {
  const data = m.points.map(([x, y]) => ({ x, y }));
  return (
    <figure className="chart" aria-label={`${m.column} against the ${scoreName} score`}>
      <figcaption>
        {m.column} against the total score ({m.timing}): r = {bounded(m.correlation.r)}, slope{' '}
        {unbounded(m.regression.slope, 3)}
      </figcaption>
      <ResponsiveContainer width="100%" height={220}>
        <ScatterChart margin={{ top: 6, right: 16, bottom: 20, left: 4 }}>
          <CartesianGrid stroke="#dde2ea" />
          <XAxis
            type="number"
            dataKey="x"
            name="score"
            tick={TICK}
            domain={['dataMin', 'dataMax']}
            label={{ value: 'total score', position: 'insideBottom', offset: -10, fontSize: 11, fill: INK }}
          />
          <YAxis type="number" dataKey="y" name={m.column} tick={TICK} width={44} />
          <Tooltip />
          <Scatter data={data} fill={ACCENT} fillOpacity={0.35} isAnimationActive={false} />
        </ScatterChart>
      </ResponsiveContainer>
    </figure>
  );
}

function GroupChart({ g }: { g: GroupResult }) {
  const groups = g.anova?.groups ?? [g.comparison.a, g.comparison.b];
  const data = groups.map((s) => ({ name: s.name, mean: s.mean, error: (1.96 * s.sd) / Math.sqrt(s.n) }));
  return (
    <figure className="chart" aria-label={`Mean score by ${g.column}`}>
      <figcaption>Mean total score by {g.column}, with 95% intervals of the mean</figcaption>
      <ResponsiveContainer width="100%" height={200}>
        <BarChart data={data} margin={{ top: 6, right: 16, bottom: 4, left: 4 }}>
          <CartesianGrid vertical={false} stroke="#dde2ea" />
          <XAxis dataKey="name" tick={TICK} />
          <YAxis tick={TICK} width={44} />
          <Tooltip formatter={(v) => unbounded(Number(v))} />
          <Bar dataKey="mean" fill={ACCENT} isAnimationActive={false}>
            <ErrorBar dataKey="error" width={6} stroke={INK} />
          </Bar>
        </BarChart>
      </ResponsiveContainer>
    </figure>
  );
}

/** Criteria (concurrent and predictive), other measures and known groups: settings, results and charts. */
export function CriteriaTab({ view, locked }: { view: View; locked: boolean }) {
  const run = view.relationsRun;
  const r = run?.results;
  return (
    <>
      <Panel title="Columns of the validation data">
        {view.columns.measures.length + view.columns.groups.length === 0 && (
          <p className="muted">The validation data has no criterion or group columns.</p>
        )}
        {!locked &&
          view.columns.measures.map((row) => <MeasureForm key={row.column} row={row} view={view} />)}
        {!locked && view.columns.groups.map((row) => <GroupForm key={row.column} row={row} view={view} />)}
        {locked && (
          <ul>
            {view.columns.measures.map((m) => (
              <li key={m.column}>
                {m.column}:{' '}
                {m.setting
                  ? `${m.setting.timing}, reliability ${bounded(m.setting.reliability, 2)}`
                  : 'not described'}
              </li>
            ))}
          </ul>
        )}
        {!locked && (
          <QuickRun name="validity.runRelations" label="Analyse the relations" disabled={!view.validation} />
        )}
      </Panel>
      {run && r && (
        <Panel title="Criteria and other measures">
          <RunNote runId={run.runId} createdAt={run.createdAt} outOfDate={run.outOfDate} />
          <p className="muted">
            Score: sum of {r.score.items.length} items (reverse keys applied), α = {bounded(r.score.alpha)} on
            n = {r.score.n}; the correction for attenuation uses this α and each measure’s stated reliability.
          </p>
          <table className="data-table">
            <thead>
              <tr>
                <th>Measure</th>
                <th>Measured</th>
                <th className="num">n</th>
                <th className="num">r [95% CI]</th>
                <th className="num">Disattenuated</th>
                <th className="num">Slope (SE)</th>
                <th className="num">R²</th>
              </tr>
            </thead>
            <tbody>
              {r.measures.map((m) => (
                <tr key={m.column}>
                  <td>{m.column}</td>
                  <td>{m.timing === 'predictive' ? 'later (predictive)' : 'same time (concurrent)'}</td>
                  <td className="num">{m.correlation.n}</td>
                  <td className="num">
                    {bounded(m.correlation.r)} [{bounded(m.correlation.lower)}, {bounded(m.correlation.upper)}
                    ]
                  </td>
                  <td className="num">{bounded(m.correlation.disattenuated)}</td>
                  <td className="num">
                    {unbounded(m.regression.slope, 3)} ({unbounded(m.regression.slopeSE, 3)})
                  </td>
                  <td className="num">{bounded(m.regression.rSquared)}</td>
                </tr>
              ))}
            </tbody>
          </table>
          <div className="chart-grid">
            {r.measures.map((m) => (
              <MeasureChart key={m.column} m={m} scoreName={r.score.name} />
            ))}
          </div>
          <SourceNotes ids={['correlation.fisher-z', 'validity.disattenuation', 'regression.ols']} />
        </Panel>
      )}
      {run && r && r.groups.length > 0 && (
        <Panel title="Known groups">
          {r.groups.map((g) => (
            <div key={g.column}>
              <table className="data-table">
                <thead>
                  <tr>
                    <th>Comparison</th>
                    <th className="num">Means (SD)</th>
                    <th className="num">Welch t (df)</th>
                    <th className="num">p</th>
                    <th className="num">d [95% CI]</th>
                    <th className="num">g</th>
                    <th className="num">ANOVA F (df), η²</th>
                  </tr>
                </thead>
                <tbody>
                  <tr>
                    <td>
                      {g.comparison.a.name} vs {g.comparison.b.name}
                    </td>
                    <td className="num">
                      {unbounded(g.comparison.a.mean)} ({unbounded(g.comparison.a.sd)}) vs{' '}
                      {unbounded(g.comparison.b.mean)} ({unbounded(g.comparison.b.sd)})
                    </td>
                    <td className="num">
                      {unbounded(g.comparison.t)} ({unbounded(g.comparison.df, 1)})
                    </td>
                    <td className="num">{pCell(g.comparison.p)}</td>
                    <td className="num">
                      {unbounded(g.comparison.cohensD)} [{unbounded(g.dLower)}, {unbounded(g.dUpper)}]
                    </td>
                    <td className="num">{unbounded(g.comparison.hedgesG)}</td>
                    <td className="num">
                      {g.anova
                        ? `${unbounded(g.anova.F)} (${g.anova.df1}, ${g.anova.df2}), ${bounded(g.anova.etaSquared)}`
                        : ''}
                    </td>
                  </tr>
                </tbody>
              </table>
              <GroupChart g={g} />
            </div>
          ))}
          <p className="muted">
            The interval of d is the Welch interval of the mean difference over the pooled SD.
          </p>
          <SourceNotes ids={['t.welch', 'd.cohen', 'g.hedges', 'anova.one-way', 'effect.bands']} />
        </Panel>
      )}
    </>
  );
}
