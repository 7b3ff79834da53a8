import { useState } from 'react';
import type { RoundDetail } from '../../../app/api/contracts/purification.ts';
import { plural } from '../../../app/api/format.ts';
import { useMutation } from '../../shared/use-command.ts';
import { ItemChecklist, ReasonsForm, useReasons } from './ReasonsForm.tsx';

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
  const reasons = useReasons();
  const [done, setDone] = useState<string | undefined>(undefined);
  if (props.facets.length < 1) return null;
  const itemsOf = (facetId: number | undefined) =>
    props.detail.rows.filter((r) => r.facetId === facetId && !r.droppedNow);

  async function submit() {
    setDone(undefined);
    if (mode === 'merge' && from !== undefined && into !== undefined) {
      const ids = await merge.run({
        fromFacetId: from,
        intoFacetId: into,
        domainRationale: reasons.domain,
        statisticalRationale: reasons.statistical,
      });
      if (ids) setDone(`Merged: ${plural(ids.length, 'item')} moved. Run the next round to see the effect.`);
    } else if (mode === 'split' && from !== undefined) {
      const out = await split.run({
        facetId: from,
        itemCodes: [...chosen],
        newFacet: { name, definition },
        domainRationale: reasons.domain,
        statisticalRationale: reasons.statistical,
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
    <ReasonsForm
      title="Merge or split facets"
      className="facet-decision"
      reasons={reasons}
      domainField={{
        id: 'facet-domain',
        label: 'How the items’ content fits the facet they go to (required)',
      }}
      statisticalField={{ id: 'facet-statistics', label: 'What the factor analysis and reliabilities show' }}
      submitLabel={mode === 'merge' ? 'Merge facets' : 'Split facet'}
      disabled={merge.busy || split.busy}
      onSubmit={submit}
      done={done}
      error={mode === 'merge' ? merge.error : split.error}
    >
      <div className="button-row">
        <label className="inline-radio">
          <input type="radio" checked={mode === 'merge'} onChange={() => setMode('merge')} /> Merge two facets
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
          <ItemChecklist rows={itemsOf(from)} chosen={chosen} onChange={setChosen} />
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
    </ReasonsForm>
  );
}
