import { Checklist, ErrorNote, phaseState, StatusBadge } from '../../shared/components.tsx';
import { NeedsReview } from '../../shared/needs-review.tsx';
import { useQuery } from '../../shared/use-command.ts';
import { InstrumentPanel } from './InstrumentPanel.tsx';

export function OverviewScreen() {
  const overview = useQuery('study.overview', {});
  const info = useQuery('study.info', {});
  if (overview.error) return <ErrorNote message={overview.error} />;
  if (!overview.data) return <p className="loading">Loading the study…</p>;
  const signed = overview.data.filter((p) => p.status === 'signed-off').length;
  const stale = overview.data.filter((p) => p.needsReview).length;
  return (
    <div className="screen">
      <header className="screen-head">
        <div>
          <p className="eyebrow">Study overview</p>
          <h1>{info.data?.title || 'Untitled study'}</h1>
          <p className="muted">
            {signed} of {overview.data.length} phases signed off
            {stale > 0 && `, ${stale} of them needing review after changes in earlier phases`} · every change
            is kept in the decision log
          </p>
        </div>
      </header>
      <ol className="phase-grid">
        {overview.data.map((phase, index) => (
          <li key={phase.id} className={`phase-card phase-${phaseState(phase)}`} data-phase={phase.id}>
            <div className="phase-card-head">
              <span className="phase-number">{index + 1}</span>
              <a href={`#/phase/${phase.id}`} className="phase-title">
                {phase.title}
              </a>
              <StatusBadge state={phaseState(phase)} />
            </div>
            <p className="phase-purpose">{phase.purpose}</p>
            {phase.holds.length > 0 && <p className="phase-holds">{phase.holds.join(' · ')}</p>}
            {phase.needsReview && <NeedsReview review={phase.needsReview} compact />}
            {(phase.status !== 'signed-off' || phase.needsReview) && phase.blockers.length > 0 && (
              <details className="blockers">
                <summary>
                  {phase.blockers.length} condition{phase.blockers.length === 1 ? '' : 's'} before sign-off
                </summary>
                <Checklist items={phase.checklist.filter((c) => !c.met)} />
              </details>
            )}
          </li>
        ))}
      </ol>
      <InstrumentPanel />
    </div>
  );
}
