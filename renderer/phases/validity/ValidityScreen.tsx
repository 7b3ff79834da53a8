import { useState } from 'react';
import { ErrorNote } from '../../shared/components.tsx';
import { SignOffAside } from '../../shared/phase-controls.tsx';
import { useQuery } from '../../shared/use-command.ts';
import { CriteriaTab } from './CriteriaTab.tsx';
import { HypothesesTab } from './HypothesesTab.tsx';
import { EvidenceOverview } from './EvidenceOverview.tsx';
import { RetestTab } from './RetestTab.tsx';
import { StructureTab } from './StructureTab.tsx';
import './validity.css';

const TABS = [
  { id: 'overview', label: 'Sources of evidence' },
  { id: 'structure', label: 'Internal structure' },
  { id: 'hypotheses', label: 'Hypotheses' },
  { id: 'criteria', label: 'Criteria and groups' },
  { id: 'retest', label: 'Retest' },
] as const;
type TabId = (typeof TABS)[number]['id'];

/**
 * Phase 6, validity evidence: the sources of evidence of the Standards for Educational and
 * Psychological Testing, each with what the study holds and lacks; the measurement model and its
 * CFA; the planned relations tested; criteria and known groups; retest reliability.
 */
export function ValidityScreen() {
  const view = useQuery('validity.view', {});
  const overview = useQuery('study.overview', {});
  const [tab, setTab] = useState<TabId>('overview');
  const phase = overview.data?.find((p) => p.id === 'validity');
  if (view.error) return <ErrorNote message={view.error} />;
  if (!view.data || !phase) return <p className="loading">Loading…</p>;
  const data = view.data;
  const locked = phase.status === 'signed-off';
  return (
    <div className="screen validity">
      <header className="screen-head">
        <div>
          <p className="eyebrow">Phase 6</p>
          <h1>Validity evidence</h1>
          <p className="muted">
            Evidence for the intended interpretation of the scores, gathered on new data: the current
            validation dataset
            {data.validation ? (
              <>
                {' '}
                “{data.validation.name}” ({data.validation.fileName}, {data.validation.respondents} rows,
                SHA-256 {data.validation.fileSha256.slice(0, 12)}…)
              </>
            ) : (
              ' (none imported yet)'
            )}
            , never the pilot. A new scale is not validated for diagnosis, hiring, admission or other
            high-stakes decisions.
          </p>
        </div>
      </header>
      {locked && (
        <p className="locked-note">This phase is signed off. Reopen it (with a reason) to change it.</p>
      )}
      <nav className="validity-tabs" aria-label="Validity evidence">
        {TABS.map((t) => (
          <button
            key={t.id}
            type="button"
            className={t.id === tab ? 'validity-tab active' : 'validity-tab'}
            aria-pressed={t.id === tab}
            onClick={() => setTab(t.id)}
          >
            {t.label}
          </button>
        ))}
      </nav>
      <div className="two-column">
        <div className="column-main">
          {tab === 'overview' && <EvidenceOverview view={data} locked={locked} />}
          {tab === 'structure' && <StructureTab view={data} locked={locked} />}
          {tab === 'hypotheses' && <HypothesesTab view={data} locked={locked} />}
          {tab === 'criteria' && <CriteriaTab view={data} locked={locked} />}
          {tab === 'retest' && <RetestTab view={data} locked={locked} />}
        </div>
        <SignOffAside phase={phase} />
      </div>
    </div>
  );
}
