import { useCallback, useEffect, useState } from 'react';
import type { CommandOutput } from '../../app/api/commands.ts';
import { PHASE_TITLES } from '../../app/api/contracts/phases.ts';
import type { PhaseId } from '../../app/api/contracts/phases.ts';
import { call } from '../api/client.ts';
import { ErrorNote } from '../shared/components.tsx';
import { useMutation } from '../shared/use-command.ts';

type Last = CommandOutput<'log.lastChange'>;

/** A field that keeps its own undo: Ctrl+Z there is the field's, never the study's. */
function inTextField(target: EventTarget | null): boolean {
  if (!(target instanceof HTMLElement)) return false;
  return target.isContentEditable || target.closest('input, textarea, select, [contenteditable]') !== null;
}

/**
 * "Undo last change…": shows the most recent change in the decision log and, when it can be
 * undone, reverses it by a new, logged decision with the reason given. Ctrl+Z (or ⌘Z) outside a
 * text field opens it; inside a field the key stays the field's own undo.
 */
export function UndoLastChange() {
  const [open, setOpen] = useState(false);
  const [last, setLast] = useState<Last | undefined>(undefined);
  const [loadError, setLoadError] = useState<string | undefined>(undefined);
  const [reason, setReason] = useState('');
  const [done, setDone] = useState<string | undefined>(undefined);
  const undo = useMutation('log.undo');

  const show = useCallback(() => {
    setOpen(true);
    setDone(undefined);
    setReason('');
    undo.clearError();
    setLast(undefined);
    call('log.lastChange', {}).then(
      (value) => {
        setLast(value);
        setLoadError(undefined);
      },
      (e: Error) => setLoadError(e.message),
    );
  }, [undo.clearError]);

  useEffect(() => {
    const onKey = (e: KeyboardEvent) => {
      if (!(e.ctrlKey || e.metaKey) || e.shiftKey || e.altKey || e.key.toLowerCase() !== 'z') return;
      if (inTextField(e.target)) return;
      e.preventDefault();
      show();
    };
    window.addEventListener('keydown', onKey);
    return () => window.removeEventListener('keydown', onKey);
  }, [show]);

  async function confirm() {
    if (!last) return;
    const result = await undo.run({ seq: last.seq, reason });
    if (result) {
      setDone(`Row ${result.seq} reverses row ${last.seq}; both stay in the decision log.`);
      setLast(undefined);
    }
  }

  return (
    <>
      <button type="button" className="secondary small undo-open" onClick={show}>
        Undo last change…
      </button>
      {open && (
        <div className="undo-backdrop">
          <section className="undo-dialog" role="dialog" aria-modal="true" aria-label="Undo last change">
            <h2>Undo last change</h2>
            <ErrorNote message={loadError ?? undo.error} />
            {done && (
              <p className="verify-ok" role="status">
                {done}
              </p>
            )}
            {!done && last === null && <p className="muted">The decision log holds no change yet.</p>}
            {!done && last && (
              <>
                <p>
                  Last change: <strong>row {last.seq}</strong>, {last.kind.replaceAll('-', ' ')} —{' '}
                  {last.target} ({PHASE_TITLES[last.phase as PhaseId] ?? last.phase})
                </p>
                {last.undoable ? (
                  <>
                    <p>
                      Undoing it {last.effect}. Nothing is deleted: a new row records the reversal and your
                      reason.
                    </p>
                    <label htmlFor="undo-reason">Why undo it? (required)</label>
                    <textarea
                      id="undo-reason"
                      rows={3}
                      value={reason}
                      onChange={(e) => setReason(e.target.value)}
                    />
                  </>
                ) : (
                  <p className="error-note">This change cannot be undone here: {last.effect}.</p>
                )}
              </>
            )}
            <div className="button-row">
              {!done && last?.undoable && (
                <button
                  type="button"
                  className="primary"
                  disabled={undo.busy || reason.trim() === ''}
                  onClick={confirm}
                >
                  Undo row {last.seq}
                </button>
              )}
              <button type="button" className="secondary" onClick={() => setOpen(false)}>
                {done ? 'Close' : 'Cancel'}
              </button>
            </div>
          </section>
        </div>
      )}
    </>
  );
}
