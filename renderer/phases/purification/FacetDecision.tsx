import { useState } from 'react';
import type { RoundDetail } from '../../../app/api/contracts/purification.ts';
import { plural } from '../../../app/api/format.ts';
import { ErrorNote, Panel } from '../../shared/components.tsx';
import { useMutation } from '../../shared/use-command.ts';

type Facet = { id: number; name: string; definition: string };

/**
 * Facet decisions on the latest round: merge one facet into another, or split some items of a facet
 * off into a new one. Each moved item gets its own move decision (reversed like any move), and the
 * reasons about the domain are required.
 */
export function FacetDecision(props: { detail: RoundDetail; facets: Facet[] }) {
  const merge = useMutation('purification.mergeFacets');
  const split = useMutation('purification.splitFacet');
  const [mode, setMode] = useState<'merge' | 'split'>('merge');
  const [from, setFrom] = useState<number | undefined>(props.facets[0]?.id);
  const [into, setInto] = useState<number | undefined>(props.facets[1]?.id);
  const [chosen, setChosen] = useState<Set<string>>(new Set());
  const [name, setName] = useState('');
  const [definition, setDefinition] = useState('');
  const [domain, setDomain] = useState('');
  const [statistical, setStatistical] = useState('');
  const [done, setDone] = useState<string | undefined>(undefined);
  if (props.facets.length < 1) return null;
  const itemsOf = (facetId: number | undefined) =>
    props.detail.rows.filter((r) => r.facetId === facetId && !r.droppedNow);
  const busy = merge.busy || split.busy;

  async function submit() {
    setDone(undefined);
    if (mode === 'merge' && from !== undefined && into !== undefined) {
      const ids = await merge.run({
        fromFacetId: from,
        intoFacetId: into,
        domainRationale: domain,
        statisticalRationale: statistical,
      });
      if (ids) setDone(`Merged: ${plural(ids.length, 'item')} moved. Run the next round to see the effect.`);
    } else if (mode === 'split' && from !== undefined) {
      const out = await split.run({
        facetId: from,
        itemCodes: [...chosen],
        newFacet: { name, definition },
        domainRationale: domain,
        statisticalRationale: statistical,
      });
      if (out) {
        setDone(
          `Split: ${plural(out.decisions.length, 'item')} moved to “${name}”. Run the next round to see the effect.`,
        );
        setChosen(new Set());
      }
    }
  }

  return (
    <Panel title="Merge or split facets">
      <form
        className="facet-decision"
        onSubmit={(e) => {
          e.preventDefault();
          void submit();
        }}
      >
        <div className="button-row">
          <label className="inline-radio">
            <input type="radio" checked={mode === 'merge'} onChange={() => setMode('merge')} /> Merge two
            facets
          </label>
          <label className="inline-radio">
            <input type="radio" checked={mode === 'split'} onChange={() => setMode('split')} /> Split a facet
          </label>
        </div>
        <div className="runner-options">
          <label>
            {mode === 'merge' ? 'Move every item of' : 'Split'}
            <select value={from} onChange={(e) => setFrom(Number(e.target.value))}>
              {props.facets.map((f) => (
                <option key={f.id} value={f.id}>
                  {f.name} ({itemsOf(f.id).length})
                </option>
              ))}
            </select>
          </label>
          {mode === 'merge' && (
            <label>
              into
              <select value={into} onChange={(e) => setInto(Number(e.target.value))}>
                {props.facets.map((f) => (
                  <option key={f.id} value={f.id}>
                    {f.name}
                  </option>
                ))}
              </select>
            </label>
          )}
        </div>
        {mode === 'split' && (
          <>
            <ul className="batch-items">
              {itemsOf(from).map((row) => (
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
                    <strong>{row.code}</strong> {row.text}
                  </label>
                </li>
              ))}
            </ul>
            <div className="field">
              <label htmlFor="split-name">Name of the new facet</label>
              <input id="split-name" value={name} onChange={(e) => setName(e.target.value)} />
            </div>
            <div className="field">
              <label htmlFor="split-definition">Its definition: what its items have in common</label>
              <textarea
                id="split-definition"
                rows={2}
                value={definition}
                onChange={(e) => setDefinition(e.target.value)}
              />
            </div>
          </>
        )}
        <div className="field">
          <label htmlFor="facet-domain">How the items’ content fits the facet they go to (required)</label>
          <textarea id="facet-domain" rows={2} value={domain} onChange={(e) => setDomain(e.target.value)} />
        </div>
        <div className="field">
          <label htmlFor="facet-statistics">What the factor analysis and reliabilities show</label>
          <textarea
            id="facet-statistics"
            rows={2}
            value={statistical}
            onChange={(e) => setStatistical(e.target.value)}
          />
        </div>
        <button type="submit" className="primary" disabled={busy}>
          {mode === 'merge' ? 'Merge facets' : 'Split facet'}
        </button>
        {done && <p className="done-note">{done}</p>}
        <ErrorNote message={mode === 'merge' ? merge.error : split.error} />
      </form>
    </Panel>
  );
}
