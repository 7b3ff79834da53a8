import { useState } from 'react';
import type { PhaseOverview } from '../../app/phases/index.ts';
import { Checklist, ErrorNote, Panel, StatusBadge } from './components.tsx';
import { useMutation } from './use-command.ts';

/** Sign-off and reopen for one phase, each asking for the note that goes into the log. */
export function PhaseControls({ phase, compact = false }: { phase: PhaseOverview; compact?: boolean }) {
  const signOff = useMutation('phase.signOff');
  const reopen = useMutation('phase.reopen');
  const [note, setNote] = useState('');
  const [open, setOpen] = useState(false);
  const signedOff = phase.status === 'signed-off';
  const canSignOff = phase.blockers.length === 0;
  const mutation = signedOff ? reopen : signOff;

  async function submit() {
    const done = await mutation.run({ phase: phase.id, rationale: note });
    if (done !== undefined) {
      setNote('');
      setOpen(false);
    }
  }

  return (
    <div className="phase-controls">
      <div className="phase-controls-row">
        <StatusBadge status={phase.status} />
        {!open && (
          <button
            type="button"
            className={signedOff ? 'secondary' : 'primary'}
            disabled={!signedOff && !canSignOff}
            title={!signedOff && !canSignOff ? 'Every item of the checklist must be met first' : undefined}
            onClick={() => setOpen(true)}
          >
            {signedOff ? 'Reopen phase…' : 'Sign off phase…'}
          </button>
        )}
      </div>
      {open && (
        <div className="note-form">
          <label htmlFor={`note-${phase.id}`}>{signedOff ? 'Why reopen it?' : 'Sign-off note'}</label>
          <textarea
            id={`note-${phase.id}`}
            rows={2}
            value={note}
            onChange={(e) => setNote(e.target.value)}
            placeholder={signedOff ? 'What needs to change, and why' : 'What was agreed, and by whom'}
          />
          <div className="button-row">
            <button
              type="button"
              className="primary"
              disabled={note.trim() === '' || mutation.busy}
              onClick={submit}
            >
              {signedOff ? 'Reopen' : 'Sign off'}
            </button>
            <button type="button" className="link" onClick={() => setOpen(false)}>
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
