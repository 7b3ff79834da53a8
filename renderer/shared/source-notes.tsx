import { sourceNotes } from '../../app/api/source-notes.ts';

/**
 * Rules of thumb under a table or panel, worded from the methods registry, each with a numbered
 * marker, and footnote-style notes giving their sources (with "details from memory" there, never in
 * the sentence). `withRules={false}` shows the notes alone, under a legend that words the rules itself
 * and places the markers (`sourceNotes(ids).rules` gives each id's number).
 */
export function SourceNotes(props: { ids: readonly string[]; withRules?: boolean }) {
  const { rules, notes } = sourceNotes(props.ids);
  if (rules.length === 0) return null;
  return (
    <div className="source-notes">
      {props.withRules !== false && (
        <ul className="source-notes-rules">
          {rules.map((r) => (
            <li key={r.id}>
              {r.wording}
              <sup>{r.marker}</sup>
            </li>
          ))}
        </ul>
      )}
      <ol className="source-notes-list">
        {notes.map((n, i) => (
          <li key={rules[i].id}>{n.replace(/^\[\d+\] /, '')}</li>
        ))}
      </ol>
    </div>
  );
}
