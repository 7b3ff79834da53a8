import { useState } from 'react';
import { useMutation } from '../shared/use-command.ts';

/** "Working as …" with a way to change the name that log rows carry from now on. */
export function DisplayName({ name, user }: { name: string; user: string }) {
  const save = useMutation('settings.setDisplayName');
  const [editing, setEditing] = useState(false);
  const [draft, setDraft] = useState(name);
  if (!editing) {
    return (
      <p className="signed-in" title={`operating-system user: ${user}`}>
        Working as {name}{' '}
        <button
          type="button"
          className="link sidebar-link"
          onClick={() => {
            setDraft(name);
            setEditing(true);
          }}
        >
          change
        </button>
      </p>
    );
  }
  return (
    <form
      className="signed-in name-form"
      onSubmit={async (e) => {
        e.preventDefault();
        if ((await save.run({ name: draft })) !== undefined) setEditing(false);
      }}
    >
      <label htmlFor="display-name">Name shown in the decision log</label>
      <input id="display-name" value={draft} onChange={(e) => setDraft(e.target.value)} />
      <span className="button-row">
        <button type="submit" className="secondary" disabled={draft.trim() === ''}>
          Save
        </button>
        <button type="button" className="link sidebar-link" onClick={() => setEditing(false)}>
          Cancel
        </button>
      </span>
      {save.error && <span className="sidebar-error">{save.error}</span>}
    </form>
  );
}
