import { useState } from 'react';
import type { PhaseOverview } from '../../app/api/contracts/phases.ts';
import { Checklist, ErrorNote, Panel, phaseState, StatusBadge } from './components.tsx';
import { NeedsReview } from './needs-review.tsx';
import { useMutation } from './use-command.ts';

type Action = 'signOff' | 'confirm' | 'reopen';

/** What each action's form asks for; every one writes its note into the decision log. */
const FORMS: Record<Action, { open: string; label: string; placeholder: string; submit: string }> = {
  signOff: {
    open: 'Sign off phase…',
    label: 'Sign-off note',
    placeholder: 'What was agreed, and by whom',
    submit: 'Sign off',
  },
  confirm: {
    open: 'Confirm still valid…',
    label: 'Why is it still valid?',
    placeholder: 'What you checked, and why the changes above leave this phase as it stands',
    submit: 'Confirm still valid',
  },
  reopen: {
    open: 'Reopen phase…',
    label: 'Why reopen it?',
    placeholder: 'What needs to change, and why',
    submit: 'Reopen',
  },
};

/**
 * Sign-off and reopen for one phase, each asking for the note that goes into the log. A signed-off
 * phase that needs review shows what changed before it; confirming it still valid signs it off
 * again (once its checklist, evaluated afresh, is met), or it can be reopened.
 */
export function PhaseControls({ phase, compact = false }: { phase: PhaseOverview; compact?: boolean }) {
  const signOff = useMutation('phase.signOff');
  const reopen = useMutation('phase.reopen');
  const [note, setNote] = useState('');
  const [action, setAction] = useState<Action | null>(null);
  const signedOff = phase.status === 'signed-off';
  const canSignOff = phase.blockers.length === 0;
  const actions: Action[] = phase.needsReview ? ['confirm', 'reopen'] : signedOff ? ['reopen'] : ['signOff'];
  const mutation = action === 'reopen' ? reopen : signOff;
  const blockedTitle = 'Every item of the checklist must be met first';

  async function submit() {
    const done = await mutation.run({ phase: phase.id, rationale: note });
    if (done !== undefined) {
      setNote('');
      setAction(null);
    }
  }

  return (
    <div className="phase-controls">
      <div className="phase-controls-row">
        <StatusBadge state={phaseState(phase)} />
        {action === null && (
          <div className="button-row">
            {actions.map((a, i) => {
              const blocked = a !== 'reopen' && !canSignOff;
              return (
                <button
                  key={a}
                  type="button"
                  className={i === 0 && a !== 'reopen' ? 'primary' : 'secondary'}
                  disabled={blocked}
                  title={blocked ? blockedTitle : undefined}
                  onClick={() => setAction(a)}
                >
                  {FORMS[a].open}
                </button>
              );
            })}
          </div>
        )}
      </div>
      {phase.needsReview && <NeedsReview review={phase.needsReview} />}
      {phase.needsReview && !canSignOff && action === null && (
        <p className="hint">
          To confirm it still valid, every item of the checklist below must be met; reopen the phase to change
          it.
        </p>
      )}
      {action !== null && (
        <div className="note-form">
          <label htmlFor={`note-${phase.id}`}>{FORMS[action].label}</label>
          <textarea
            id={`note-${phase.id}`}
            rows={2}
            value={note}
            onChange={(e) => setNote(e.target.value)}
            placeholder={FORMS[action].placeholder}
          />
          <div className="button-row">
            <button
              type="button"
              className="primary"
              disabled={note.trim() === '' || mutation.busy}
              onClick={submit}
            >
              {FORMS[action].submit}
            </button>
            <button type="button" className="link" onClick={() => setAction(null)}>
              Cancel
            </button>
          </div>
          <ErrorNote message={mutation.error} />
        </div>
      )}
      {!compact && <Checklist items={phase.checklist} />}
    </div>
  );
}

/** The sign-off column beside every phase screen. */
export function SignOffAside({ phase }: { phase: PhaseOverview }) {
  return (
    <aside className="column-side">
      <Panel title="Sign-off">
        <PhaseControls phase={phase} />
      </Panel>
    </aside>
  );
}
