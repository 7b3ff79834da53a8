import { useEffect, useState } from 'react';
import type { DecisionView, RoundDetail, RoundItemRow } from '../../../app/api/contracts/purification.ts';
import { ErrorNote, formatTime } from '../../shared/components.tsx';
import { useMutation } from '../../shared/use-command.ts';
import { bounded } from '../../../app/api/format.ts';

type Action = 'drop' | 'keep' | 'move' | 'restore';

const ACTION_WORD: Record<Action, string> = {
  drop: 'Dropped',
  keep: 'Kept',
  move: 'Moved',
  restore: 'Restored',
};

/** One decision as a short record: what, when, by whom, and both reasons. */
export function DecisionNote({ decision }: { decision: DecisionView }) {
  return (
    <div className="decision-note">
      <p className="decision-line">
        <strong>{ACTION_WORD[decision.action]}</strong>
        {decision.action === 'move' && decision.toFacet ? ` to “${decision.toFacet}”` : ''} on round{' '}
        {decision.roundNumber}
        {decision.statisticsOnly && <span className="stats-only">statistics only</span>}
        {decision.reversedBy !== null && <span className="reversed">reversed later</span>}
        <span className="muted">
          {' '}
          · {decision.decidedBy}, {formatTime(decision.decidedAt)}
        </span>
      </p>
      {decision.domainRationale && (
        <p className="reason">
          <span className="reason-label">Domain</span> {decision.domainRationale}
        </p>
      )}
      {decision.statisticalRationale && (
        <p className="reason">
          <span className="reason-label">Statistics</span> {decision.statisticalRationale}
        </p>
      )}
    </div>
  );
}

/**
 * The selected item beside its facet's definition, its numbers in this round, and the decision
 * form that asks for both reasons: how the item relates to the construct's domain, and what the
 * statistics show.
 */
export function DecisionPanel(props: {
  row: RoundItemRow;
  detail: RoundDetail;
  facets: { id: number; name: string; definition: string }[];
  /** Every decision on this item, in any round, oldest first. */
  history: DecisionView[];
  locked: boolean;
}) {
  const { row, detail } = props;
  const decide = useMutation('purification.decide');
  const [domain, setDomain] = useState('');
  const [statistics, setStatistics] = useState('');
  const [toFacet, setToFacet] = useState<number | ''>('');
  const [done, setDone] = useState<string | undefined>(undefined);

  // A new item starts with an empty form.
  // biome-ignore lint/correctness/useExhaustiveDependencies: reset only when the item changes
  useEffect(() => {
    setDomain('');
    setStatistics('');
    setToFacet('');
    setDone(undefined);
    decide.clearError();
  }, [row.code]);

  const dropped = row.droppedNow;
  const canDecide = detail.isLatest && !props.locked;
  const others = props.facets.filter((f) => f.id !== row.facetId);

  async function submit(action: Action) {
    const value = await decide.run({
      roundId: detail.summary.id,
      itemCode: row.code,
      action,
      toFacetId: action === 'move' && toFacet !== '' ? toFacet : undefined,
      domainRationale: domain,
      statisticalRationale: statistics,
    });
    if (value !== undefined) {
      setDomain('');
      setStatistics('');
      setToFacet('');
      setDone(
        action === 'drop' && domain.trim() === ''
          ? `${row.code} dropped. Recorded as statistics only: no domain reason was given.`
          : `${ACTION_WORD[action]} ${row.code}. The next round starts from this decision.`,
      );
    }
  }

  const alpha = detail.scale.alpha.value;
  const s = row.stats;
  return (
    <section className="panel decision-panel" aria-label={`Decision on item ${row.code}`}>
      <header className="panel-head">
        <h2>
          Item {row.code}
          {row.keying === 'reverse' && <span className="keying"> R</span>}
        </h2>
        <span className="muted">round {detail.summary.number}</span>
      </header>
      <p className="item-text">“{row.text}”</p>
      <div className="facet-definition">
        <p className="eyebrow">Facet: {row.facetName ?? 'none'}</p>
        <p>{row.facetDefinition || 'This facet has no written definition yet.'}</p>
      </div>
      <dl className="item-numbers">
        <div>
          <dt>corrected item-total r</dt>
          <dd>{bounded(s.correctedItemTotal)}</dd>
        </div>
        <div>
          <dt>α if deleted</dt>
          <dd>
            {bounded(s.alphaIfDeleted)} <span className="muted">now {bounded(alpha)}</span>
          </dd>
        </div>
        {row.withinFacet && (
          <>
            <div>
              <dt>r within facet</dt>
              <dd>{bounded(row.withinFacet.correctedItemTotal)}</dd>
            </div>
            <div>
              <dt>facet α if deleted</dt>
              <dd>
                {bounded(row.withinFacet.alphaIfDeleted)}{' '}
                <span className="muted">now {bounded(row.withinFacet.facetAlpha)}</span>
              </dd>
            </div>
          </>
        )}
      </dl>
      {row.flags.length > 0 && (
        <ul className="flag-list">
          {row.flags.map((f) => (
            <li key={f.rule} title={detail.rules.find((r) => r.rule === f.rule)?.statement}>
              {f.text}
            </li>
          ))}
        </ul>
      )}

      {props.history.length > 0 && (
        <div className="item-decisions">
          <DecisionNote decision={props.history[props.history.length - 1]} />
          {props.history.length > 1 && (
            <details className="earlier-decisions">
              <summary>
                {props.history.length - 1} earlier decision{props.history.length > 2 ? 's' : ''} on this item
              </summary>
              {props.history
                .slice(0, -1)
                .reverse()
                .map((d) => (
                  <DecisionNote key={d.id} decision={d} />
                ))}
            </details>
          )}
        </div>
      )}

      {!detail.isLatest ? (
        <p className="hint">Decisions are made on the latest round; this round is kept as history.</p>
      ) : props.locked ? (
        <p className="hint">The phase is signed off. Reopen it (with a reason) to change decisions.</p>
      ) : (
        <form
          className="decision-form"
          onSubmit={(e) => {
            e.preventDefault();
          }}
        >
          <label htmlFor="rationale-domain">
            Construct domain
            <span className="hint">How does the item’s content fit the facet definition above, or not?</span>
          </label>
          <textarea
            id="rationale-domain"
            rows={3}
            value={domain}
            onChange={(e) => setDomain(e.target.value)}
            placeholder="e.g. asks about racing, which the construct excludes"
          />
          <label htmlFor="rationale-statistics">
            Statistics
            <span className="hint">What does this round show?</span>
          </label>
          <textarea
            id="rationale-statistics"
            rows={2}
            value={statistics}
            onChange={(e) => setStatistics(e.target.value)}
            placeholder="e.g. r = .12, far below the other items; α rises without it"
          />
          {dropped ? (
            <div className="button-row">
              <button
                type="button"
                className="primary"
                disabled={!canDecide || decide.busy}
                onClick={() => submit('restore')}
              >
                Restore to the next round
              </button>
            </div>
          ) : (
            <>
              <div className="button-row">
                <button
                  type="button"
                  className="danger"
                  disabled={!canDecide || decide.busy}
                  onClick={() => submit('drop')}
                >
                  Drop
                </button>
                <button
                  type="button"
                  className="secondary"
                  disabled={!canDecide || decide.busy}
                  onClick={() => submit('keep')}
                >
                  Keep
                </button>
              </div>
              <div className="button-row move-row">
                <select
                  aria-label="Move to facet"
                  value={toFacet}
                  onChange={(e) => setToFacet(e.target.value === '' ? '' : Number(e.target.value))}
                >
                  <option value="">Move to facet…</option>
                  {others.map((f) => (
                    <option key={f.id} value={f.id}>
                      {f.name}
                    </option>
                  ))}
                </select>
                <button
                  type="button"
                  className="secondary"
                  disabled={!canDecide || decide.busy || toFacet === ''}
                  onClick={() => submit('move')}
                >
                  Move
                </button>
              </div>
              <p className="hint">
                A drop with only the statistics filled in is allowed, but it is recorded as “statistics only”
                in the log and the methods appendix, and it holds up sign-off.
              </p>
            </>
          )}
          <ErrorNote message={decide.error} />
          {done && (
            <p className="done-note" role="status">
              {done}
            </p>
          )}
        </form>
      )}
    </section>
  );
}
