import { useRef, useState } from 'react';
import { PHASE_TITLES } from '../../../app/api/contracts/phases.ts';
import type { LogEntry } from '../../../app/api/contracts/log.ts';
import type { PhaseId } from '../../../app/api/contracts/phases.ts';
import type { IntegrityBreak, VerifyReport } from '../../../app/api/contracts/log.ts';
import type { FullVerifyReport } from '../../../app/api/contracts/history.ts';
import { call } from '../../api/client.ts';
import { ErrorNote, formatTime } from '../../shared/components.tsx';
import { downloadText } from '../../shared/files.ts';
import { historyLink } from '../../shared/history-links.ts';
import { useMutation, useQuery } from '../../shared/use-command.ts';
import { useHistoryPath } from './history-path.ts';
import { ItemStory } from './ItemStory.tsx';
import { RunDetail } from './RunDetail.tsx';
import './history.css';
import './log.css';

const PAGE_SIZE = 50;

type PhaseFilter = PhaseId | 'study' | '';

/** What each kind of check covers, in the words the verify result uses. */
const CHECK_LABEL: Record<IntegrityBreak['check'], string> = {
  file: 'Study file',
  log: 'Log chain',
  'stored-file': 'Stored file',
  'analysis-run': 'Analysis run',
  content: 'Content',
  digests: 'Content digests',
  head: 'Recorded head',
  rerun: 'Re-run',
};

/** The study's history: the log, one row of it, an item's life story, or a stored analysis run. */
export function DecisionLogScreen() {
  const path = useHistoryPath();
  if (path.view === 'item') return <ItemStory code={path.code} />;
  if (path.view === 'run') return <RunDetail id={path.id} />;
  if (path.view === 'row') return <OneRow seq={path.seq} />;
  return <LogList />;
}

/** One log row, opened, as the life story and the run pages link to it. */
function OneRow({ seq }: { seq: number }) {
  const row = useQuery('history.row', { seq });
  return (
    <div className="screen">
      <header className="screen-head">
        <div>
          <p className="eyebrow">
            <a href="#/log">Decision log</a> › Row {seq}
          </p>
          <h1>Log row {seq}</h1>
        </div>
      </header>
      <ErrorNote message={row.error} />
      {row.data && (
        <table className="data-table log-table">
          <LogHeader />
          <tbody>
            <LogRow entry={row.data} initiallyOpen />
          </tbody>
        </table>
      )}
    </div>
  );
}

function LogHeader() {
  return (
    <thead>
      <tr>
        <th className="num">#</th>
        <th>When</th>
        <th>Who</th>
        <th>Phase</th>
        <th>What</th>
        <th>Target</th>
        <th>Rationale</th>
      </tr>
    </thead>
  );
}

/** The item code a row's target names ("item TR05 …"), if any. */
function itemOf(target: string): string | undefined {
  return /^item (\S+)/.exec(target)?.[1];
}

function LogList() {
  const [phase, setPhase] = useState<PhaseFilter>('');
  const [kind, setKind] = useState('');
  const [item, setItem] = useState('');
  const [search, setSearch] = useState('');
  const [page, setPage] = useState(0);
  const filter = {
    ...(phase === '' ? {} : { phase }),
    ...(kind === '' ? {} : { kind }),
    ...(item.trim() === '' ? {} : { item: item.trim() }),
    ...(search.trim() === '' ? {} : { search: search.trim() }),
  };
  const log = useQuery('log.list', { ...filter, limit: PAGE_SIZE, offset: page * PAGE_SIZE });
  const verify = useMutation('log.verify');
  const [result, setResult] = useState<FullVerifyReport | undefined>();
  const [exportError, setExportError] = useState<string | undefined>();

  /** Every filter change starts again at the first page. */
  function narrow<T>(set: (v: T) => void) {
    return (v: T) => {
      set(v);
      setPage(0);
    };
  }

  async function exportCsv() {
    try {
      const file = await call('log.exportCsv', filter);
      downloadText(file.fileName, file.text);
      setExportError(undefined);
    } catch (e) {
      setExportError((e as Error).message);
    }
  }

  const total = log.data?.total ?? 0;
  const pages = Math.max(1, Math.ceil(total / PAGE_SIZE));
  const first = total === 0 ? 0 : page * PAGE_SIZE + 1;
  const last = Math.min(total, (page + 1) * PAGE_SIZE);

  return (
    <div className="screen">
      <header className="screen-head">
        <div>
          <p className="eyebrow">Audit trail</p>
          <h1>Decision log</h1>
          <p className="muted">
            Every change, with who made it, when and why. Rows are chained by SHA-256, and each row records a
            digest of everything the study then held, so an edited, removed or reordered row, or content
            changed outside the app, is detected.
          </p>
        </div>
        <div className="head-actions">
          <button type="button" className="secondary" onClick={exportCsv}>
            Export CSV
          </button>
          <button type="button" className="secondary" onClick={async () => setResult(await verify.run({}))}>
            Verify study
          </button>
        </div>
      </header>
      <LogHead head={log.data?.head ?? null} />
      {result && <VerifyResult report={result} />}
      <ErrorNote message={log.error ?? verify.error ?? exportError} />
      <search className="log-filters">
        <input
          type="search"
          aria-label="Search the log"
          placeholder="Search target, rationale, kind…"
          value={search}
          onChange={(e) => narrow(setSearch)(e.target.value)}
        />
        <select
          aria-label="Filter by phase"
          value={phase}
          onChange={(e) => narrow(setPhase)(e.target.value as PhaseFilter)}
        >
          <option value="">All phases</option>
          {Object.entries(PHASE_TITLES).map(([id, title]) => (
            <option key={id} value={id}>
              {title}
            </option>
          ))}
          <option value="study">The study file</option>
        </select>
        <select aria-label="Filter by kind" value={kind} onChange={(e) => narrow(setKind)(e.target.value)}>
          <option value="">All kinds</option>
          {(log.data?.kinds ?? []).map((k) => (
            <option key={k} value={k}>
              {k.replaceAll('-', ' ')}
            </option>
          ))}
        </select>
        <input
          type="text"
          aria-label="Filter by item code"
          placeholder="Item code"
          value={item}
          maxLength={20}
          onChange={(e) => narrow(setItem)(e.target.value)}
        />
        {item.trim() !== '' && (
          <a className="story-link" href={historyLink.item(item.trim())}>
            Life story of item {item.trim()} →
          </a>
        )}
      </search>
      {log.data && (
        <>
          <table className="data-table log-table">
            <LogHeader />
            <tbody>
              {log.data.entries.map((entry) => (
                <LogRow key={entry.seq} entry={entry} />
              ))}
            </tbody>
          </table>
          <nav className="log-pager" aria-label="Log pages">
            <button
              type="button"
              className="secondary"
              disabled={page === 0}
              onClick={() => setPage(page - 1)}
            >
              Newer
            </button>
            <span role="status">
              {total === 0 ? 'No rows match.' : `Rows ${first}–${last} of ${total}`} · page {page + 1} of{' '}
              {pages}
            </span>
            <button
              type="button"
              className="secondary"
              disabled={page + 1 >= pages}
              onClick={() => setPage(page + 1)}
            >
              Older
            </button>
          </nav>
        </>
      )}
    </div>
  );
}

/**
 * The log's head with a copy button. Recorded outside the file (a preregistration, an e-mail, the
 * printed appendix), it lets anyone check later that the log still holds that row with that hash.
 */
function LogHead({ head }: { head: string | null }) {
  const code = useRef<HTMLElement>(null);
  const [copied, setCopied] = useState<string | undefined>();
  const [recorded, setRecorded] = useState('');
  const check = useMutation('log.verify');
  const [checked, setChecked] = useState<VerifyReport | undefined>();

  async function copy() {
    if (!head) return;
    try {
      await navigator.clipboard.writeText(head);
      setCopied('Copied.');
    } catch {
      // Where the clipboard is not offered, select the head so that it can be copied by hand.
      const range = document.createRange();
      if (code.current) range.selectNodeContents(code.current);
      window.getSelection()?.removeAllRanges();
      window.getSelection()?.addRange(range);
      setCopied('Selected: copy it with your keyboard.');
    }
  }

  return (
    <section className="log-head" aria-label="Log head">
      <p>
        <strong>Log head</strong>{' '}
        {head ? (
          <code ref={code} className="log-head-value">
            {head}
          </code>
        ) : (
          <span className="muted">none yet (the log is empty)</span>
        )}{' '}
        {head && (
          <button type="button" className="secondary small" onClick={copy}>
            Copy
          </button>
        )}{' '}
        {copied && <span className="muted">{copied}</span>}
      </p>
      <p className="muted">
        Record this head outside the study (a preregistration, an e-mail to a co-author, the appendix);
        checking it here later, or with <code>project verify FILE --head SEQ:HASH</code>, proves the log still
        holds everything up to that row.
      </p>
      <form
        className="log-head-check"
        onSubmit={async (e) => {
          e.preventDefault();
          setChecked(await check.run({ head: recorded.trim() }));
        }}
      >
        <input
          type="text"
          aria-label="A recorded head"
          placeholder="SEQ:HASH recorded earlier"
          value={recorded}
          onChange={(e) => setRecorded(e.target.value)}
        />
        <button type="submit" className="secondary" disabled={recorded.trim() === ''}>
          Check recorded head
        </button>
      </form>
      <ErrorNote message={check.error} />
      {checked?.headChecked && (
        <p className={checked.headChecked.held ? 'verify-ok' : 'error-note'} role="status">
          {checked.headChecked.held
            ? `The log still holds row ${checked.headChecked.head.split(':')[0]} with the recorded hash.`
            : (checked.breaks.find((b) => b.check === 'head')?.problem ?? 'The recorded head is not held.')}
        </p>
      )}
    </section>
  );
}

function VerifyResult({ report }: { report: FullVerifyReport }) {
  const runs = report.rerun.runs;
  const reproduced = runs.filter((r) => r.status === 'reproduced').length;
  const notes = runs.filter((r) => r.status !== 'reproduced' && !report.rerun.breaks.includes(r));
  const rerun = (
    <>
      {runs.length === 0
        ? ' No analysis is stored yet.'
        : ` ${reproduced} of ${runs.length} stored analyses re-run from their stored inputs reproduce.`}
      {notes.length > 0 && (
        <ul className="verify-breaks">
          {notes.map((r) => (
            <li key={r.runId}>
              Run #{r.runId}: {r.note ?? `${r.differenceCount} field(s) differ under another engine version`}
            </li>
          ))}
        </ul>
      )}
    </>
  );
  if (report.intact) {
    return (
      <div className="verify-ok" role="status">
        Study intact: {report.logRows} log rows chained; every stored file, analysis run and content row
        matches what the log recorded.
        {rerun}
      </div>
    );
  }
  return (
    <div className="error-note" role="status">
      <p>
        {report.breaks.length} break{report.breaks.length === 1 ? '' : 's'} found:
      </p>
      <ul className="verify-breaks">
        {report.breaks.map((b, i) => (
          // biome-ignore lint/suspicious/noArrayIndexKey: breaks have no identity of their own
          <li key={i}>
            <strong>{CHECK_LABEL[b.check]}</strong>
            {b.table && ` · ${b.table}${b.row ? ` (${b.row})` : ''}`}
            {b.seq !== undefined && ` · log row ${b.seq}`}: {b.problem}
          </li>
        ))}
      </ul>
    </div>
  );
}

/** One row; a click shows what changed (before and after), the run it rests on, and its hash. */
function LogRow({ entry, initiallyOpen = false }: { entry: LogEntry; initiallyOpen?: boolean }) {
  const [open, setOpen] = useState(initiallyOpen);
  const code = itemOf(entry.target);
  return (
    <>
      <tr className={open ? 'log-row open' : 'log-row'} onClick={() => setOpen(!open)}>
        <td className="num">{entry.seq}</td>
        <td className="nowrap">{formatTime(entry.at)}</td>
        <td title={entry.actorUser}>{entry.actorName}</td>
        <td>{PHASE_TITLES[entry.phase as PhaseId] ?? entry.phase}</td>
        <td>
          {entry.kind.replaceAll('-', ' ')}
          {typeof entry.detail.reverses === 'number' && (
            <span className="reverses-row"> · reverses row {entry.detail.reverses}</span>
          )}
        </td>
        <td>{entry.target}</td>
        <td className="rationale">{entry.rationale}</td>
      </tr>
      {open && (
        <tr className="log-detail">
          <td />
          <td colSpan={6}>
            <dl>
              {code && (
                <>
                  <dt>Item</dt>
                  <dd>
                    <a href={historyLink.item(code)}>Life story of item {code}</a>
                  </dd>
                </>
              )}
              {entry.runId !== null && (
                <>
                  <dt>Analysis run</dt>
                  <dd>
                    <a href={historyLink.run(entry.runId)}>
                      Open stored run #{entry.runId} (inputs, options, seed, results)
                    </a>
                  </dd>
                </>
              )}
              <dt>Details</dt>
              <dd>
                <pre>{JSON.stringify(entry.detail, null, 2)}</pre>
              </dd>
              <dt>Hash</dt>
              <dd className="hash">{entry.hash}</dd>
              {entry.stateDigest && (
                <>
                  <dt>Content digest</dt>
                  <dd className="hash">{entry.stateDigest}</dd>
                </>
              )}
              {entry.runDigest && (
                <>
                  <dt>Run digest</dt>
                  <dd className="hash">{entry.runDigest}</dd>
                </>
              )}
              <dt>Operating-system user</dt>
              <dd>{entry.actorUser}</dd>
            </dl>
          </td>
        </tr>
      )}
    </>
  );
}
