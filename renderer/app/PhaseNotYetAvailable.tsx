import type { PhaseId } from '../../app/api/contracts/phases.ts';
import { Checklist } from '../shared/components.tsx';
import { useQuery } from '../shared/use-command.ts';

/** A phase whose tools are not in this version: says so, and shows what it will need. */
export function PhaseNotYetAvailable({ phase }: { phase: PhaseId }) {
  const overview = useQuery('study.overview', {});
  const info = overview.data?.find((p) => p.id === phase);
  if (!info) return null;
  return (
    <div className="screen">
      <header className="screen-head">
        <div>
          <p className="eyebrow">Phase</p>
          <h1>{info.title}</h1>
          <p className="muted">{info.purpose}</p>
        </div>
      </header>
      <section className="panel">
        <p>The screens for this phase are not in this version of Scalewright yet.</p>
        <Checklist items={info.checklist} />
      </section>
    </div>
  );
}
