import type { StoryFigure, StoryStage } from '../../../app/api/contracts/history.ts';
import { bounded, count, unbounded } from '../../../app/api/format.ts';
import { ErrorNote, formatTime } from '../../shared/components.tsx';
import { historyLink } from '../../shared/history-links.ts';
import { useQuery } from '../../shared/use-command.ts';

const STAGE_LABEL: Record<StoryStage, string> = {
  drafted: 'Drafted',
  revised: 'Revised',
  edited: 'Edited',
  rated: 'Rated',
  analysed: 'Analysed',
  decided: 'Decided',
};

export function figureText(f: StoryFigure): string {
  if (f.form === 'count') return count(f.value);
  return f.form === 'bounded' ? bounded(f.value) : unbounded(f.value);
}

/** Choosing whose story to read: every item of the pool, retired ones too. */
function ItemPicker({ current }: { current: string }) {
  const items = useQuery('history.items', {});
  return (
    <label className="story-picker">
      Item{' '}
      <select
        aria-label="Item whose story to show"
        value={current}
        onChange={(e) => {
          window.location.hash = historyLink.item(e.target.value);
        }}
      >
        {(items.data ?? [{ code: current, text: '', state: '' }]).map((it) => (
          <option key={it.code} value={it.code}>
            {it.code}
            {it.state === 'retired' ? ' (retired)' : ''}
          </option>
        ))}
      </select>
    </label>
  );
}

/**
 * An item's life, in the order it happened: drafted, each rewording, each review round's figures,
 * each purification round's statistics, every decision with its reason; each step links to its log
 * row and to the stored analysis run it rests on.
 */
export function ItemStory({ code }: { code: string }) {
  const story = useQuery('history.itemStory', { code });
  const s = story.data;
  return (
    <div className="screen">
      <header className="screen-head">
        <div>
          <p className="eyebrow">
            <a href="#/log">Decision log</a> › Item life story
          </p>
          <h1>Item {s?.item.code ?? code}</h1>
          {s && <p className="story-wording">“{s.item.text}”</p>}
        </div>
        <div className="head-actions">
          <ItemPicker current={s?.item.code ?? code} />
        </div>
      </header>
      <ErrorNote message={story.error} />
      {s && (
        <>
          <dl className="story-facts">
            <dt>Facet</dt>
            <dd>{s.item.facet ?? 'none'}</dd>
            <dt>Keying</dt>
            <dd>{s.item.keying}</dd>
            <dt>Wordings</dt>
            <dd>{s.item.revisions}</dd>
            {s.item.formerCodes.length > 0 && (
              <>
                <dt>Earlier codes</dt>
                <dd>{s.item.formerCodes.join(', ')}</dd>
              </>
            )}
            <dt>Where it stands</dt>
            <dd className="story-standing">{s.standing}</dd>
          </dl>
          <ol className="story" aria-label={`Life story of item ${s.item.code}`}>
            {s.steps.map((step) => (
              <li key={step.seq} className={`story-step stage-${step.stage}`}>
                <div className="story-when">
                  <span className={`badge stage-badge stage-badge-${step.stage}`}>
                    {STAGE_LABEL[step.stage]}
                  </span>
                  <span className="muted">
                    {formatTime(step.at)} · {step.by}
                  </span>
                </div>
                <div className="story-body">
                  <p className="story-title">{step.title}</p>
                  {step.before !== null && (
                    <p className="story-change">
                      <del>{step.before}</del>
                      <span aria-hidden="true"> → </span>
                      <ins>{step.wording}</ins>
                    </p>
                  )}
                  {step.before === null && step.wording !== null && (
                    <p className="story-change">“{step.wording}”</p>
                  )}
                  {step.reason !== '' && <p className="story-reason">{step.reason}</p>}
                  {step.figures.length > 0 && (
                    <ul className="story-figures">
                      {step.figures.map((f) => (
                        <li key={f.label}>
                          {f.label} <strong>{figureText(f)}</strong>
                        </li>
                      ))}
                    </ul>
                  )}
                  <p className="story-links">
                    <a href={historyLink.row(step.seq)}>log row {step.seq}</a>
                    {step.runId !== null && (
                      <>
                        {' · '}
                        <a href={historyLink.run(step.runId)}>stored analysis run #{step.runId}</a>
                      </>
                    )}
                  </p>
                </div>
              </li>
            ))}
          </ol>
        </>
      )}
    </div>
  );
}
