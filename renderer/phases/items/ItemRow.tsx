import { useEffect, useRef, useState } from 'react';
import type { ItemView } from '../../../app/api/contracts/items.ts';
import type { FacetRecord } from '../../../app/api/contracts/construct.ts';
import type { ItemKeying, ItemSource, ItemState } from '../../../app/api/contracts/items.ts';
import { ErrorNote, formatTime, ReasonAction } from '../../shared/components.tsx';
import { useMutation, useQuery } from '../../shared/use-command.ts';
import { useLiveWording } from './use-wording.ts';
import { type NearMatch, WordingNotes } from './WordingNotes.tsx';
import { historyLink } from '../../shared/history-links.ts';

export const SOURCE_OPTIONS: { value: ItemSource; label: string }[] = [
  { value: 'literature', label: 'Literature' },
  { value: 'interviews', label: 'Interviews' },
  { value: 'expert-suggestion', label: 'Expert suggestion' },
  { value: 'own-drafting', label: 'Own drafting' },
];

const REASON_LABEL: Record<string, string> = {
  drafted: 'drafted',
  edited: 'reworded',
  imported: 'imported',
  'revised-after-review': 'revised after review',
};

/**
 * One item of the pool: its code, wording (checked as you type, saved as a new revision when the
 * field is left or Ctrl+Enter is pressed), facet, keying, source and state, with the wording checks
 * beside it.
 */
export function ItemRow(props: {
  item: ItemView;
  facets: FacetRecord[];
  similarity: Map<string, number>;
  locked: boolean;
}) {
  const { item, facets } = props;
  const edit = useMutation('items.edit');
  const reword = useMutation('items.reword');
  const setState = useMutation('items.setState');
  const [draft, setDraft] = useState(item.text);
  const [editing, setEditing] = useState(false);
  const [code, setCode] = useState(item.code);
  const [note, setNote] = useState(item.sourceNote);
  const [history, setHistory] = useState(false);
  const saved = useRef(item.text);
  const live = useLiveWording(editing ? draft : null, item.id);
  const retired = item.state === 'retired';

  useEffect(() => {
    if (!editing) {
      setDraft(item.text);
      saved.current = item.text;
    }
  }, [item.text, editing]);
  useEffect(() => setCode(item.code), [item.code]);
  useEffect(() => setNote(item.sourceNote), [item.sourceNote]);

  async function saveText() {
    setEditing(false);
    if (draft.trim() === saved.current) return;
    const done = await reword.run({ id: item.id, text: draft });
    if (done !== undefined) saved.current = draft.trim();
  }

  const wording = live.result?.wording ?? item.wording;
  const matches: NearMatch[] = live.result
    ? live.result.duplicates.map((d) => ({ code: d.code, similarity: d.similarity }))
    : item.nearDuplicates.map((c) => ({
        code: c,
        similarity: props.similarity.get(`${item.code}|${c}`) ?? null,
      }));
  const flagged = wording.flags.length > 0 || matches.length > 0;
  const error = edit.error ?? reword.error ?? setState.error ?? live.error;

  return (
    <li
      className={`item-row${flagged ? ' flagged' : ''}${retired ? ' retired' : ''}`}
      data-code={item.code}
      data-state={item.state}
    >
      <div className="item-code">
        <input
          aria-label={`Code of item ${item.code}`}
          value={code}
          disabled={retired}
          onChange={(e) => setCode(e.target.value)}
          onBlur={() => code.trim() !== item.code && edit.run({ id: item.id, code: code.trim() })}
        />
        {retired ? (
          <span className="state-tag state-retired">retired</span>
        ) : (
          <select
            className={`state-select state-${item.state}`}
            aria-label={`State of ${item.code}`}
            value={item.state}
            onChange={(e) => setState.run({ id: item.id, state: e.target.value as ItemState })}
          >
            <option value="draft">draft</option>
            <option value="kept">kept for review</option>
          </select>
        )}
      </div>
      <div className="item-body">
        <label className="sr-only" htmlFor={`item-text-${item.id}`}>
          Wording of item {item.code}
        </label>
        <textarea
          id={`item-text-${item.id}`}
          className="item-text"
          rows={1}
          value={draft}
          disabled={retired}
          onChange={(e) => {
            setDraft(e.target.value);
            setEditing(true);
          }}
          onBlur={() => void saveText()}
          onKeyDown={(e) => {
            if (e.key === 'Enter' && (e.ctrlKey || e.metaKey)) {
              e.preventDefault();
              void saveText();
            }
          }}
        />
        {(reword.busy || (editing && draft.trim() !== saved.current)) && (
          <p className="item-save" aria-live="polite">
            {reword.busy
              ? 'Saving…'
              : 'Edited: leave the field or press Ctrl+Enter to keep it as a new revision'}
          </p>
        )}
        <div className="item-meta">
          <select
            aria-label={`Facet of ${item.code}`}
            value={item.facetId ?? ''}
            disabled={retired}
            onChange={(e) =>
              edit.run({ id: item.id, facetId: e.target.value === '' ? null : Number(e.target.value) })
            }
          >
            <option value="">No facet yet</option>
            {facets.map((f) => (
              <option key={f.id} value={f.id}>
                {f.name}
              </option>
            ))}
          </select>
          <select
            aria-label={`Keying of ${item.code}`}
            value={item.keying}
            disabled={retired}
            onChange={(e) => edit.run({ id: item.id, keying: e.target.value as ItemKeying })}
          >
            <option value="forward">Forward-keyed</option>
            <option value="reverse">Reverse-keyed</option>
          </select>
          <select
            aria-label={`Source of ${item.code}`}
            value={item.sourceType}
            disabled={retired}
            onChange={(e) => edit.run({ id: item.id, sourceType: e.target.value as ItemSource })}
          >
            {SOURCE_OPTIONS.map((o) => (
              <option key={o.value} value={o.value}>
                {o.label}
              </option>
            ))}
          </select>
          <input
            className="source-note"
            aria-label={`Where ${item.code} came from`}
            placeholder="Where it came from"
            value={note}
            disabled={retired}
            onChange={(e) => setNote(e.target.value)}
            onBlur={() => note.trim() !== item.sourceNote && edit.run({ id: item.id, sourceNote: note })}
          />
          {!props.locked &&
            (retired ? (
              <ReasonAction
                label="Restore…"
                confirm="Restore item"
                placeholder={`Why restore ${item.code}?`}
                onConfirm={(rationale) => setState.run({ id: item.id, state: 'draft', rationale })}
              />
            ) : (
              <ReasonAction
                label="Retire…"
                confirm="Retire item"
                placeholder={`Why retire ${item.code}?`}
                onConfirm={(rationale) => setState.run({ id: item.id, state: 'retired', rationale })}
              />
            ))}
          {item.revision > 1 ? (
            <button
              type="button"
              className="link revision-toggle"
              onClick={() => setHistory(!history)}
              aria-expanded={history}
            >
              Revision {item.revision}: {history ? 'hide' : 'show'} history
            </button>
          ) : (
            <span className="revision-toggle muted">Revision 1</span>
          )}
          <a
            className="life-story-link"
            href={historyLink.item(item.code)}
            aria-label={`Life story of item ${item.code}`}
          >
            Life story
          </a>
        </div>
        {history && <RevisionHistory itemId={item.id} />}
        <ErrorNote message={error} />
      </div>
      <WordingNotes wording={wording} matches={matches} />
    </li>
  );
}

function RevisionHistory({ itemId }: { itemId: number }) {
  const revisions = useQuery('items.revisions', { id: itemId });
  if (!revisions.data) return null;
  return (
    <ol className="revision-list">
      {revisions.data.map((r) => (
        <li key={r.id}>
          <span className="revision-number">{r.number}</span>
          <span className="revision-text">{r.text}</span>
          <span className="muted">
            {REASON_LABEL[r.reason] ?? r.reason} · {formatTime(r.createdAt)}
          </span>
        </li>
      ))}
    </ol>
  );
}
