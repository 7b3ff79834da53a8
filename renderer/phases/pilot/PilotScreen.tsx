import { useContext, useState } from 'react';
import type { DatasetListEntry } from '../../../app/api/contracts/pilot.ts';
import { ErrorNote, formatTime, Panel } from '../../shared/components.tsx';
import { SignOffAside } from '../../shared/phase-controls.tsx';
import { StudyRevision, useMutation, useQuery } from '../../shared/use-command.ts';
import { formatBytes } from '../../shared/files.ts';
import { plural } from '../../../app/api/format.ts';
import { ImportWizard } from './ImportWizard.tsx';
import { MissingPanel } from './MissingPanel.tsx';
import { ScreeningPanel } from './ScreeningPanel.tsx';
import './pilot.css';

function shortDate(iso: string): string {
  return new Date(iso).toLocaleDateString(undefined, { year: 'numeric', month: 'short', day: 'numeric' });
}

/** Why a dataset is current or not, from the choice that last named it. */
function standingText(d: DatasetListEntry): string {
  const c = d.standing.choice;
  if (!c) return 'Never made current.';
  const when = `${shortDate(c.decidedAt)}, ${c.decidedBy}`;
  if (d.current) return `Since ${when}: ${c.reason}`;
  if (c.withdrawn) return `Withdrawn ${when}: ${c.reason}`;
  return `Current from ${when}, until another dataset was made current.`;
}

/**
 * Make current or withdraw, with the reason the log needs. The reason stays in the box until the
 * change is stored, so a refused change loses nothing typed.
 */
function ChoiceAction(props: { dataset: DatasetListEntry; locked: boolean }) {
  const d = props.dataset;
  const make = useMutation('pilot.makeCurrent');
  const withdraw = useMutation('pilot.withdraw');
  const [open, setOpen] = useState(false);
  const [reason, setReason] = useState('');
  const action = d.current ? withdraw : make;
  const label = d.current ? 'Withdraw…' : 'Make current…';
  if (props.locked) return null;
  if (!open) {
    return (
      <button type="button" className="link choice-open" onClick={() => setOpen(true)}>
        {label}
      </button>
    );
  }
  const prompt = d.current
    ? `Why is “${d.name}” withdrawn? (no ${d.roleLabel} will be current)`
    : `Why do the analyses of ${d.roleLabel} use “${d.name}” from now on?`;
  return (
    <form
      className="choice-form"
      onSubmit={async (e) => {
        e.preventDefault();
        const done = await action.run({ datasetId: d.id, reason });
        if (done) {
          setOpen(false);
          setReason('');
        }
      }}
    >
      <label htmlFor={`choice-reason-${d.id}`}>{prompt}</label>
      <input id={`choice-reason-${d.id}`} value={reason} onChange={(e) => setReason(e.target.value)} />
      <div className="button-row">
        <button type="submit" className="primary" disabled={action.busy || reason.trim() === ''}>
          {d.current ? 'Withdraw' : 'Make current'}
        </button>
        <button type="button" className="link" onClick={() => setOpen(false)}>
          Cancel
        </button>
      </div>
      <ErrorNote message={action.error} />
    </form>
  );
}

function DatasetTable(props: {
  datasets: DatasetListEntry[];
  selected: number | undefined;
  locked: (d: DatasetListEntry) => boolean;
  onSelect(id: number): void;
}) {
  return (
    <div className="table-wrap">
      <table className="data-table dataset-table">
        <thead>
          <tr>
            <th>Dataset</th>
            <th>Respondents</th>
            <th>Used by analyses</th>
            <th>Screening</th>
          </tr>
        </thead>
        <tbody>
          {props.datasets.map((d) => (
            <tr
              key={d.id}
              data-dataset={d.name}
              className={d.id === props.selected ? 'selected-row' : undefined}
            >
              <td>
                {d.id === props.selected ? (
                  <strong>{d.name}</strong>
                ) : (
                  <button type="button" className="link dataset-open" onClick={() => props.onSelect(d.id)}>
                    {d.name}
                  </button>
                )}
                <div className="muted small-text">
                  {d.fileName} · {formatBytes(d.fileSize)} · {plural(d.items, 'item')}
                </div>
                <div className="muted small-text" title={formatTime(d.importedAt)}>
                  imported {shortDate(d.importedAt)} by {d.importedBy}
                </div>
                <div className="dataset-badges">
                  <span className={`badge role-${d.role}`}>{d.roleLabel}</span>
                  {d.id === props.selected && <span className="badge shown">shown below</span>}
                </div>
              </td>

              <td className="nowrap" data-testid="dataset-counts">
                {d.counts}
              </td>
              <td className="dataset-standing" data-testid="dataset-standing">
                {d.current ? (
                  <span className="badge current">current {d.roleLabel}</span>
                ) : (
                  <span className="badge not-current">not current</span>
                )}
                <div className="muted small-text standing-why">{standingText(d)}</div>
                <ChoiceAction dataset={d} locked={props.locked(d)} />
              </td>
              <td>
                {d.screening ? (
                  `${d.screening.flagged.toLocaleString('en')} flagged`
                ) : (
                  <span className="muted">not yet</span>
                )}
              </td>
            </tr>
          ))}
        </tbody>
      </table>
    </div>
  );
}

function DatasetFacts({ datasetId }: { datasetId: number }) {
  const detail = useQuery('pilot.dataset', { datasetId });
  if (detail.error) return <ErrorNote message={detail.error} />;
  if (!detail.data) return null;
  const d = detail.data;
  const codes = ['blank', ...d.missingCodes.numeric.map(String), ...d.missingCodes.text];
  const roles = Object.entries(d.mapping);
  const named = (role: string) => roles.filter(([, r]) => r.role === role).map(([c]) => c);
  return (
    <div className="facts-grid">
      <Panel title={`How “${d.name}” was read`}>
        <dl className="facts">
          <dt>File</dt>
          <dd>
            {d.fileName}, {formatBytes(d.fileSize)}, SHA-256 <code>{d.fileSha256}</code>
          </dd>
          <dt>Read as</dt>
          <dd>
            {[
              d.reading.kind === 'workbook'
                ? `sheet “${d.reading.sheet}” of a workbook`
                : `${d.encoding}, ${d.delimiterName}-separated`,
              `decimal ${d.decimalMark === '.' ? 'point' : 'comma'}`,
              `missing values: ${codes.join(', ')}`,
              `declared scale ${d.reading.scaleBounds ? `${d.reading.scaleBounds.min} to ${d.reading.scaleBounds.max}` : 'none'}`,
            ].join('; ')}
          </dd>
          <dt>Columns</dt>
          <dd>
            {plural(d.items, 'item')}
            {named('id').length > 0 && `; id ${named('id').join(', ')}`}
            {named('criterion').length > 0 && `; criteria ${named('criterion').join(', ')}`}
            {named('group').length > 0 && `; groups ${named('group').join(', ')}`}
            {named('duration').length > 0 && `; duration ${named('duration').join(', ')}`}
            {named('retestLink').length > 0 && `; retest link ${named('retestLink').join(', ')}`}
            {named('attention').length > 0 &&
              `; attention ${d.attention.map((a) => `${a.name} (correct: ${a.correctAnswer}; ${a.fail} wrong, ${a.missing} blank)`).join(', ')}`}
            {named('ignored').length > 0 && `; ignored ${named('ignored').join(', ')}`}
          </dd>
          {d.groups.map((g) => (
            <div key={g.name} className="facts-row">
              <dt>Group {g.name}</dt>
              <dd>{g.levels.map((l) => `${l.level || '(blank)'}: ${l.count}`).join(', ')}</dd>
            </div>
          ))}
          {d.retestLinks && (
            <>
              <dt>Retest</dt>
              <dd>
                {plural(d.retestLinks.linked, 'respondent')} carry a retest link in {d.retestLinks.name}
              </dd>
            </>
          )}
          <dt>Imported</dt>
          <dd>
            {formatTime(d.importedAt)} by {d.importedBy}
            {d.problemCount > 0 && `, with ${plural(d.problemCount, 'problem')} accepted as they were`}
          </dd>
        </dl>
      </Panel>
      <MissingPanel missing={d.missingAnalysed} all={d.missingAll} />
    </div>
  );
}

/**
 * Phase 4, pilot data: the datasets in the study with their counts, the import wizard, and for the
 * dataset opened its screening table, exclusions and missing data.
 */
export function PilotScreen() {
  const view = useQuery('pilot.view', {});
  const overview = useQuery('study.overview', {});
  const { bump } = useContext(StudyRevision);
  const [importing, setImporting] = useState(false);
  const [chosen, setChosen] = useState<number | undefined>(undefined);
  const phase = overview.data?.find((p) => p.id === 'pilot');
  if (view.error) return <ErrorNote message={view.error} />;
  if (!view.data || !phase) return <p className="loading">Loading…</p>;
  const data = view.data;
  const locked = phase.status === 'signed-off';
  const selected = chosen ?? data.currentPilotId ?? data.datasets.at(-1)?.id;
  const selectedEntry = data.datasets.find((d) => d.id === selected);
  const datasetPhase = data.roles.find((r) => r.role === selectedEntry?.role)?.phase ?? 'pilot';
  const datasetLocked = overview.data?.find((p) => p.id === datasetPhase)?.status === 'signed-off';

  return (
    <div className="screen pilot">
      <header className="screen-head">
        <div>
          <p className="eyebrow">Phase 4</p>
          <h1>Pilot data</h1>
          <p className="muted">
            Import the pilot responses, give each column its role, declare missing-value codes, and screen the
            respondents. Screening proposes; you decide who is excluded, and why.
          </p>
        </div>
        <div className="head-actions">
          {!importing && (
            <button type="button" className="primary" disabled={locked} onClick={() => setImporting(true)}>
              Import a data file…
            </button>
          )}
        </div>
      </header>
      {locked && (
        <p className="locked-note">
          This phase is signed off. Reopen it (with a reason) to import data or change exclusions.
        </p>
      )}
      {importing && (
        <ImportWizard
          pool={data.pool}
          roles={data.roles}
          bounds={data.bounds}
          anchors={data.anchors}
          maxUploadBytes={data.maxUploadBytes}
          onClose={() => setImporting(false)}
          onImported={(id) => {
            setImporting(false);
            setChosen(id);
            bump();
          }}
        />
      )}
      <div className="two-column">
        <div className="column-main">
          <Panel title="Datasets in this study">
            {data.datasets.length === 0 ? (
              <p className="muted">
                No data yet. Import the pilot file: CSV or TSV (any delimiter, UTF-8, UTF-16 or Windows-1252)
                or an .xlsx workbook, with a header row.
              </p>
            ) : (
              <DatasetTable
                datasets={data.datasets}
                selected={selected}
                onSelect={setChosen}
                locked={(d) => {
                  const phaseOfRole = data.roles.find((r) => r.role === d.role)?.phase ?? 'pilot';
                  return overview.data?.find((p) => p.id === phaseOfRole)?.status === 'signed-off';
                }}
              />
            )}
          </Panel>
        </div>
        <SignOffAside phase={phase} />
      </div>
      {selected !== undefined && selectedEntry && (
        <>
          <ScreeningPanel key={selected} datasetId={selected} locked={datasetLocked} />
          <DatasetFacts datasetId={selected} />
        </>
      )}
    </div>
  );
}
