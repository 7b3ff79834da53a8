import { bounded, pCell, unbounded } from '../../../app/api/format.ts';
import type { CfaJobOutput, MeasurementModel } from '../../../app/api/contracts/validity.ts';
import { ErrorNote, Panel, ReasonAction } from '../../shared/components.tsx';
import { SourceNotes } from '../../shared/source-notes.tsx';
import { useMutation } from '../../shared/use-command.ts';
import { call, RunNote, type View, WorkerRun } from './common.tsx';
import { InvariancePanel } from './InvariancePanel.tsx';
import { ModelEditor } from './ModelEditor.tsx';
import { PathFigure } from './PathFigure.tsx';

/** How many of the largest residual correlations the table lists. */
const RESIDUAL_ROWS = 10;

function FitTable({ output, cutoffs }: { output: CfaJobOutput; cutoffs: Record<string, number> }) {
  const f = output.fit;
  const rows: [string, string, string, boolean | null][] = [
    ['χ² (df)', `${unbounded(f.chiSquare)} (${f.df})`, '', null],
    ['p', pCell(f.p), '', null],
    ['CFI', bounded(f.cfi), `≥ ${bounded(cutoffs.cfi, 2)}`, f.cfi === null ? null : f.cfi >= cutoffs.cfi],
    ['TLI', bounded(f.tli), `≥ ${bounded(cutoffs.tli, 2)}`, f.tli === null ? null : f.tli >= cutoffs.tli],
    [
      'RMSEA [90% CI]',
      `${bounded(f.rmsea)} [${bounded(f.rmseaCI?.[0])}, ${bounded(f.rmseaCI?.[1])}]`,
      `≤ ${bounded(cutoffs.rmsea, 2)}`,
      f.rmsea === null ? null : f.rmsea <= cutoffs.rmsea,
    ],
    ['SRMR', bounded(f.srmr), `≤ ${bounded(cutoffs.srmr, 2)}`, f.srmr <= cutoffs.srmr],
  ];
  return (
    <table className="data-table fit-table">
      <thead>
        <tr>
          <th>Index</th>
          <th className="num">Value</th>
          <th>Cut-off (common practice)</th>
          <th>Meets it</th>
        </tr>
      </thead>
      <tbody>
        {rows.map(([name, value, cut, ok]) => (
          <tr key={name}>
            <td>{name}</td>
            <td className="num">{value}</td>
            <td>{cut}</td>
            <td>{ok === null ? '' : ok ? 'yes' : 'no'}</td>
          </tr>
        ))}
      </tbody>
    </table>
  );
}

function Hints({
  output,
  model,
  locked,
}: {
  output: CfaJobOutput;
  model: MeasurementModel;
  locked: boolean;
}) {
  const save = useMutation('validity.setModel');
  const hints = output.fit.hints;
  if (hints.length === 0)
    return <p className="muted">No fixed parameter would lower χ² by more than 3.84 if freed.</p>;
  return (
    <>
      <table className="data-table hint-table">
        <thead>
          <tr>
            <th>Parameter now fixed at zero</th>
            <th className="num">Index</th>
            <th className="num">Std. change</th>
            <th />
          </tr>
        </thead>
        <tbody>
          {hints.map((h) => (
            <tr key={`${h.kind}-${h.a}-${h.b}`}>
              <td>
                {h.kind === 'cross-loading'
                  ? `${h.b} also on ${h.a}`
                  : `residual covariance ${h.a} with ${h.b}`}
              </td>
              <td className="num">{unbounded(h.mi)}</td>
              <td className="num">{bounded(h.standardizedEpc)}</td>
              <td>
                {h.kind === 'residual covariance' && !locked && (
                  <ReasonAction
                    label="Free it…"
                    confirm="Free"
                    placeholder={`Why ${h.a} and ${h.b} share more than the factor (not the index)`}
                    onConfirm={(reason) =>
                      save.run({
                        model: {
                          ...model,
                          residualCovariances: [
                            ...model.residualCovariances,
                            { a: h.a, b: h.b, rationale: reason },
                          ],
                        },
                        rationale: `Residual covariance ${h.a} with ${h.b} freed (modification index ${unbounded(h.mi)}): ${reason}`,
                      })
                    }
                  />
                )}
              </td>
            </tr>
          ))}
        </tbody>
      </table>
      <ErrorNote message={save.error} />
    </>
  );
}

function Residuals({ output }: { output: CfaJobOutput }) {
  const r = output.fit.groups[0].residualCorrelations;
  const items = output.fit.items;
  const pairs: { a: string; b: string; v: number }[] = [];
  for (let i = 0; i < items.length; i++)
    for (let j = 0; j < i; j++) pairs.push({ a: items[j], b: items[i], v: r[i][j] });
  pairs.sort((x, y) => Math.abs(y.v) - Math.abs(x.v));
  return (
    <table className="data-table residual-table">
      <thead>
        <tr>
          <th>Items</th>
          <th className="num">Observed − implied r</th>
        </tr>
      </thead>
      <tbody>
        {pairs.slice(0, RESIDUAL_ROWS).map((p) => (
          <tr key={`${p.a}-${p.b}`}>
            <td>
              {p.a} with {p.b}
            </td>
            <td className="num">{bounded(p.v)}</td>
          </tr>
        ))}
      </tbody>
    </table>
  );
}

function Reliability({ output }: { output: CfaJobOutput }) {
  return (
    <>
      <table className="data-table cr-table">
        <thead>
          <tr>
            <th>Factor</th>
            <th className="num">CR</th>
            <th className="num">AVE</th>
            <th className="num">√AVE</th>
            <th className="num">Largest r with another factor</th>
            <th>Fornell–Larcker</th>
          </tr>
        </thead>
        <tbody>
          {output.reliability.map((r) => (
            <tr key={r.factor}>
              <td>{r.factor}</td>
              <td className="num">{bounded(r.compositeReliability)}</td>
              <td className="num">{bounded(r.ave)}</td>
              <td className="num">{bounded(r.sqrtAve)}</td>
              <td className="num">{bounded(r.maxCorrelation)}</td>
              <td>{r.fornellLarcker ? 'met' : 'not met'}</td>
            </tr>
          ))}
        </tbody>
      </table>
      {output.htmt.length > 0 && (
        <table className="data-table htmt-table">
          <thead>
            <tr>
              <th>Factors</th>
              <th className="num">HTMT</th>
            </tr>
          </thead>
          <tbody>
            {output.htmt.map((p) => (
              <tr key={`${p.a}-${p.b}`}>
                <td>
                  {p.a} · {p.b}
                </td>
                <td className="num">{bounded(p.value)}</td>
              </tr>
            ))}
          </tbody>
        </table>
      )}
    </>
  );
}

/** Internal structure: the model, its CFA (fit, figure, residuals, hints, construct reliability) and invariance. */
export function StructureTab({ view, locked }: { view: View; locked: boolean }) {
  const cfa = view.cfa;
  const cutoffs = view.rules.find((r) => r.id === 'cfa.cutoffs')?.thresholds ?? {};
  const running = view.running.find((r) => r.kind === 'cfa');
  return (
    <>
      <ModelEditor view={view} locked={locked} />
      <Panel title="Confirmatory factor analysis">
        <p className="muted">
          Maximum likelihood on the respondents of the current validation data who answered every item of the
          model.
        </p>
        {!locked && (
          <WorkerRun
            label={cfa ? 'Run the CFA again' : 'Run the CFA'}
            busyLabel="Fitting the model"
            disabled={!view.validation}
            running={running}
            start={() => call('validity.startCfa', {})}
          />
        )}
        {cfa && (
          <div data-testid="cfa-results">
            <RunNote runId={cfa.runId} createdAt={cfa.createdAt} outOfDate={cfa.outOfDate} />
            <p>
              n = {cfa.inputs.n} ({cfa.inputs.incomplete} left out with a missing answer),{' '}
              {cfa.inputs.items.length} items, {cfa.results.fit.factors.length} factors
              {cfa.results.fit.converged ? '' : '; the estimate did not converge'}.
            </p>
            {cfa.results.fit.warnings.map((w) => (
              <p key={w} className="stale">
                {w}
              </p>
            ))}
            <FitTable output={cfa.results} cutoffs={cutoffs} />
            <PathFigure output={cfa.results} model={cfa.inputs.model} />
            <h3 className="sub-head">Largest residual correlations</h3>
            <Residuals output={cfa.results} />
            <h3 className="sub-head">Modification hints</h3>
            <Hints output={cfa.results} model={cfa.inputs.model} locked={locked || cfa.outOfDate !== null} />
            <h3 className="sub-head">Composite reliability, AVE and discriminant validity</h3>
            <Reliability output={cfa.results} />
            <SourceNotes
              ids={[
                'cfa.cutoffs',
                'rmsea.bands',
                'cr.criterion',
                'fornell-larcker',
                'htmt',
                'cfa.residual-hint',
              ]}
            />
          </div>
        )}
      </Panel>
      <InvariancePanel view={view} locked={locked} />
    </>
  );
}
