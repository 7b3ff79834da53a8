import { useState } from 'react';
import type { DecisionView, RoundDetail } from '../../../app/api/contracts/purification.ts';
import { plural } from '../../../app/api/format.ts';
import { ErrorNote, Panel } from '../../shared/components.tsx';
import { useMutation } from '../../shared/use-command.ts';

/**
 * One pair of reasons for several flagged items that still wait for a decision: each chosen item
 * gets its own decision and log row, all with these reasons.
 */
export function BatchDecision(props: { detail: RoundDetail; decisions: DecisionView[] }) {
  const decideMany = useMutation('purification.decideMany');
  const waiting = props.detail.rows.filter(
    (row) => row.flags.length > 0 && !row.droppedNow && !props.decisions.some((d) => d.itemId === row.itemId),
  );
  const [chosen, setChosen] = useState<Set<string>>(() => new Set(waiting.map((r) => r.code)));
  const [action, setAction] = useState<'keep' | 'drop'>('keep');
  const [domain, setDomain] = useState('');
  const [statistical, setStatistical] = useState('');
  if (waiting.length < 2) return null;
  const picked = waiting.filter((r) => chosen.has(r.code)).map((r) => r.code);
  return (
    <Panel title="One reason for several flagged items">
      <form
        className="batch-decision"
        onSubmit={async (e) => {
          e.preventDefault();
          const done = await decideMany.run({
            roundId: props.detail.summary.id,
            itemCodes: picked,
            action,
            domainRationale: domain,
            statisticalRationale: statistical,
          });
          if (done) {
            setDomain('');
            setStatistical('');
          }
        }}
      >
        <p className="hint">
          {plural(waiting.length, 'flagged item')} without a decision. Each item you tick gets its own
          decision and its own row in the decision log, with the reasons below.
        </p>
        <ul className="batch-items">
          {waiting.map((row) => (
            <li key={row.code}>
              <label>
                <input
                  type="checkbox"
                  checked={chosen.has(row.code)}
                  onChange={(e) => {
                    const next = new Set(chosen);
                    if (e.target.checked) next.add(row.code);
                    else next.delete(row.code);
                    setChosen(next);
                  }}
                />{' '}
                <strong>{row.code}</strong> {row.text}{' '}
                <span className="muted">({row.flags.map((f) => f.text).join('; ')})</span>
              </label>
            </li>
          ))}
        </ul>
        <div className="button-row">
          <label className="inline-radio">
            <input type="radio" checked={action === 'keep'} onChange={() => setAction('keep')} /> Keep them
          </label>
          <label className="inline-radio">
            <input type="radio" checked={action === 'drop'} onChange={() => setAction('drop')} /> Drop them
          </label>
        </div>
        <div className="field">
          <label htmlFor="batch-domain">How these items relate to the construct’s domain</label>
          <textarea id="batch-domain" rows={2} value={domain} onChange={(e) => setDomain(e.target.value)} />
        </div>
        <div className="field">
          <label htmlFor="batch-statistical">What the statistics show</label>
          <textarea
            id="batch-statistical"
            rows={2}
            value={statistical}
            onChange={(e) => setStatistical(e.target.value)}
          />
        </div>
        <button type="submit" className="primary" disabled={decideMany.busy || picked.length === 0}>
          Record {plural(picked.length, 'decision')}
        </button>
        <ErrorNote message={decideMany.error} />
      </form>
    </Panel>
  );
}
