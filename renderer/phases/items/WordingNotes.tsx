import { bounded, unbounded } from '../../../app/api/format.ts';
import type { WordingCheck, WordingReport } from '../../../app/api/contracts/items.ts';

const CHECK_LABEL: Record<WordingCheck, string> = {
  length: 'Long',
  'double-barrelled': 'Double-barrelled',
  'double-negative': 'Double negative',
  absolute: 'Absolute',
  jargon: 'Jargon',
  readability: 'Hard to read',
};

export interface NearMatch {
  code: string;
  similarity: number | null;
}

/**
 * The wording checks beside an item: readability figures, then one line per flag with its reason,
 * then the pool items it is worded almost like. Advice only.
 */
export function WordingNotes({ wording, matches }: { wording: WordingReport; matches: NearMatch[] }) {
  const clean = wording.flags.length === 0 && matches.length === 0;
  return (
    <div className="wording" aria-live="polite">
      <p className="wording-figures">
        {wording.readingEase === null ? (
          'No words yet'
        ) : (
          <>
            <span title="Flesch Reading Ease (Flesch 1948): higher is easier; 60–70 reads as plain English">
              Reading ease <strong>{unbounded(wording.readingEase, 0)}</strong>
            </span>
            <span title="Flesch–Kincaid grade (Kincaid et al. 1975): the US school grade the text suits">
              Grade <strong>{unbounded(wording.gradeLevel ?? 0, 1)}</strong>
            </span>
            <span>
              {wording.words} word{wording.words === 1 ? '' : 's'}
            </span>
          </>
        )}
      </p>
      {clean && wording.words > 0 && <p className="wording-clean">No wording flags</p>}
      {(wording.flags.length > 0 || matches.length > 0) && (
        <ul className="wording-flags">
          {wording.flags.map((flag) => (
            <li key={flag.check} className="wording-flag" data-check={flag.check}>
              <span className="flag-pill">{CHECK_LABEL[flag.check]}</span>
              <span className="flag-reason">{flag.reason}</span>
            </li>
          ))}
          {matches.map((m) => (
            <li key={m.code} className="wording-flag" data-check="near-duplicate">
              <span className="flag-pill">Near duplicate</span>
              <span className="flag-reason">
                worded almost like {m.code}
                {m.similarity !== null && ` (trigram similarity ${bounded(m.similarity, 2)})`}: keep one, or
                make each ask something distinct
              </span>
            </li>
          ))}
        </ul>
      )}
    </div>
  );
}
