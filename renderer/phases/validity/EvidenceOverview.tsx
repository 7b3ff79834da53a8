import { Panel, ReasonAction } from '../../shared/components.tsx';
import { useMutation } from '../../shared/use-command.ts';
import type { View } from './common.tsx';

const STATE_LABEL = { found: 'Evidence found', partial: 'Partly', missing: 'Missing' } as const;

/** Each source of validity evidence: what was found, what is missing, and its acknowledgement. */
export function EvidenceOverview({ view, locked }: { view: View; locked: boolean }) {
  const ack = useMutation('validity.acknowledge');
  return (
    <Panel title="Sources of validity evidence">
      <p className="muted">
        The five sources of the Standards for Educational and Psychological Testing. Acknowledge each as it
        stands — what it shows, or why what is missing is acceptable for the intended use. An acknowledgement
        lapses when a new run changes what a source shows.
      </p>
      <ul className="evidence-list">
        {view.sources.map((s) => (
          <li key={s.id} className={`evidence evidence-${s.state}`} data-testid={`source-${s.id}`}>
            <div className="evidence-head">
              <h3>{s.title}</h3>
              <span className={`evidence-state ${s.state}`}>{STATE_LABEL[s.state]}</span>
            </div>
            {s.found.length > 0 && (
              <ul className="evidence-found">
                {s.found.map((f) => (
                  <li key={f}>{f}</li>
                ))}
              </ul>
            )}
            {s.missing.length > 0 && (
              <ul className="evidence-missing">
                {s.missing.map((m) => (
                  <li key={m}>Missing: {m}</li>
                ))}
              </ul>
            )}
            <div className="evidence-ack">
              {s.acknowledgement?.current ? (
                <p>
                  <strong>Acknowledged</strong> by {s.acknowledgement.by}: {s.acknowledgement.note}
                </p>
              ) : (
                <>
                  {s.acknowledgement?.stale && (
                    <p className="stale">
                      Acknowledged earlier (“{s.acknowledgement.note}”), but what the source shows has changed
                      since.
                    </p>
                  )}
                  {!locked && (
                    <ReasonAction
                      label="Acknowledge…"
                      confirm="Acknowledge"
                      placeholder={`What ${s.title.toLowerCase()} shows, or why the gap is acceptable`}
                      onConfirm={(note) => ack.run({ source: s.id, note })}
                    />
                  )}
                </>
              )}
            </div>
          </li>
        ))}
      </ul>
      {ack.error && (
        <p className="error-note" role="alert">
          {ack.error}
        </p>
      )}
      <p className="muted caution">
        Human-subject data needs ethics approval and protection; follow local regulations and licensed
        professional practice wherever scores could affect a person.
      </p>
    </Panel>
  );
}
