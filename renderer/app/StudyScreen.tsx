import { useContext, useEffect, useState } from 'react';
import type { CommandOutput } from '../../app/api/commands.ts';
import { call } from '../api/client.ts';
import { ErrorNote, Panel } from '../shared/components.tsx';
import { StudyRevision, useQuery } from '../shared/use-command.ts';

type Listing = CommandOutput<'study.listFolder'>;
const EXTENSION = '.scalewright';

/** Joins a folder the server listed and a file name the user typed, in the folder's own style. */
function inFolder(folder: string, name: string): string {
  const sep = folder.includes('\\') && !folder.includes('/') ? '\\' : '/';
  const file = name.trim().endsWith(EXTENSION) ? name.trim() : `${name.trim()}${EXTENSION}`;
  return folder.endsWith(sep) ? `${folder}${file}` : `${folder}${sep}${file}`;
}

/**
 * New, Open and Save a copy inside the app (browser mode has no native menu): recent studies, a
 * folder listing served by the main process (folders and study files only), and a path field.
 * Every path is checked again on the server; refusals show the study-file check's own message.
 */
export function StudyScreen() {
  const { bump, revision } = useContext(StudyRevision);
  const recent = useQuery('study.recent', {});
  const [folder, setFolder] = useState<string | undefined>(undefined);
  const [pathField, setPathField] = useState('');
  const [listing, setListing] = useState<Listing | undefined>(undefined);
  const [listError, setListError] = useState<string | undefined>(undefined);
  const [error, setError] = useState<string | undefined>(undefined);
  const [done, setDone] = useState<string | undefined>(undefined);
  const [newName, setNewName] = useState('');
  const [newTitle, setNewTitle] = useState('');
  const [copyName, setCopyName] = useState('');
  const [busy, setBusy] = useState(false);

  // biome-ignore lint/correctness/useExhaustiveDependencies: a change to the study (a copy written) lists again
  useEffect(() => {
    let live = true;
    call('study.listFolder', folder === undefined ? {} : { path: folder }).then(
      (value) => {
        if (!live) return;
        setListing(value);
        setPathField(value.path);
        setListError(undefined);
      },
      (e: Error) => live && setListError(e.message),
    );
    return () => {
      live = false;
    };
  }, [folder, revision]);

  async function act(work: () => Promise<string>, thenOverview: boolean) {
    setBusy(true);
    setError(undefined);
    setDone(undefined);
    try {
      setDone(await work());
      bump();
      if (thenOverview) window.location.hash = '#/overview';
    } catch (e) {
      setError((e as Error).message);
    } finally {
      setBusy(false);
    }
  }

  const open = (file: string) =>
    act(async () => `Opened ${(await call('study.open', { path: file })).path}`, true);
  const create = () =>
    listing &&
    act(async () => {
      const made = await call('study.create', { path: inFolder(listing.path, newName), title: newTitle });
      return `Created ${made.path}`;
    }, true);
  const saveCopy = () =>
    listing &&
    act(async () => {
      const copy = await call('study.saveCopy', { path: inFolder(listing.path, copyName) });
      return `Saved a copy to ${copy.path} (${copy.logRows.toLocaleString('en')} log rows checked)`;
    }, false);

  const current = recent.data?.current;
  return (
    <div className="screen study-screen">
      <header className="screen-head">
        <div>
          <p className="eyebrow">Study file</p>
          <h1>Open, create or copy a study</h1>
          <p className="muted">
            {current ? (
              <>
                Open now: <code className="study-current">{current}</code>
              </>
            ) : (
              'No study is open.'
            )}
          </p>
        </div>
      </header>
      <ErrorNote message={error} />
      {done && (
        <p className="verify-ok" role="status">
          {done}
        </p>
      )}
      <Panel title="Recent studies">
        <ErrorNote message={recent.error} />
        {recent.data && recent.data.studies.length === 0 && <p className="muted">None yet.</p>}
        <ul className="recent-list">
          {recent.data?.studies.map((s) => (
            <li key={s.path}>
              <code>{s.path}</code>
              {s.path === current ? (
                <span className="badge badge-signed-off">open</span>
              ) : s.exists ? (
                <button type="button" className="secondary" disabled={busy} onClick={() => open(s.path)}>
                  Open
                </button>
              ) : (
                <span className="muted">moved or deleted</span>
              )}
            </li>
          ))}
        </ul>
      </Panel>
      <Panel title="Browse">
        <form
          className="path-form"
          onSubmit={(e) => {
            e.preventDefault();
            if (pathField.trim().endsWith(EXTENSION)) open(pathField.trim());
            else setFolder(pathField.trim());
          }}
        >
          <label htmlFor="study-path-field">Folder or study file (absolute path)</label>
          <div className="button-row">
            <input
              id="study-path-field"
              className="path-input"
              value={pathField}
              onChange={(e) => setPathField(e.target.value)}
              spellCheck={false}
            />
            <button type="submit" className="secondary" disabled={busy}>
              {pathField.trim().endsWith(EXTENSION) ? 'Open' : 'Go'}
            </button>
          </div>
        </form>
        <ErrorNote message={listError} />
        {listing && (
          <ul className="folder-list" aria-label={`Contents of ${listing.path}`}>
            {listing.parent && (
              <li>
                <button type="button" className="link" onClick={() => setFolder(listing.parent ?? undefined)}>
                  ↑ Up to {listing.parent}
                </button>
              </li>
            )}
            {listing.entries.length === 0 && <li className="muted">No folders or study files here.</li>}
            {listing.entries.map((entry) => (
              <li key={entry.path} className={`entry-${entry.kind}`}>
                {entry.kind === 'folder' ? (
                  <button type="button" className="link" onClick={() => setFolder(entry.path)}>
                    <span aria-hidden="true">▸ </span>
                    {entry.name}/
                  </button>
                ) : (
                  <>
                    <span className="study-file-name">{entry.name}</span>
                    <button
                      type="button"
                      className="secondary"
                      disabled={busy || entry.path === current}
                      onClick={() => open(entry.path)}
                    >
                      {entry.path === current ? 'Open now' : 'Open'}
                    </button>
                  </>
                )}
              </li>
            ))}
          </ul>
        )}
      </Panel>
      <div className="field-pair">
        <Panel title="New study">
          <form
            onSubmit={(e) => {
              e.preventDefault();
              create();
            }}
          >
            <div className="field">
              <label htmlFor="new-study-title">Title</label>
              <input id="new-study-title" value={newTitle} onChange={(e) => setNewTitle(e.target.value)} />
            </div>
            <div className="field">
              <label htmlFor="new-study-name">File name</label>
              <input
                id="new-study-name"
                value={newName}
                placeholder={`my-scale${EXTENSION}`}
                onChange={(e) => setNewName(e.target.value)}
              />
              <p className="hint">
                Created in {listing?.path ?? 'the folder above'}; an existing file is never overwritten.
              </p>
            </div>
            <button type="submit" className="primary" disabled={busy || !listing || !newName.trim()}>
              Create study
            </button>
          </form>
        </Panel>
        <Panel title="Save a copy">
          <form
            onSubmit={(e) => {
              e.preventDefault();
              saveCopy();
            }}
          >
            <div className="field">
              <label htmlFor="copy-name">File name of the copy</label>
              <input
                id="copy-name"
                value={copyName}
                placeholder={`copy${EXTENSION}`}
                onChange={(e) => setCopyName(e.target.value)}
              />
              <p className="hint">
                Written to {listing?.path ?? 'the folder above'} and checked (integrity and the decision log)
                before it is kept; the open study stays open.
              </p>
            </div>
            <button
              type="submit"
              className="primary"
              disabled={busy || !current || !listing || !copyName.trim()}
            >
              Save a copy
            </button>
          </form>
        </Panel>
      </div>
    </div>
  );
}
