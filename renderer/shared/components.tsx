import { type ReactNode, useEffect, useRef, useState } from 'react';
import type { PhaseOverview } from '../../app/api/contracts/phases.ts';
import type { ChecklistItem } from '../../app/api/contracts/phases.ts';
import type { PhaseStatus } from '../../app/api/contracts/phases.ts';

/** What a phase shows: its state, or "needs review" for a sign-off that earlier changes overtook. */
export type PhaseState = PhaseStatus | 'needs-review';

const STATE_LABEL: Record<PhaseState, string> = {
  'not-started': 'Not started',
  'in-progress': 'In progress',
  'signed-off': 'Signed off',
  reopened: 'Reopened',
  'needs-review': 'Needs review',
};

/** The one place the badge, the overview card and the sidebar dot take their state from. */
export function phaseState(phase: Pick<PhaseOverview, 'status' | 'needsReview'>): PhaseState {
  return phase.needsReview ? 'needs-review' : phase.status;
}

export function StatusBadge({ state }: { state: PhaseState }) {
  return <span className={`badge badge-${state}`}>{STATE_LABEL[state]}</span>;
}

export function Checklist({ items }: { items: ChecklistItem[] }) {
  return (
    <ul className="checklist">
      {items.map((item) => (
        <li key={item.id} className={item.met ? 'met' : 'unmet'}>
          <span className="mark" aria-hidden="true">
            {item.met ? '✓' : '○'}
          </span>
          <span className="label">{item.label}</span>
          <span className="detail">{item.detail}</span>
        </li>
      ))}
    </ul>
  );
}

export function ErrorNote({ message }: { message?: string }) {
  if (!message) return null;
  return (
    <p className="error-note" role="alert">
      {message}
    </p>
  );
}

export function Panel({ title, children, aside }: { title: string; children: ReactNode; aside?: ReactNode }) {
  return (
    <section className="panel">
      <header className="panel-head">
        <h2>{title}</h2>
        {aside}
      </header>
      {children}
    </section>
  );
}

const AUTOSAVE_IDLE_MS = 800;

/**
 * A text field that saves itself: after a pause in typing and when it loses focus. It keeps what
 * the user typed if the save fails, and shows the reason.
 */
export function AutosaveField(props: {
  label: string;
  value: string;
  multiline?: boolean;
  rows?: number;
  hint?: string;
  name: string;
  onSave(value: string): Promise<boolean>;
}) {
  const [draft, setDraft] = useState(props.value);
  const [state, setState] = useState<'idle' | 'editing' | 'saving' | 'saved' | 'failed'>('idle');
  const timer = useRef<ReturnType<typeof setTimeout> | undefined>(undefined);
  const saved = useRef(props.value);
  /** What the field holds now, for code that runs after an await. */
  const current = useRef(props.value);
  /** While the field has focus the study's copy never replaces what is typed (nor its undo history). */
  const focused = useRef(false);

  // The study's value comes in (after any change reloads the queries). It replaces the field's text
  // only when the field is not being edited and holds nothing unsaved: otherwise a reload that lands
  // between two keystrokes would overwrite the newer text and break the field's own Ctrl+Z.
  useEffect(() => {
    if (focused.current || current.current !== saved.current) return;
    current.current = props.value;
    saved.current = props.value;
    setDraft(props.value);
  }, [props.value]);

  useEffect(() => () => clearTimeout(timer.current), []);

  async function save(value: string) {
    clearTimeout(timer.current);
    if (value === saved.current) {
      setState((s) => (s === 'editing' ? 'idle' : s));
      return;
    }
    setState('saving');
    const ok = await props.onSave(value);
    if (ok) saved.current = value;
    // Typing may have gone on while the save ran: the field then stays "editing" with its newer text.
    setState(!ok ? 'failed' : current.current === value ? 'saved' : 'editing');
  }

  function change(value: string) {
    current.current = value;
    setDraft(value);
    setState('editing');
    clearTimeout(timer.current);
    timer.current = setTimeout(() => void save(value), AUTOSAVE_IDLE_MS);
  }

  const common = {
    id: `field-${props.name}`,
    name: props.name,
    value: draft,
    onChange: (e: { target: { value: string } }) => change(e.target.value),
    onFocus: () => {
      focused.current = true;
    },
    onBlur: () => {
      focused.current = false;
      void save(current.current);
    },
  };
  return (
    <div className="field">
      <label htmlFor={common.id}>
        {props.label}
        <span className={`save-state save-${state}`} aria-live="polite">
          {state === 'saving'
            ? 'Saving…'
            : state === 'saved'
              ? 'Saved'
              : state === 'failed'
                ? 'Not saved'
                : ''}
        </span>
      </label>
      {props.multiline ? <textarea rows={props.rows ?? 3} {...common} /> : <input type="text" {...common} />}
      {props.hint && <p className="hint">{props.hint}</p>}
    </div>
  );
}

export function formatTime(iso: string): string {
  const d = new Date(iso);
  return `${d.toLocaleDateString(undefined, { year: 'numeric', month: 'short', day: 'numeric' })} ${d.toLocaleTimeString(undefined, { hour: '2-digit', minute: '2-digit' })}`;
}

/** A small action that needs a reason: a link that opens a one-line note and a confirm button. */
export function ReasonAction(props: {
  label: string;
  confirm: string;
  placeholder: string;
  onConfirm(reason: string): Promise<unknown>;
}) {
  const [open, setOpen] = useState(false);
  const [reason, setReason] = useState('');
  if (!open) {
    return (
      <button type="button" className="link" onClick={() => setOpen(true)}>
        {props.label}
      </button>
    );
  }
  return (
    <span className="reason-action">
      <input
        aria-label={props.placeholder}
        placeholder={props.placeholder}
        value={reason}
        onChange={(e) => setReason(e.target.value)}
      />
      <button
        type="button"
        className="secondary"
        disabled={reason.trim() === ''}
        onClick={async () => {
          await props.onConfirm(reason);
          setOpen(false);
          setReason('');
        }}
      >
        {props.confirm}
      </button>
      <button type="button" className="link" onClick={() => setOpen(false)}>
        Cancel
      </button>
    </span>
  );
}
