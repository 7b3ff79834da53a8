import { useEffect, useState } from 'react';
import type { CommandOutput } from '../../../app/api/commands.ts';
import { call } from '../../api/client.ts';
import { ErrorNote, Panel } from '../../shared/components.tsx';
import { downloadBase64, formatBytes } from '../../shared/files.ts';
import { useMutation, useQuery } from '../../shared/use-command.ts';

type Ready = Extract<CommandOutput<'instrument.view'>, { available: true }>;
type Files = CommandOutput<'instrument.files'>;

/**
 * The final instrument: the retained items in the order the questionnaire prints them (moved up and
 * down here), its heading, instructions and scoring rule, saved as one logged decision with its
 * reason; and the export, offering each file (questionnaire HTML and PDF, scoring key, norms).
 */
export function InstrumentPanel() {
  const view = useQuery('instrument.view', {});
  if (view.error) return <ErrorNote message={view.error} />;
  if (!view.data) return null;
  return (
    <Panel title="Final instrument">
      {view.data.available ? (
        <InstrumentForm form={view.data} />
      ) : (
        <p className="muted" data-testid="instrument-unavailable">
          {view.data.reason}
        </p>
      )}
    </Panel>
  );
}

function InstrumentForm({ form }: { form: Ready }) {
  const save = useMutation('instrument.setForm');
  const [order, setOrder] = useState(form.items.map((it) => it.code));
  const [title, setTitle] = useState(form.title);
  const [instructions, setInstructions] = useState(form.instructions);
  const [rule, setRule] = useState(form.rule);
  const [percent, setPercent] = useState(String(Math.round(form.minAnsweredShare * 100)));
  const [reason, setReason] = useState('');
  useEffect(() => {
    setOrder(form.items.map((it) => it.code));
    setTitle(form.title);
    setInstructions(form.instructions);
    setRule(form.rule);
    setPercent(String(Math.round(form.minAnsweredShare * 100)));
  }, [form]);
  const byCode = new Map(form.items.map((it) => [it.code, it]));
  const move = (index: number, by: -1 | 1) => {
    const next = [...order];
    [next[index], next[index + by]] = [next[index + by], next[index]];
    setOrder(next);
  };
  return (
    <div className="instrument">
      <p className="muted">
        {form.items.length} items retained in purification round {form.round}.{' '}
        {form.chosen
          ? 'Order and form as last set.'
          : 'No order set yet: facets take turns until you set one.'}
      </p>
      {form.warnings.length > 0 && (
        <ul className="warning-list">
          {form.warnings.map((w) => (
            <li key={w}>{w}</li>
          ))}
        </ul>
      )}
      <ol className="instrument-order" aria-label="Order of the items">
        {order.map((code, i) => {
          const it = byCode.get(code);
          return (
            <li key={code}>
              <span className="item-code">{code}</span> <span>{it?.text}</span>{' '}
              <span className="muted">
                ({it?.facetName ?? 'no facet'}
                {it?.keying === 'reverse' ? ', reverse-keyed' : ''})
              </span>{' '}
              <button
                type="button"
                className="link"
                aria-label={`Move ${code} up`}
                disabled={i === 0}
                onClick={() => move(i, -1)}
              >
                Up
              </button>{' '}
              <button
                type="button"
                className="link"
                aria-label={`Move ${code} down`}
                disabled={i === order.length - 1}
                onClick={() => move(i, 1)}
              >
                Down
              </button>
            </li>
          );
        })}
      </ol>
      <div className="field">
        <label htmlFor="instrument-title">Heading of the questionnaire</label>
        <input id="instrument-title" value={title} onChange={(e) => setTitle(e.target.value)} />
      </div>
      <div className="field">
        <label htmlFor="instrument-instructions">Instructions for respondents</label>
        <textarea
          id="instrument-instructions"
          rows={3}
          value={instructions}
          onChange={(e) => setInstructions(e.target.value)}
        />
      </div>
      <div className="button-row">
        <label className="inline-radio">
          <input type="radio" checked={rule === 'mean'} onChange={() => setRule('mean')} /> Mean of the item
          scores
        </label>
        <label className="inline-radio">
          <input type="radio" checked={rule === 'sum'} onChange={() => setRule('sum')} /> Sum of the item
          scores
        </label>
      </div>
      <div className="field">
        <label htmlFor="instrument-share">
          A score needs at least this share of its items answered (%; 100 = every item)
        </label>
        <input
          id="instrument-share"
          type="number"
          min={1}
          max={100}
          value={percent}
          onChange={(e) => setPercent(e.target.value)}
        />
      </div>
      <div className="field">
        <label htmlFor="instrument-reason">
          Why the instrument is set this way (goes into the decision log)
        </label>
        <input id="instrument-reason" value={reason} onChange={(e) => setReason(e.target.value)} />
      </div>
      <button
        type="button"
        className="primary"
        disabled={save.busy || reason.trim() === ''}
        onClick={async () => {
          const done = await save.run({
            order,
            title,
            instructions,
            rule,
            minAnsweredShare: Number(percent) / 100,
            reason,
          });
          if (done !== undefined) setReason('');
        }}
      >
        Save order and form
      </button>
      <ErrorNote message={save.error} />
      <InstrumentExport />
    </div>
  );
}

function InstrumentExport() {
  const [files, setFiles] = useState<Files | undefined>(undefined);
  const [error, setError] = useState<string | undefined>(undefined);
  const [busy, setBusy] = useState(false);
  return (
    <div className="instrument-export">
      <button
        type="button"
        className="secondary"
        disabled={busy}
        onClick={async () => {
          setBusy(true);
          setError(undefined);
          try {
            setFiles(await call('instrument.files', {}));
          } catch (e) {
            setError((e as Error).message);
          } finally {
            setBusy(false);
          }
        }}
      >
        {busy ? 'Preparing the files…' : 'Export the instrument'}
      </button>
      <ErrorNote message={error} />
      {files && (
        <>
          {files.warnings.length > 0 && (
            <ul className="warning-list">
              {files.warnings.map((w) => (
                <li key={w}>{w}</li>
              ))}
            </ul>
          )}
          <p className="muted">
            Log head <code>{files.logHead}</code>
            {files.verified
              ? ' (the study verified at export)'
              : ' — the study FAILED verification at export'}
            . Each file names it with the command that checks it.
          </p>
          <ul className="instrument-files" aria-label="Files of the instrument">
            {files.files.map((f) => (
              <li key={f.name}>
                <button
                  type="button"
                  className="link"
                  onClick={() => downloadBase64(f.name, f.base64, f.mime)}
                >
                  {f.name}
                </button>{' '}
                <span className="muted">
                  {formatBytes(Math.floor((f.base64.length * 3) / 4))} · SHA-256{' '}
                  <code>{f.sha256.slice(0, 16)}…</code>
                </span>
              </li>
            ))}
          </ul>
        </>
      )}
      <p className="muted">
        A new scale is not validated for diagnosis, hiring, admission or other high-stakes decisions; data
        from people needs ethics approval and protection; follow local regulations and licensed professional
        practice.
      </p>
    </div>
  );
}
