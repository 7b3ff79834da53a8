import { bounded, percent } from '../../../app/api/format.ts';
import { useMemo, useState } from 'react';
import type { CommandOutput } from '../../../app/api/commands.ts';
import type { FacetCoverage } from '../../../app/api/contracts/items.ts';
import type { FacetRecord } from '../../../app/api/contracts/construct.ts';
import type { ItemKeying, ItemSource } from '../../../app/api/contracts/items.ts';
import { call } from '../../api/client.ts';
import { ErrorNote, Panel } from '../../shared/components.tsx';
import { SignOffAside } from '../../shared/phase-controls.tsx';
import { useMutation, useQuery } from '../../shared/use-command.ts';
import { downloadText } from '../../shared/files.ts';
import { ImportPanel } from './ImportPanel.tsx';
import { ItemRow, SOURCE_OPTIONS } from './ItemRow.tsx';
import { useLiveWording } from './use-wording.ts';
import { WordingNotes } from './WordingNotes.tsx';
import './items.css';

type View = CommandOutput<'items.get'>;
type StateFilter = 'pool' | 'draft' | 'kept' | 'retired' | 'all';

export function ItemsScreen() {
  const view = useQuery('items.get', {});
  const overview = useQuery('study.overview', {});
  const [importing, setImporting] = useState(false);
  const [exportError, setExportError] = useState<string | undefined>();
  const phase = overview.data?.find((p) => p.id === 'items');
  if (view.error) return <ErrorNote message={view.error} />;
  if (!view.data || !phase) return <p className="loading">Loading…</p>;
  const locked = phase.status === 'signed-off';

  async function exportPool() {
    try {
      const file = await call('items.exportCsv', {});
      downloadText(file.fileName, file.text);
      setExportError(undefined);
    } catch (e) {
      setExportError((e as Error).message);
    }
  }

  return (
    <div className="screen items-screen">
      <header className="screen-head">
        <div>
          <p className="eyebrow">Phase 2</p>
          <h1>Item pool</h1>
          <p className="muted">
            Draft the items, map each to a facet, and read the wording checks beside it. The checks advise;
            you decide.
          </p>
        </div>
        <div className="head-actions">
          <button type="button" className="secondary" onClick={() => void exportPool()}>
            Export CSV
          </button>
          <button type="button" className="secondary" disabled={locked} onClick={() => setImporting(true)}>
            Import CSV…
          </button>
        </div>
      </header>
      <ErrorNote message={exportError} />
      <div className="two-column">
        <div className="column-main">
          {locked && (
            <p className="locked-note">
              This phase is signed off. Reopen it (with a reason) to change the pool.
            </p>
          )}
          {importing && !locked && (
            <ImportPanel maxBytes={view.data.maxFileBytes} onClose={() => setImporting(false)} />
          )}
          <CoveragePanel
            coverage={view.data.coverage}
            unmapped={view.data.unmapped}
            minimum={view.data.minItemsPerFacet}
          />
        </div>
        <SignOffAside phase={phase} />
      </div>
      <fieldset disabled={locked} className="plain">
        <ItemsPanel view={view.data} locked={locked} />
      </fieldset>
    </div>
  );
}

function CheckLegend({ threshold }: { threshold: number }) {
  return (
    <details className="check-legend">
      <summary>How the wording checks work</summary>
      <dl>
        <dt>Reading ease</dt>
        <dd>
          Flesch (1948): 206.835 − 1.015 × words per sentence − 84.6 × syllables per word. Higher is easier;
          60–70 reads as plain English; below 50 is flagged.
        </dd>
        <dt>Grade</dt>
        <dd>
          Flesch–Kincaid (Kincaid et al. 1975): 0.39 × words per sentence + 11.8 × syllables per word − 15.59,
          a US school grade.
        </dd>
        <dt>Syllables</dt>
        <dd>
          Counted as groups of vowels (y counts after the first letter), less one for a silent final e, es or
          ed; every word has at least one.
        </dd>
        <dt>Flags</dt>
        <dd>
          More than 20 words; and / or joining two things (double-barrelled); two negations in one sentence;
          absolutes such as always or never; specialist words. Common practice in item writing: they advise,
          you decide.
        </dd>
        <dt>Near duplicates</dt>
        <dd>
          Cosine similarity of the character trigrams of two items of {bounded(threshold, 2)} or more (items
          that differ in a word or two).
        </dd>
      </dl>
    </details>
  );
}

function CoveragePanel(props: { coverage: FacetCoverage[]; unmapped: string[]; minimum: number }) {
  const total = props.coverage.reduce((n, c) => n + c.items, 0) + props.unmapped.length;
  return (
    <Panel
      title="Facet coverage"
      aside={<span className="muted">{total} items in the pool (retired ones not counted)</span>}
    >
      <table className="data-table coverage-table">
        <thead>
          <tr>
            <th>Facet</th>
            <th className="num">Items</th>
            <th className="num">Kept</th>
            <th className="num">Draft</th>
            <th className="num">Reverse-keyed</th>
            <th>Items in the facet</th>
          </tr>
        </thead>
        <tbody>
          {props.coverage.map((c) => (
            <tr key={c.facetId} className={c.warning ? 'coverage-thin' : undefined} data-facet={c.facetName}>
              <td>
                <strong>{c.facetName}</strong>
                {c.warning && <p className="coverage-warning">{c.warning}</p>}
              </td>
              <td className="num">{c.items}</td>
              <td className="num">{c.kept}</td>
              <td className="num">{c.draft}</td>
              <td className="num nowrap">
                {c.reverse} ({percent(c.reverseShare, 0)})
              </td>
              <td>
                <span className="code-chips">
                  {c.codes.map((code) => (
                    <span key={code} className="code-chip">
                      {code}
                    </span>
                  ))}
                </span>
              </td>
            </tr>
          ))}
          {props.unmapped.length > 0 && (
            <tr className="coverage-thin">
              <td>
                <strong>Not mapped to a facet</strong>
              </td>
              <td className="num">{props.unmapped.length}</td>
              <td colSpan={3} />
              <td>
                <span className="code-chips">
                  {props.unmapped.map((code) => (
                    <span key={code} className="code-chip">
                      {code}
                    </span>
                  ))}
                </span>
              </td>
            </tr>
          )}
        </tbody>
      </table>
      <p className="hint">
        Fewer than {props.minimum} items in a facet is a warning (common practice: draft several times the
        number of items the final scale will keep, so that weak items can be dropped).
      </p>
    </Panel>
  );
}

function ItemsPanel({ view, locked }: { view: View; locked: boolean }) {
  const [facet, setFacet] = useState<string>('all');
  const [state, setState] = useState<StateFilter>('pool');
  const [flaggedOnly, setFlaggedOnly] = useState(false);
  const similarity = useMemo(() => {
    const map = new Map<string, number>();
    for (const p of view.nearDuplicates) {
      map.set(`${p.a}|${p.b}`, p.similarity);
      map.set(`${p.b}|${p.a}`, p.similarity);
    }
    return map;
  }, [view.nearDuplicates]);
  const shown = view.items.filter((it) => {
    if (facet === 'none' ? it.facetId !== null : facet !== 'all' && String(it.facetId) !== facet)
      return false;
    if (state === 'pool' && it.state === 'retired') return false;
    if (state !== 'pool' && state !== 'all' && it.state !== state) return false;
    if (flaggedOnly && it.wording.flags.length === 0 && it.nearDuplicates.length === 0) return false;
    return true;
  });
  const flagged = view.items.filter(
    (it) => it.state !== 'retired' && (it.wording.flags.length > 0 || it.nearDuplicates.length > 0),
  ).length;
  return (
    <Panel title="Items" aside={<span className="muted">{flagged} in the pool with wording flags</span>}>
      <CheckLegend threshold={view.nearDuplicateThreshold} />
      {!locked && <AddItemForm facets={view.facets} />}
      <div className="item-filters">
        <select aria-label="Show facet" value={facet} onChange={(e) => setFacet(e.target.value)}>
          <option value="all">All facets</option>
          {view.facets.map((f) => (
            <option key={f.id} value={String(f.id)}>
              {f.name}
            </option>
          ))}
          <option value="none">Not mapped</option>
        </select>
        <select
          aria-label="Show state"
          value={state}
          onChange={(e) => setState(e.target.value as StateFilter)}
        >
          <option value="pool">In the pool (draft and kept)</option>
          <option value="draft">Drafts</option>
          <option value="kept">Kept for review</option>
          <option value="retired">Retired</option>
          <option value="all">All, retired too</option>
        </select>
        <label className="inline-check">
          <input type="checkbox" checked={flaggedOnly} onChange={(e) => setFlaggedOnly(e.target.checked)} />{' '}
          Only items with flags
        </label>
        <span className="muted">
          {shown.length} of {view.items.length} shown
        </span>
      </div>
      <ol className="item-list">
        {shown.map((it) => (
          <ItemRow key={it.id} item={it} facets={view.facets} similarity={similarity} locked={locked} />
        ))}
      </ol>
      {shown.length === 0 && <p className="muted">No items match these filters.</p>}
    </Panel>
  );
}

function AddItemForm({ facets }: { facets: FacetRecord[] }) {
  const add = useMutation('items.add');
  const [code, setCode] = useState('');
  const [text, setText] = useState('');
  const [facetId, setFacetId] = useState<number | null>(facets[0]?.id ?? null);
  const [keying, setKeying] = useState<ItemKeying>('forward');
  const [sourceType, setSourceType] = useState<ItemSource>('own-drafting');
  const [sourceNote, setSourceNote] = useState('');
  const live = useLiveWording(text.trim() === '' ? null : text);
  return (
    <form
      className="add-item"
      aria-label="Add an item"
      onSubmit={async (e) => {
        e.preventDefault();
        const done = await add.run({ code: code.trim(), text, facetId, keying, sourceType, sourceNote });
        if (done !== undefined) {
          setCode('');
          setText('');
        }
      }}
    >
      <div className="add-item-fields">
        <input
          aria-label="New item code"
          placeholder="Code, e.g. TR10"
          value={code}
          onChange={(e) => setCode(e.target.value)}
        />
        <textarea
          aria-label="New item wording"
          placeholder="Item wording, e.g. I can ride past a bus stop while a bus pulls out."
          rows={2}
          value={text}
          onChange={(e) => setText(e.target.value)}
        />
        <div className="item-meta">
          <select
            aria-label="New item facet"
            value={facetId ?? ''}
            onChange={(e) => setFacetId(e.target.value === '' ? null : Number(e.target.value))}
          >
            <option value="">No facet yet</option>
            {facets.map((f) => (
              <option key={f.id} value={f.id}>
                {f.name}
              </option>
            ))}
          </select>
          <select
            aria-label="New item keying"
            value={keying}
            onChange={(e) => setKeying(e.target.value as ItemKeying)}
          >
            <option value="forward">Forward-keyed</option>
            <option value="reverse">Reverse-keyed</option>
          </select>
          <select
            aria-label="New item source"
            value={sourceType}
            onChange={(e) => setSourceType(e.target.value as ItemSource)}
          >
            {SOURCE_OPTIONS.map((o) => (
              <option key={o.value} value={o.value}>
                {o.label}
              </option>
            ))}
          </select>
          <input
            className="source-note"
            aria-label="Where the new item came from"
            placeholder="Where it came from"
            value={sourceNote}
            onChange={(e) => setSourceNote(e.target.value)}
          />
          <button
            type="submit"
            className="primary"
            disabled={code.trim() === '' || text.trim() === '' || add.busy}
          >
            Add item
          </button>
        </div>
        <ErrorNote message={add.error ?? live.error} />
      </div>
      {live.result && (
        <WordingNotes
          wording={live.result.wording}
          matches={live.result.duplicates.map((d) => ({ code: d.code, similarity: d.similarity }))}
        />
      )}
    </form>
  );
}
