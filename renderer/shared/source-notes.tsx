import { sourceNotes } from '../../app/api/source-notes.ts';

/**
 * Rules of thumb under a table or panel, worded from the methods registry, each with a numbered
 * marker, and footnote-style notes giving their sources (with "details from memory" there, never in
 * the sentence).
 */
export function SourceNotes(props: { ids: readonly string[] }) {
  const { rules, notes } = sourceNotes(props.ids);
  return (
    <div className="source-notes">
      <ul className="source-notes-rules">
        {rules.map((r) => (
          <li key={r.id}>
            {r.wording}
            <sup>{r.marker}</sup>
          </li>
        ))}
      </ul>
      <ol className="source-notes-list">
        {notes.map((n, i) => (
          <li key={rules[i].id}>{n.replace(/^\[\d+\] /, '')}</li>
        ))}
      </ol>
    </div>
  );
}
