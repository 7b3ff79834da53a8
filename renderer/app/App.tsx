import { useCallback, useEffect, useMemo, useState } from 'react';
import { PHASE_IDS, type PhaseId } from '../../app/api/contracts/phases.ts';
import { DecisionLogScreen } from '../phases/log/DecisionLogScreen.tsx';
import { OverviewScreen } from '../phases/overview/OverviewScreen.tsx';
import { ErrorNote, phaseState } from '../shared/components.tsx';
import { StudyRevision, useQuery } from '../shared/use-command.ts';
import { DisplayName } from './DisplayName.tsx';
import { PhaseNotYetAvailable } from './PhaseNotYetAvailable.tsx';
import { PHASE_SCREENS } from './phase-screens.ts';
import { StudyScreen } from './StudyScreen.tsx';
import { UndoLastChange } from './UndoLastChange.tsx';

type Route =
  | { screen: 'overview' }
  | { screen: 'study' }
  | { screen: 'log' }
  | { screen: 'phase'; phase: PhaseId };

function parseRoute(hash: string): Route {
  const phase = /^#\/phase\/([a-z]+)/.exec(hash)?.[1];
  if (phase && (PHASE_IDS as readonly string[]).includes(phase))
    return { screen: 'phase', phase: phase as PhaseId };
  if (hash.startsWith('#/log')) return { screen: 'log' };
  if (hash.startsWith('#/study')) return { screen: 'study' };
  return { screen: 'overview' };
}

function useRoute(): Route {
  const [hash, setHash] = useState(window.location.hash);
  useEffect(() => {
    const onChange = () => setHash(window.location.hash);
    window.addEventListener('hashchange', onChange);
    return () => window.removeEventListener('hashchange', onChange);
  }, []);
  return parseRoute(hash);
}

export function App() {
  const [revision, setRevision] = useState(0);
  const bump = useCallback(() => setRevision((r) => r + 1), []);
  const context = useMemo(() => ({ revision, bump }), [revision, bump]);
  return (
    <StudyRevision.Provider value={context}>
      <Shell />
    </StudyRevision.Provider>
  );
}

function Shell() {
  const route = useRoute();
  const info = useQuery('study.info', {});
  const overview = useQuery('study.overview', {});
  const Screen = route.screen === 'phase' ? PHASE_SCREENS[route.phase] : undefined;

  return (
    <div className="layout">
      <nav className="sidebar" aria-label="Study">
        <div className="brand">
          <span className="brand-mark" aria-hidden="true" />
          Scalewright
        </div>
        <p className="study-path" title={info.data?.path}>
          {info.data?.path.split(/[\\/]/).pop()}
        </p>
        <a href="#/study" className={route.screen === 'study' ? 'nav-item active' : 'nav-item'}>
          Open, new, copy…
        </a>
        <a href="#/overview" className={route.screen === 'overview' ? 'nav-item active' : 'nav-item'}>
          Overview
        </a>
        <p className="nav-group">Phases</p>
        {overview.data?.map((phase, index) => (
          <a
            key={phase.id}
            href={`#/phase/${phase.id}`}
            className={route.screen === 'phase' && route.phase === phase.id ? 'nav-item active' : 'nav-item'}
            title={phase.needsReview ? `${phase.title}: needs review` : undefined}
          >
            <span className={`dot dot-${phaseState(phase)}`} aria-hidden="true" />
            <span className="nav-number">{index + 1}</span> {phase.title}
          </a>
        ))}
        <p className="nav-group">Record</p>
        <a href="#/log" className={route.screen === 'log' ? 'nav-item active' : 'nav-item'}>
          Decision log
        </a>
        {info.data && <UndoLastChange />}
        {info.data && <DisplayName name={info.data.actor.name} user={info.data.actor.user} />}
      </nav>
      <main className="content">
        {route.screen !== 'study' && <ErrorNote message={info.error} />}
        {route.screen === 'study' && <StudyScreen />}
        {route.screen === 'overview' && <OverviewScreen />}
        {route.screen === 'log' && <DecisionLogScreen />}
        {route.screen === 'phase' && (Screen ? <Screen /> : <PhaseNotYetAvailable phase={route.phase} />)}
        <footer className="cautions">
          A new scale is not validated for diagnosis, hiring, admission or other high-stakes decisions. Data
          from human participants needs ethics approval and careful protection. Follow local regulations and
          licensed professional practice.
        </footer>
      </main>
    </div>
  );
}
