import { useEffect, useState } from 'react';
import type { CommandOutput } from '../../../app/api/commands.ts';
import type { RoundView } from '../../../app/api/contracts/review.ts';
import { call } from '../../api/client.ts';
import { ErrorNote, formatTime, Panel, ReasonAction } from '../../shared/components.tsx';
import { useMutation } from '../../shared/use-command.ts';
import { downloadText, readFileBase64 } from '../../shared/files.ts';
import { plural } from '../../../app/api/format.ts';
import { StatsPanel } from './StatsPanel.tsx';
import { FileNotes } from '../../shared/file-notes.tsx';

type Preview = CommandOutput<'review.previewRatings'>;

/** The head of a round: when it started, what it covers, and the packet to send out. */
export function RoundSummary({ round, locked }: { round: RoundView; locked: boolean }) {
  const sync = useMutation('review.syncItems');
  return (
    <Panel
      title={`Round ${round.number}${round.label ? `: ${round.label}` : ''}`}
      aside={
        <a className="button-link" href={`#/phase/review/packet/${round.id}`}>
          Open the review packet
        </a>
      }
    >
      <p className="round-summary">
        Started {formatTime(round.createdAt)} · {plural(round.items.length, 'item')} ·{' '}
        {plural(round.experts.length, 'expert')} on the panel · {plural(round.ratingCount, 'rating')}
        {round.report && ` · ${plural(round.flagged, 'item')} flagged, ${round.decided} decided`}
      </p>
      {round.ratingCount === 0 && !locked && (
        <p className="hint">
          Until ratings arrive the round follows the pool.{' '}
          <button type="button" className="link" onClick={() => sync.run({ roundId: round.id })}>
            Bring its item list up to date
          </button>{' '}
          (the items kept for review now).
        </p>
      )}
      <ErrorNote message={sync.error} />
    </Panel>
  );
}

/** The body of a round: statistics and decisions, then its panel and rating form. */
export function RoundDetail(props: {
  round: RoundView;
  locked: boolean;
  anchors: string[];
  benchmarks: { sCviAve: number; precision: number };
}) {
  const { round, locked } = props;
  return (
    <>
      {round.report ? (
        <StatsPanel round={round} locked={locked} benchmarks={props.benchmarks} />
      ) : (
        <Panel title="Content validity">
          <p className="muted">
            No ratings yet. Import the panel’s ratings file above to see I-CVI, k*, CVR and Aiken’s V.
          </p>
        </Panel>
      )}
      <fieldset disabled={locked} className="plain">
        <div className="field-pair review-pair">
          <ExpertsPanel round={round} />
          <FormPanel round={round} anchors={props.anchors} />
        </div>
      </fieldset>
    </>
  );
}

/** Ratings files of a round: choose, preview (problems by row and column), import; and the files imported so far. */
export function RatingsPanel({
  round,
  maxFileBytes,
  locked,
}: {
  round: RoundView;
  maxFileBytes: number;
  locked: boolean;
}) {
  const [sheetError, setSheetError] = useState<string | undefined>();
  const importRatings = useMutation('review.importRatings');
  const withdraw = useMutation('review.withdrawRatings');
  const [file, setFile] = useState<{ name: string; content: string } | undefined>();
  const [preview, setPreview] = useState<Preview | undefined>();
  const [readError, setReadError] = useState<string | undefined>();
  const [inputKey, setInputKey] = useState(0);
  /** Codes not on the panel that the researcher has confirmed adding (lower case). */
  const [confirmed, setConfirmed] = useState<Set<string>>(new Set());
  const unknown = preview?.unknownExperts ?? [];
  const allConfirmed = unknown.every((e) => confirmed.has(e.code.toLowerCase()));

  function reset() {
    setConfirmed(new Set());
    setFile(undefined);
    setPreview(undefined);
    setReadError(undefined);
    setInputKey((k) => k + 1);
  }

  async function choose(chosen: File | undefined) {
    setPreview(undefined);
    setFile(undefined);
    setReadError(undefined);
    if (!chosen) return;
    if (chosen.size > maxFileBytes) {
      setReadError(
        `${chosen.name} is larger than the ${Math.round(maxFileBytes / 1024 / 1024)} MB a ratings file may have`,
      );
      return;
    }
    try {
      const content = await readFileBase64(chosen);
      setFile({ name: chosen.name, content });
      setPreview(await call('review.previewRatings', { roundId: round.id, fileName: chosen.name, content }));
    } catch (e) {
      setReadError((e as Error).message);
    }
  }

  const columns = [
    'item',
    'expert',
    'relevance',
    ...(round.form.asksEssential ? ['essential'] : []),
    ...(round.form.asksFacet ? ['facet'] : []),
    ...(round.form.asksComment ? ['comment'] : []),
  ];
  return (
    <Panel
      title="Ratings files"
      aside={
        <button
          type="button"
          className="link"
          onClick={async () => {
            setSheetError(undefined);
            try {
              const sheet = await call('review.blankSheet', { roundId: round.id });
              downloadText(sheet.fileName, sheet.text);
            } catch (e) {
              setSheetError((e as Error).message);
            }
          }}
        >
          Download a blank ratings sheet
        </button>
      }
    >
      <p className="muted">
        Long form, one row per expert and item: <code>{columns.join(',')}</code>; or wide form, one row per
        item: <code>item</code> then one column per expert code (relevance only). The blank sheet lists the
        items in the packet’s order. Nothing is written until you press Import.
      </p>
      <ErrorNote message={sheetError} />
      <fieldset disabled={locked} className="plain">
        <div className="import-choose">
          <input
            key={inputKey}
            type="file"
            accept=".csv,.tsv,.txt,text/csv"
            aria-label="Ratings file"
            onChange={(e) => void choose(e.target.files?.[0])}
          />
        </div>
        <ErrorNote message={readError} />
        {preview && (
          <div className="import-preview" data-testid="ratings-preview">
            <p>
              <strong>{preview.fileName}</strong>
              {preview.layout && `: ${preview.layout} form`}
              {preview.delimiter && `, ${preview.delimiter}-separated`}.{' '}
              {preview.problems.length === 0
                ? `${plural(preview.ratingCount, 'rating')} from ${plural(preview.experts.length, 'expert')} on ${plural(preview.itemCount, 'item')}, ready to import.`
                : `${plural(preview.problems.length, 'problem')} to fix first; nothing will be imported.`}
            </p>
            <FileNotes problems={preview.problems} warnings={preview.warnings} />
            {preview.problems.length === 0 && unknown.length > 0 && (
              <fieldset className="unknown-experts" data-testid="unknown-experts">
                <legend>
                  {plural(unknown.length, 'expert code')} not on the panel: a typo must not create an expert
                </legend>
                {unknown.map((e) => (
                  <label key={e.code}>
                    <input
                      type="checkbox"
                      checked={confirmed.has(e.code.toLowerCase())}
                      onChange={(ev) => {
                        const next = new Set(confirmed);
                        if (ev.target.checked) next.add(e.code.toLowerCase());
                        else next.delete(e.code.toLowerCase());
                        setConfirmed(next);
                      }}
                    />{' '}
                    Add {e.code} to the panel
                    <span className="hint"> — {e.text}</span>
                  </label>
                ))}
              </fieldset>
            )}
            {preview.rows.length > 0 && (
              <div className="preview-scroll">
                <table className="data-table">
                  <thead>
                    <tr>
                      <th className="num">Row</th>
                      <th>Item</th>
                      <th>Expert</th>
                      <th className="num">Relevance</th>
                      {preview.hasEssential && <th>Essential</th>}
                      {preview.hasFacet && <th>Facet</th>}
                      {preview.hasComment && <th>Comment</th>}
                    </tr>
                  </thead>
                  <tbody>
                    {preview.rows.map((r) => (
                      <tr key={`${r.row}-${r.expert}-${r.item}`}>
                        <td className="num">{r.row}</td>
                        <td>{r.item}</td>
                        <td>{r.expert}</td>
                        <td className="num">{r.relevance ?? '–'}</td>
                        {preview.hasEssential && (
                          <td>{r.essential === null ? '–' : r.essential ? 'essential' : 'not'}</td>
                        )}
                        {preview.hasFacet && <td>{r.facet ?? '–'}</td>}
                        {preview.hasComment && <td>{r.comment ?? ''}</td>}
                      </tr>
                    ))}
                  </tbody>
                </table>
              </div>
            )}
            <div className="button-row">
              <button
                type="button"
                className="primary"
                disabled={preview.problems.length > 0 || !allConfirmed || importRatings.busy || !file}
                onClick={async () => {
                  if (!file) return;
                  const done = await importRatings.run({
                    roundId: round.id,
                    fileName: file.name,
                    content: file.content,
                    addExperts: unknown.map((e) => e.code),
                  });
                  if (done !== undefined) reset();
                }}
              >
                Import {plural(preview.ratingCount, 'rating')}
              </button>
              <button type="button" className="link" onClick={reset}>
                Cancel
              </button>
            </div>
            <ErrorNote message={importRatings.error} />
          </div>
        )}
        {round.imports.length > 0 && (
          <table className="data-table import-history">
            <thead>
              <tr>
                <th>File</th>
                <th className="num">Ratings</th>
                <th>Imported</th>
                <th>SHA-256</th>
                <th />
              </tr>
            </thead>
            <tbody>
              {round.imports.map((imp) => (
                <tr key={imp.id} className={imp.withdrawnAt ? 'withdrawn' : undefined}>
                  <td>
                    {imp.fileName} <span className="muted">({imp.layout} form)</span>
                  </td>
                  <td className="num">{imp.ratings}</td>
                  <td className="nowrap">{formatTime(imp.importedAt)}</td>
                  <td>
                    <code title={imp.sha256}>{imp.sha256.slice(0, 12)}…</code>
                  </td>
                  <td>
                    {imp.withdrawnAt ? (
                      <span className="muted">withdrawn {formatTime(imp.withdrawnAt)}</span>
                    ) : (
                      <ReasonAction
                        label="Withdraw…"
                        confirm="Withdraw ratings"
                        placeholder={`Why withdraw the ratings from ${imp.fileName}?`}
                        onConfirm={(rationale) => withdraw.run({ importId: imp.id, rationale })}
                      />
                    )}
                  </td>
                </tr>
              ))}
            </tbody>
          </table>
        )}
        <ErrorNote message={withdraw.error} />
      </fieldset>
    </Panel>
  );
}

function ExpertsPanel({ round }: { round: RoundView }) {
  const add = useMutation('review.addExpert');
  const [code, setCode] = useState('');
  const [role, setRole] = useState('');
  const [name, setName] = useState('');
  const [withheld, setWithheld] = useState(false);
  return (
    <Panel
      title="Panel of experts"
      aside={<span className="muted">{plural(round.experts.length, 'expert')}</span>}
    >
      <table className="data-table expert-table">
        <thead>
          <tr>
            <th>Code</th>
            <th>Role</th>
            <th>Name</th>
            <th className="num">Ratings</th>
            <th />
          </tr>
        </thead>
        <tbody>
          {round.experts.map((e) => (
            <ExpertRow key={e.id} expert={e} />
          ))}
        </tbody>
      </table>
      <form
        className="add-expert"
        onSubmit={async (e) => {
          e.preventDefault();
          const done = await add.run({ roundId: round.id, code, role, name, nameWithheld: withheld });
          if (done !== undefined) {
            setCode('');
            setRole('');
            setName('');
            setWithheld(false);
          }
        }}
      >
        <input
          aria-label="Expert code"
          placeholder="Code, e.g. E8"
          value={code}
          onChange={(e) => setCode(e.target.value)}
        />
        <input
          aria-label="Expert role"
          placeholder="Role (optional)"
          value={role}
          onChange={(e) => setRole(e.target.value)}
        />
        <input
          aria-label="Expert name"
          placeholder="Name (optional)"
          value={name}
          onChange={(e) => setName(e.target.value)}
        />
        <label className="inline-check">
          <input type="checkbox" checked={withheld} onChange={(e) => setWithheld(e.target.checked)} />{' '}
          Withhold
        </label>
        <button type="submit" className="secondary" disabled={code.trim() === '' || add.busy}>
          Add expert
        </button>
      </form>
      <p className="hint">
        Names are optional. A withheld name stays in this study only and is never shown in packets, exports or
        the decision log; the log names experts by code and role.
      </p>
      <ErrorNote message={add.error} />
    </Panel>
  );
}

function ExpertRow({ expert }: { expert: RoundView['experts'][number] }) {
  const edit = useMutation('review.editExpert');
  const remove = useMutation('review.removeExpert');
  const [role, setRole] = useState(expert.role);
  useEffect(() => setRole(expert.role), [expert.role]);
  const save = (fields: Partial<{ role: string; nameWithheld: boolean }>) =>
    edit.run({
      id: expert.id,
      code: expert.code,
      role: fields.role ?? expert.role,
      name: expert.name,
      nameWithheld: fields.nameWithheld ?? expert.nameWithheld,
    });
  return (
    <tr>
      <td className="nowrap">
        <strong>{expert.code}</strong>
      </td>
      <td>
        <input
          className="inline-input"
          aria-label={`Role of ${expert.code}`}
          value={role}
          placeholder="role"
          onChange={(e) => setRole(e.target.value)}
          onBlur={() => role.trim() !== expert.role && save({ role })}
        />
      </td>
      <td>
        {expert.name === '' ? (
          <span className="muted">not given</span>
        ) : (
          <label className="inline-check">
            <input
              type="checkbox"
              checked={expert.nameWithheld}
              onChange={(e) => save({ nameWithheld: e.target.checked })}
              aria-label={`Withhold the name of ${expert.code}`}
            />
            {expert.nameWithheld ? <span className="muted">withheld</span> : expert.name}
          </label>
        )}
      </td>
      <td className="num">{expert.ratings}</td>
      <td>
        {expert.ratings === 0 && (
          <button type="button" className="link" onClick={() => remove.run({ id: expert.id })}>
            Remove
          </button>
        )}
        <ErrorNote message={edit.error ?? remove.error} />
      </td>
    </tr>
  );
}

function FormPanel({ round, anchors }: { round: RoundView; anchors: string[] }) {
  const save = useMutation('review.setForm');
  const [form, setForm] = useState(round.form);
  useEffect(() => setForm(round.form), [round.form]);
  const frozen = round.ratingCount > 0;
  const dirty = JSON.stringify(form) !== JSON.stringify(round.form);
  return (
    <Panel title="Rating form">
      <fieldset disabled={frozen} className="plain">
        <p className="form-scale">
          Relevance, {round.form.relevanceMin}–{round.form.relevanceMax}:{' '}
          {anchors.map((a, i) => (
            <span key={a} className="scale-anchor">
              {round.form.relevanceMin + i} {a}
            </span>
          ))}
        </p>
        <label className="inline-check form-option">
          <input
            type="checkbox"
            checked={form.asksEssential}
            onChange={(e) => setForm({ ...form, asksEssential: e.target.checked })}
          />
          Ask “essential / useful but not essential / not necessary” (for Lawshe’s CVR)
        </label>
        <label className="inline-check form-option">
          <input
            type="checkbox"
            checked={form.asksFacet}
            onChange={(e) => setForm({ ...form, asksFacet: e.target.checked })}
          />
          Ask which facet the item belongs to (the packet then hides the intended facet)
        </label>
        <label className="inline-check form-option">
          <input
            type="checkbox"
            checked={form.asksComment}
            onChange={(e) => setForm({ ...form, asksComment: e.target.checked })}
          />
          Invite a comment on each item
        </label>
        <label className="form-instructions">
          Instructions printed in the packet
          <textarea
            rows={3}
            value={form.instructions}
            onChange={(e) => setForm({ ...form, instructions: e.target.value })}
          />
        </label>
        <div className="button-row">
          <button
            type="button"
            className="secondary"
            disabled={!dirty || save.busy}
            onClick={() => save.run({ roundId: round.id, ...form })}
          >
            Save the form
          </button>
        </div>
      </fieldset>
      {frozen && <p className="hint">Ratings have arrived, so the form stays as the experts received it.</p>}
      <ErrorNote message={save.error} />
    </Panel>
  );
}
