import { useState } from 'react';
import { bounded } from '../../../app/api/format.ts';
import type { CommandOutput } from '../../../app/api/commands.ts';
import type { RelationInput } from '../../../app/api/contracts/construct.ts';
import type { FacetRecord, RelationRecord } from '../../../app/api/contracts/construct.ts';
import { AutosaveField, ErrorNote, Panel, ReasonAction } from '../../shared/components.tsx';
import { SignOffAside } from '../../shared/phase-controls.tsx';
import { useMutation, useQuery } from '../../shared/use-command.ts';
import { ResponseFormatEditor } from './ResponseFormatEditor.tsx';

type TextField = 'name' | 'definition' | 'includes' | 'excludes' | 'population' | 'intendedUses';

export function ConstructScreen() {
  const view = useQuery('construct.get', {});
  const overview = useQuery('study.overview', {});
  const setText = useMutation('construct.setText');
  const phase = overview.data?.find((p) => p.id === 'construct');
  if (view.error) return <ErrorNote message={view.error} />;
  if (!view.data || !phase) return <p className="loading">Loading…</p>;
  const { construct, facets, relations } = view.data;
  const locked = phase.status === 'signed-off';
  const save = (field: TextField) => async (value: string) =>
    (await setText.run({ field, value })) !== undefined;

  return (
    <div className="screen">
      <header className="screen-head">
        <div>
          <p className="eyebrow">Phase 1</p>
          <h1>Construct</h1>
          <p className="muted">
            What the scale measures, its facets, who it is for, and what it should relate to.
          </p>
        </div>
      </header>
      <div className="two-column">
        <div className="column-main">
          {locked && (
            <p className="locked-note">This phase is signed off. Reopen it (with a reason) to change it.</p>
          )}
          <fieldset disabled={locked} className="plain">
            <Panel title="Definition">
              <AutosaveField
                name="name"
                label="Construct name"
                value={construct.name}
                onSave={save('name')}
              />
              <AutosaveField
                name="definition"
                label="Definition"
                multiline
                rows={4}
                value={construct.definition}
                onSave={save('definition')}
                hint="State what the construct is in terms precise enough to judge whether an item belongs."
              />
              <div className="field-pair">
                <AutosaveField
                  name="includes"
                  label="The domain includes"
                  multiline
                  value={construct.includes}
                  onSave={save('includes')}
                />
                <AutosaveField
                  name="excludes"
                  label="The domain excludes"
                  multiline
                  value={construct.excludes}
                  onSave={save('excludes')}
                />
              </div>
              <div className="field-pair">
                <AutosaveField
                  name="population"
                  label="Target population"
                  multiline
                  value={construct.population}
                  onSave={save('population')}
                />
                <AutosaveField
                  name="intendedUses"
                  label="Intended uses"
                  multiline
                  value={construct.intendedUses}
                  onSave={save('intendedUses')}
                />
              </div>
              <ScoreUseField value={construct.scoreUse} choices={view.data.scoreUses} />
              <ErrorNote message={setText.error} />
            </Panel>
            <FacetsPanel facets={facets} />
            <ResponseFormatEditor
              points={construct.responsePoints}
              min={construct.responseMin}
              anchors={construct.anchors}
            />
            <RelationsPanel relations={relations} />
          </fieldset>
        </div>
        <SignOffAside phase={phase} />
      </div>
    </div>
  );
}

function FacetsPanel({ facets }: { facets: FacetRecord[] }) {
  const add = useMutation('facet.add');
  const [name, setName] = useState('');
  const [definition, setDefinition] = useState('');
  const active = facets.filter((f) => !f.retiredAt);
  const retired = facets.filter((f) => f.retiredAt);
  return (
    <Panel title="Facets" aside={<span className="muted">{active.length} active</span>}>
      <ol className="facet-list">
        {active.map((facet, index) => (
          <FacetRow key={facet.id} facet={facet} index={index} last={index === active.length - 1} />
        ))}
      </ol>
      {retired.length > 0 && (
        <details className="retired">
          <summary>{retired.length} retired (kept in the study’s history)</summary>
          <ul>
            {retired.map((facet) => (
              <RetiredFacet key={facet.id} facet={facet} />
            ))}
          </ul>
        </details>
      )}
      <form
        className="add-form"
        onSubmit={async (e) => {
          e.preventDefault();
          if ((await add.run({ name, definition })) !== undefined) {
            setName('');
            setDefinition('');
          }
        }}
      >
        <input
          aria-label="New facet name"
          placeholder="New facet name"
          value={name}
          onChange={(e) => setName(e.target.value)}
        />
        <input
          aria-label="New facet definition"
          placeholder="Definition"
          value={definition}
          onChange={(e) => setDefinition(e.target.value)}
        />
        <button type="submit" className="secondary" disabled={name.trim() === ''}>
          Add facet
        </button>
      </form>
      <ErrorNote message={add.error} />
    </Panel>
  );
}

function FacetRow({ facet, index, last }: { facet: FacetRecord; index: number; last: boolean }) {
  const edit = useMutation('facet.edit');
  const move = useMutation('facet.move');
  const retire = useMutation('facet.retire');
  return (
    <li className="facet-row" data-facet={facet.name}>
      <div className="facet-fields">
        <AutosaveField
          name={`facet-${facet.id}-name`}
          label={`Facet ${index + 1}`}
          value={facet.name}
          onSave={async (value) => (await edit.run({ id: facet.id, name: value })) !== undefined}
        />
        <AutosaveField
          name={`facet-${facet.id}-definition`}
          label="Definition"
          multiline
          rows={2}
          value={facet.definition}
          onSave={async (value) => (await edit.run({ id: facet.id, definition: value })) !== undefined}
        />
      </div>
      <div className="facet-actions">
        <button
          type="button"
          className="icon"
          aria-label={`Move ${facet.name} up`}
          disabled={index === 0}
          onClick={() => move.run({ id: facet.id, toIndex: index - 1 })}
        >
          ↑
        </button>
        <button
          type="button"
          className="icon"
          aria-label={`Move ${facet.name} down`}
          disabled={last}
          onClick={() => move.run({ id: facet.id, toIndex: index + 1 })}
        >
          ↓
        </button>
        <ReasonAction
          label="Retire…"
          confirm="Retire facet"
          placeholder={`Why retire ${facet.name}?`}
          onConfirm={(rationale) => retire.run({ id: facet.id, rationale })}
        />
      </div>
      <ErrorNote message={edit.error ?? move.error ?? retire.error} />
    </li>
  );
}

function RetiredFacet({ facet }: { facet: FacetRecord }) {
  const restore = useMutation('facet.restore');
  return (
    <li>
      <strong>{facet.name}</strong> — {facet.definition}{' '}
      <ReasonAction
        label="Restore…"
        confirm="Restore facet"
        placeholder={`Why restore ${facet.name}?`}
        onConfirm={(rationale) => restore.run({ id: facet.id, rationale })}
      />
      <ErrorNote message={restore.error} />
    </li>
  );
}

const EMPTY_RELATION: RelationInput = {
  otherConstruct: '',
  kind: 'convergent',
  expectedSign: 'positive',
  expectedStrength: 'moderate',
  measure: '',
  rationale: '',
};

function RelationsPanel({ relations }: { relations: RelationRecord[] }) {
  const add = useMutation('relation.add');
  const withdraw = useMutation('relation.withdraw');
  const [draft, setDraft] = useState<RelationInput>(EMPTY_RELATION);
  const active = relations.filter((r) => !r.retiredAt);
  const set = <K extends keyof RelationInput>(key: K, value: RelationInput[K]) =>
    setDraft({ ...draft, [key]: value });
  return (
    <Panel
      title="Planned relations to other constructs"
      aside={<span className="muted">become the validity hypotheses</span>}
    >
      <table className="data-table">
        <thead>
          <tr>
            <th>Other construct</th>
            <th>Evidence</th>
            <th>Expected</th>
            <th>Measure</th>
            <th>Why</th>
            <th />
          </tr>
        </thead>
        <tbody>
          {active.map((r) => (
            <tr key={r.id}>
              <td>{r.otherConstruct}</td>
              <td>{r.kind.replace('-', ' ')}</td>
              <td className="nowrap">
                {r.expectedSign === 'none' ? 'near zero' : `${r.expectedStrength} ${r.expectedSign}`}
              </td>
              <td>{r.measure}</td>
              <td className="rationale">{r.rationale}</td>
              <td>
                <ReasonAction
                  label="Withdraw…"
                  confirm="Withdraw"
                  placeholder={`Why withdraw the relation to ${r.otherConstruct}?`}
                  onConfirm={(rationale) => withdraw.run({ id: r.id, rationale })}
                />
              </td>
            </tr>
          ))}
        </tbody>
      </table>
      <form
        className="relation-form"
        onSubmit={async (e) => {
          e.preventDefault();
          if ((await add.run(draft)) !== undefined) setDraft(EMPTY_RELATION);
        }}
      >
        <input
          aria-label="Other construct"
          placeholder="Other construct"
          value={draft.otherConstruct}
          onChange={(e) => set('otherConstruct', e.target.value)}
        />
        <select
          aria-label="Kind of evidence"
          value={draft.kind}
          onChange={(e) => set('kind', e.target.value as RelationInput['kind'])}
        >
          <option value="convergent">convergent</option>
          <option value="discriminant">discriminant</option>
          <option value="criterion">criterion</option>
          <option value="known-groups">known groups</option>
        </select>
        <select
          aria-label="Expected sign"
          value={draft.expectedSign}
          onChange={(e) => set('expectedSign', e.target.value as RelationInput['expectedSign'])}
        >
          <option value="positive">positive</option>
          <option value="negative">negative</option>
          <option value="none">none</option>
        </select>
        <select
          aria-label="Expected strength"
          value={draft.expectedStrength}
          onChange={(e) => set('expectedStrength', e.target.value as RelationInput['expectedStrength'])}
        >
          <option value="near-zero">near zero</option>
          <option value="weak">weak</option>
          <option value="moderate">moderate</option>
          <option value="strong">strong</option>
        </select>
        <input
          aria-label="Measure"
          placeholder="Measure used"
          value={draft.measure}
          onChange={(e) => set('measure', e.target.value)}
        />
        <input
          aria-label="Why this is expected"
          placeholder="Why this is expected"
          value={draft.rationale}
          onChange={(e) => set('rationale', e.target.value)}
        />
        <button type="submit" className="secondary" disabled={draft.otherConstruct.trim() === ''}>
          Add relation
        </button>
      </form>
      <ErrorNote message={add.error ?? withdraw.error} />
    </Panel>
  );
}

function ScoreUseField(props: {
  value: string | null;
  choices: CommandOutput<'construct.get'>['scoreUses'];
}) {
  const setUse = useMutation('construct.setScoreUse');
  return (
    <div className="field">
      <label htmlFor="field-score-use">Scores will mainly serve</label>
      <select
        id="field-score-use"
        value={props.value ?? ''}
        onChange={(e) => {
          const chosen = props.choices.find((c) => c.use === e.target.value);
          void setUse.run({ use: chosen ? chosen.use : null });
        }}
      >
        <option value="">not stated (early-stage criterion shown)</option>
        {props.choices.map((c) => (
          <option key={c.use} value={c.use}>
            {c.label} — reliability criterion {bounded(c.minimum, 2)}
          </option>
        ))}
      </select>
      <p className="hint">
        Sets the reliability criterion shown beside every alpha ({props.choices[0]?.source}).
      </p>
      <ErrorNote message={setUse.error} />
    </div>
  );
}
