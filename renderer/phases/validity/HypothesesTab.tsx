import { bounded } from '../../../app/api/format.ts';
import { Panel } from '../../shared/components.tsx';
import { SourceNotes } from '../../shared/source-notes.tsx';
import { QuickRun, RunNote, type View } from './common.tsx';

const STRENGTH = { 'near-zero': 'near zero', weak: 'weak', moderate: 'moderate', strong: 'strong' } as const;

/**
 * The construct phase's planned relations (expected sign and rough strength) against what the
 * validation data show, with the rule stated, and the log rows that show each was recorded before
 * the validation data were imported (or that it was not).
 */
export function HypothesesTab({ view, locked }: { view: View; locked: boolean }) {
  const run = view.relationsRun;
  const results = run?.results.hypotheses ?? [];
  return (
    <Panel title="Planned relations tested">
      <p className="muted">
        Each relation planned in the Construct phase is tested by the column described as answering it (see
        Criteria and groups): correlations for convergent, discriminant and criterion relations, a
        standardized mean difference for known groups.
      </p>
      {!locked && (
        <QuickRun
          name="validity.runRelations"
          label={run ? 'Test them again' : 'Test the planned relations'}
          disabled={!view.validation}
        />
      )}
      {run && <RunNote runId={run.runId} createdAt={run.createdAt} outOfDate={run.outOfDate} />}
      <table className="data-table hypotheses-table">
        <thead>
          <tr>
            <th>Relation to</th>
            <th>Kind</th>
            <th>Expected</th>
            <th>Column</th>
            <th className="num">Observed [95% CI]</th>
            <th>Verdict</th>
            <th>Planned before the data?</th>
          </tr>
        </thead>
        <tbody>
          {view.relations.map((r) => {
            const h = results.find((x) => x.relationId === r.id);
            return (
              <tr key={r.id}>
                <td>{r.otherConstruct}</td>
                <td>{r.kind}</td>
                <td>
                  {r.expectedSign === 'none' ? 'none' : r.expectedSign}, {STRENGTH[r.expectedStrength]}
                </td>
                <td>{h?.column ?? '—'}</td>
                <td className="num">
                  {h?.observed
                    ? `${h.metric} = ${bounded(h.observed.estimate, 2)} [${bounded(h.observed.lower, 2)}, ${bounded(h.observed.upper, 2)}]`
                    : (h?.untested ?? 'not tested yet')}
                </td>
                <td className={h?.outcome ? `verdict ${h.outcome.verdict.replace(' ', '-')}` : ''}>
                  {h?.outcome?.verdict ?? ''}
                </td>
                <td className="timing" title={r.timing?.recorded?.head ?? ''}>
                  <strong>
                    {r.timing?.before === true ? 'yes' : r.timing?.before === false ? 'no' : '—'}
                  </strong>
                  <div className="muted">{r.timing?.statement}</div>
                  {r.timing?.recorded && (
                    <code className="row-head">{r.timing.recorded.head.slice(0, 20)}…</code>
                  )}
                </td>
              </tr>
            );
          })}
        </tbody>
      </table>
      {run && <p className="rule-note">Rule: {run.results.rule}</p>}
      {run?.results.warnings.map((w) => (
        <p key={w} className="stale">
          {w}
        </p>
      ))}
      <SourceNotes ids={['validity.hypotheses', 'effect.bands']} />
    </Panel>
  );
}
