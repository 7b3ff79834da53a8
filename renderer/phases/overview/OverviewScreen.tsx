import { Checklist, ErrorNote, StatusBadge } from '../../shared/components.tsx';
import { useQuery } from '../../shared/use-command.ts';

export function OverviewScreen() {
  const overview = useQuery('study.overview', {});
  const info = useQuery('study.info', {});
  if (overview.error) return <ErrorNote message={overview.error} />;
  if (!overview.data) return <p className="loading">Loading the study…</p>;
  const signed = overview.data.filter((p) => p.status === 'signed-off').length;
  return (
    <div className="screen">
      <header className="screen-head">
        <div>
          <p className="eyebrow">Study overview</p>
          <h1>{info.data?.title || 'Untitled study'}</h1>
          <p className="muted">
            {signed} of {overview.data.length} phases signed off · every change is kept in the decision log
          </p>
        </div>
      </header>
      <ol className="phase-grid">
        {overview.data.map((phase, index) => (
          <li key={phase.id} className={`phase-card phase-${phase.status}`} data-phase={phase.id}>
            <div className="phase-card-head">
              <span className="phase-number">{index + 1}</span>
              <a href={`#/phase/${phase.id}`} className="phase-title">
                {phase.title}
              </a>
              <StatusBadge status={phase.status} />
            </div>
            <p className="phase-purpose">{phase.purpose}</p>
            {phase.holds.length > 0 && <p className="phase-holds">{phase.holds.join(' · ')}</p>}
            {phase.status !== 'signed-off' && phase.blockers.length > 0 && (
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
    </div>
  );
}
