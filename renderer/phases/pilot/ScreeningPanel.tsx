import { useMemo, useState } from 'react';
import { ExportButton } from '../../shared/export-button.tsx';
import type { ScreenedRespondent } from '../../../app/api/contracts/pilot.ts';
import type { ScreeningCheck } from '../../../app/api/contracts/pilot.ts';
import { ErrorNote, formatTime, Panel } from '../../shared/components.tsx';
import { useMutation, useQuery } from '../../shared/use-command.ts';
import { pValue, plural, unbounded } from '../../../app/api/format.ts';

const PAGE = 100;

type SortKey = 'row' | 'id' | 'answered' | 'longstring' | 'irv' | 'mahalanobis' | 'duration' | 'flags';
type Show = 'all' | 'flagged' | 'unflagged' | 'excluded' | 'included' | ScreeningCheck;

const COLUMNS: { key: SortKey; label: string; num?: boolean; title?: string }[] = [
  { key: 'row', label: 'Row', num: true, title: 'File row (the header is row 1)' },
  { key: 'id', label: 'Respondent' },
  { key: 'answered', label: 'Answered', num: true },
  {
    key: 'longstring',
    label: 'Longest run',
    num: true,
    title: 'Longest run of identical answers (longstring)',
  },
  { key: 'irv', label: 'IRV', num: true, title: 'Intra-individual response variability: SD of the answers' },
  {
    key: 'mahalanobis',
    label: 'D²',
    num: true,
    title: 'Mahalanobis D² (respondents who answered every item)',
  },
  { key: 'duration', label: 'Duration', num: true },
  { key: 'flags', label: 'Flags', num: false },
];

function sortValue(r: ScreenedRespondent, key: SortKey): number | string {
  switch (key) {
    case 'id':
      return r.id;
    case 'flags':
      return r.flags.length;
    case 'row':
      return r.row;
    default:
      return r[key] ?? Number.NEGATIVE_INFINITY;
  }
}

/** An inline form for a decision that needs its reason. */
function ReasonForm(props: {
  label: string;
  placeholder: string;
  busy: boolean;
  onSubmit(reason: string): Promise<boolean>;
  onCancel(): void;
}) {
  const [reason, setReason] = useState('');
  return (
    <form
      className="reason-form"
      onSubmit={async (e) => {
        e.preventDefault();
        if (await props.onSubmit(reason)) setReason('');
      }}
    >
      <input
        aria-label={`Reason: ${props.label}`}
        placeholder={props.placeholder}
        value={reason}
        onChange={(e) => setReason(e.target.value)}
      />
      <button type="submit" className="primary" disabled={props.busy || reason.trim() === ''}>
        {props.label}
      </button>
      <button type="button" className="link" onClick={props.onCancel}>
        Cancel
      </button>
    </form>
  );
}

/**
 * The screening of one dataset: run it, read each respondent's indices and flags in words, filter
 * and sort, and decide: exclude one respondent, the selected ones, or every respondent flagged for a
 * check, each with a reason; bring excluded respondents back by a later decision.
 */
export function ScreeningPanel({ datasetId, locked }: { datasetId: number; locked: boolean }) {
  const view = useQuery('pilot.screening', { datasetId });
  const screen = useMutation('pilot.screen');
  const exclude = useMutation('pilot.exclude');
  const include = useMutation('pilot.include');
  const [show, setShow] = useState<Show>('all');
  const [search, setSearch] = useState('');
  const [sort, setSort] = useState<{ key: SortKey; descending: boolean }>({ key: 'row', descending: false });
  const [page, setPage] = useState(0);
  const [selected, setSelected] = useState<Set<number>>(new Set());
  const [form, setForm] = useState<
    | { kind: 'rule'; check: ScreeningCheck }
    | { kind: 'selected' }
    | { kind: 'back' }
    | { kind: 'one'; index: number; back: boolean }
    | undefined
  >();

  const respondents = view.data?.respondents;
  const shown = useMemo(() => {
    if (!respondents) return [];
    const term = search.trim().toLowerCase();
    const rows = respondents.filter((r) => {
      if (term !== '' && !r.id.toLowerCase().includes(term) && String(r.row) !== term) return false;
      switch (show) {
        case 'all':
          return true;
        case 'flagged':
          return r.flags.length > 0;
        case 'unflagged':
          return r.flags.length === 0;
        case 'excluded':
          return r.exclusion !== null;
        case 'included':
          return r.exclusion === null;
        default:
          return r.flags.some((f) => f.check === show);
      }
    });
    const sign = sort.descending ? -1 : 1;
    return rows.sort((a, b) => {
      const x = sortValue(a, sort.key);
      const y = sortValue(b, sort.key);
      return (x < y ? -1 : x > y ? 1 : a.row - b.row) * sign;
    });
  }, [respondents, show, search, sort]);

  if (view.error) return <ErrorNote message={view.error} />;
  if (!view.data) return <p className="loading">Loading the screening…</p>;
  const data = view.data;
  const run = data.run;
  const pages = Math.max(1, Math.ceil(shown.length / PAGE));
  const visible = shown.slice(page * PAGE, page * PAGE + PAGE);
  const selectedRows = data.respondents.filter((r) => selected.has(r.index));
  const selectedIncluded = selectedRows.filter((r) => r.exclusion === null);
  const selectedExcluded = selectedRows.filter((r) => r.exclusion !== null);

  async function decide(run: () => Promise<unknown>): Promise<boolean> {
    const done = await run();
    if (done !== undefined) {
      setForm(undefined);
      setSelected(new Set());
      return true;
    }
    return false;
  }

  const toggle = (index: number) =>
    setSelected((current) => {
      const next = new Set(current);
      if (next.has(index)) next.delete(index);
      else next.add(index);
      return next;
    });
  const allVisibleSelected = visible.length > 0 && visible.every((r) => selected.has(r.index));
  const flaggedChecks = data.counts.byCheck.filter((c) => c.flagged > 0);
  const error = screen.error ?? exclude.error ?? include.error;

  return (
    <Panel
      title={`Screening of “${data.dataset.name}”`}
      aside={
        <span>
          <span className="counts-line" data-testid="screening-counts">
            {data.dataset.counts}
          </span>{' '}
          {run && <ExportButton request={{ kind: 'screening', datasetId: data.dataset.id }} />}
        </span>
      }
    >
      {!run ? (
        <div className="screen-first">
          <p>
            Not screened yet. Screening computes, for each of the{' '}
            {plural(data.counts.respondents, 'respondent')}, the longest run of one answer, the variability of
            the answers, the Mahalanobis distance, attention checks, duplicate ids, response time and
            unanswered items, and flags what looks careless. It proposes; you decide.
          </p>
          <button
            type="button"
            className="primary"
            disabled={locked || screen.busy}
            onClick={() => void screen.run({ datasetId })}
          >
            Screen respondents
          </button>
        </div>
      ) : (
        <>
          <p className="run-line">
            Screening run {run.id}, {formatTime(run.createdAt)} by {run.actor}:{' '}
            <strong>{plural(data.counts.flagged, 'respondent')} flagged</strong>,{' '}
            {data.counts.flaggedNotExcluded} of them still in the analyses.{' '}
            {plural(data.counts.analysed, 'respondent')} go into every analysis (the file minus the current
            exclusions).{' '}
            <button
              type="button"
              className="link"
              disabled={locked || screen.busy}
              onClick={() => void screen.run({ datasetId })}
            >
              Screen again
            </button>
          </p>
          <details className="thresholds">
            <summary>Thresholds used</summary>
            <ul>
              <li>
                Long run of one answer: at least {Math.round(run.thresholds.longstringShare * 100)}% of the
                answered items in a row (common practice).
              </li>
              <li>No variation: the same answer to every answered item (IRV = 0).</li>
              <li>
                Multivariate outlier: Mahalanobis D² with χ² p &lt; {run.thresholds.mahalanobisAlpha} on{' '}
                {run.thresholds.mahalanobisDf} df, over respondents who answered every item.
              </li>
              <li>
                Too fast:{' '}
                {run.thresholds.speederBelow === null
                  ? 'not checked (no duration column)'
                  : `under ${run.thresholds.speederFraction} × the median duration ${run.thresholds.medianDuration} = ${run.thresholds.speederBelow}`}
                .
              </li>
              <li>
                Many unanswered: more than {Math.round(run.thresholds.maxMissingShare * 100)}% of the items
                (common practice).
              </li>
              <li>Attention check: a wrong or missing answer. Duplicate id: the id occurs more than once.</li>
            </ul>
            {run.warnings.map((w) => (
              <p key={w} className="hint">
                {w}
              </p>
            ))}
          </details>

          <section className="check-chips" aria-label="Flags by check">
            {flaggedChecks.map((c) => (
              <div key={c.check} className="check-chip" data-check={c.check}>
                <button
                  type="button"
                  className="link"
                  onClick={() => {
                    setShow(c.check);
                    setPage(0);
                  }}
                >
                  {c.label}: {c.flagged}
                </button>
                <span className="muted">{c.excluded} excluded</span>
                {!locked && c.excluded < c.flagged && (
                  <button
                    type="button"
                    className="secondary small"
                    onClick={() => setForm({ kind: 'rule', check: c.check })}
                  >
                    {c.excluded === 0
                      ? `Exclude all ${c.flagged}…`
                      : `Exclude the ${c.flagged - c.excluded} still in…`}
                  </button>
                )}
              </div>
            ))}
          </section>
          {form?.kind === 'rule' && (
            <ReasonForm
              label={`Exclude everyone flagged for ${data.checks.find((c) => c.check === form.check)?.label}`}
              placeholder="Why these respondents leave the analyses"
              busy={exclude.busy}
              onCancel={() => setForm(undefined)}
              onSubmit={(reason) => decide(() => exclude.run({ datasetId, checks: [form.check], reason }))}
            />
          )}

          <div className="table-tools">
            <label>
              Show
              <select
                aria-label="Show respondents"
                value={show}
                onChange={(e) => {
                  setShow(e.target.value as Show);
                  setPage(0);
                }}
              >
                <option value="all">all respondents</option>
                <option value="flagged">flagged</option>
                <option value="unflagged">not flagged</option>
                <option value="excluded">excluded</option>
                <option value="included">in the analyses</option>
                {data.checks.map((c) => (
                  <option key={c.check} value={c.check}>
                    flagged: {c.label}
                  </option>
                ))}
              </select>
            </label>
            <input
              aria-label="Find a respondent"
              placeholder="Find by id or row"
              value={search}
              onChange={(e) => {
                setSearch(e.target.value);
                setPage(0);
              }}
            />
            <span className="muted" data-testid="shown-count">
              {plural(shown.length, 'respondent')} shown
            </span>
            {!locked && selectedIncluded.length > 0 && (
              <button type="button" className="secondary" onClick={() => setForm({ kind: 'selected' })}>
                Exclude {selectedIncluded.length} selected…
              </button>
            )}
            {!locked && selectedExcluded.length > 0 && (
              <button type="button" className="secondary" onClick={() => setForm({ kind: 'back' })}>
                Bring back {selectedExcluded.length} selected…
              </button>
            )}
          </div>
          {form?.kind === 'selected' && (
            <ReasonForm
              label={`Exclude ${plural(selectedIncluded.length, 'respondent')}`}
              placeholder="Why these respondents leave the analyses"
              busy={exclude.busy}
              onCancel={() => setForm(undefined)}
              onSubmit={(reason) =>
                decide(() =>
                  exclude.run({ datasetId, respondents: selectedIncluded.map((r) => r.index), reason }),
                )
              }
            />
          )}
          {form?.kind === 'back' && (
            <ReasonForm
              label={`Bring back ${plural(selectedExcluded.length, 'respondent')}`}
              placeholder="Why these respondents count again"
              busy={include.busy}
              onCancel={() => setForm(undefined)}
              onSubmit={(reason) =>
                decide(() =>
                  include.run({ datasetId, respondents: selectedExcluded.map((r) => r.index), reason }),
                )
              }
            />
          )}
        </>
      )}
      <ErrorNote message={error} />

      {run && (
        <div className="preview-scroll screening-scroll">
          <table className="data-table screening-table">
            <thead>
              <tr>
                <th>
                  <input
                    type="checkbox"
                    aria-label="Select the respondents shown"
                    checked={allVisibleSelected}
                    disabled={locked}
                    onChange={() =>
                      setSelected((current) => {
                        const next = new Set(current);
                        for (const r of visible) {
                          if (allVisibleSelected) next.delete(r.index);
                          else next.add(r.index);
                        }
                        return next;
                      })
                    }
                  />
                </th>
                {COLUMNS.map((c) => (
                  <th
                    key={c.key}
                    className={c.num ? 'num' : undefined}
                    title={c.title}
                    aria-sort={
                      sort.key === c.key ? (sort.descending ? 'descending' : 'ascending') : undefined
                    }
                  >
                    <button
                      type="button"
                      className="sort-button"
                      onClick={() =>
                        setSort((s) => ({
                          key: c.key,
                          descending: s.key === c.key ? !s.descending : c.key !== 'row' && c.key !== 'id',
                        }))
                      }
                    >
                      {c.label}
                      {sort.key === c.key ? (sort.descending ? ' ▼' : ' ▲') : ''}
                    </button>
                  </th>
                ))}
                <th>In analyses</th>
              </tr>
            </thead>
            <tbody>
              {visible.map((r) => (
                <tr
                  key={r.index}
                  data-respondent={r.id}
                  data-row={r.row}
                  className={r.exclusion ? 'excluded-row' : r.flags.length > 0 ? 'flagged-row' : undefined}
                >
                  <td>
                    <input
                      type="checkbox"
                      aria-label={`Select respondent ${r.id} (row ${r.row})`}
                      checked={selected.has(r.index)}
                      disabled={locked}
                      onChange={() => toggle(r.index)}
                    />
                  </td>
                  <td className="num">{r.row}</td>
                  <td className="nowrap">{r.id}</td>
                  <td className={r.missing > 0 ? 'num warn-text' : 'num'} title={`${r.missing} unanswered`}>
                    {r.answered}/{r.answered + r.missing}
                  </td>
                  <td className="num">{r.longstring ?? '–'}</td>
                  <td className="num">{unbounded(r.irv)}</td>
                  <td className="num" title={r.mahalanobisP === null ? undefined : pValue(r.mahalanobisP)}>
                    {unbounded(r.mahalanobis, 1)}
                  </td>
                  <td className="num">{r.duration ?? '–'}</td>
                  <td className="flags-cell">
                    {r.flags.length === 0 ? (
                      <span className="muted">none</span>
                    ) : (
                      <ul className="respondent-flags">
                        {r.flags.map((f) => (
                          <li key={`${f.check}:${f.reason}`} data-check={f.check}>
                            <strong>{f.label}</strong>: {f.reason.replace(`${f.label}: `, '')}
                          </li>
                        ))}
                      </ul>
                    )}
                  </td>
                  <td className="status-cell">
                    {r.exclusion ? (
                      <>
                        <span className="badge excluded">excluded</span>
                        <span className="exclusion-reason" title={r.exclusion.rule ?? undefined}>
                          {r.exclusion.reason}
                        </span>
                      </>
                    ) : (
                      <span className="badge included">included</span>
                    )}
                    {!locked &&
                      (form?.kind === 'one' && form.index === r.index ? (
                        <ReasonForm
                          label={form.back ? 'Bring back' : 'Exclude'}
                          placeholder={
                            form.back
                              ? 'Why this respondent counts again'
                              : 'Why this respondent leaves the analyses'
                          }
                          busy={exclude.busy || include.busy}
                          onCancel={() => setForm(undefined)}
                          onSubmit={(reason) =>
                            decide(() =>
                              form.back
                                ? include.run({ datasetId, respondents: [r.index], reason })
                                : exclude.run({ datasetId, respondents: [r.index], reason }),
                            )
                          }
                        />
                      ) : (
                        <button
                          type="button"
                          className="link"
                          onClick={() => setForm({ kind: 'one', index: r.index, back: r.exclusion !== null })}
                        >
                          {r.exclusion ? 'Bring back…' : 'Exclude…'}
                        </button>
                      ))}
                  </td>
                </tr>
              ))}
            </tbody>
          </table>
        </div>
      )}
      {run && pages > 1 && (
        <div className="button-row pager">
          <button type="button" className="secondary" disabled={page === 0} onClick={() => setPage(page - 1)}>
            Previous
          </button>
          <span className="muted">
            Page {page + 1} of {pages}
          </span>
          <button
            type="button"
            className="secondary"
            disabled={page + 1 >= pages}
            onClick={() => setPage(page + 1)}
          >
            Next
          </button>
        </div>
      )}
    </Panel>
  );
}
