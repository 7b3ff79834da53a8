import type { SignOffReview } from '../../app/api/contracts/phases.ts';
import { formatTime } from './components.tsx';
import { plural } from '../../app/api/format.ts';

/** How many changes are listed before "and N more" (the decision log has them all). */
const SHOWN = 6;

/**
 * Why a signed-off phase needs review: when it was signed off, and the changes in earlier phases
 * since then (log row, time, who, what), oldest first.
 */
export function NeedsReview({ review, compact = false }: { review: SignOffReview; compact?: boolean }) {
  const shown = review.changes.slice(0, compact ? 3 : SHOWN);
  const more = review.changes.length - shown.length;
  return (
    <div className="needs-review" role="status">
      <p className="needs-review-head">
        {plural(review.changes.length, 'change')} in earlier phases since {formatTime(review.since)}
      </p>
      <ul className="needs-review-changes">
        {shown.map((c) => (
          <li key={c.seq}>
            <span className="change-what">
              {c.phaseTitle}: {c.kind.replaceAll('-', ' ')} — {c.target}
            </span>
            <span className="change-when">
              log row {c.seq} · {formatTime(c.at)} · {c.by}
            </span>
          </li>
        ))}
      </ul>
      {more > 0 && (
        <p className="needs-review-more">
          and {plural(more, 'more change')}: see <a href="#/log">the decision log</a>
        </p>
      )}
      <p className="needs-review-foot">
        This phase was signed off {formatTime(review.signedOffAt)}
        {compact ? '.' : ': confirm it still valid, with a reason, or reopen it.'}
      </p>
    </div>
  );
}
