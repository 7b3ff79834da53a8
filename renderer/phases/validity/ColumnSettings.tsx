import { type ReactNode, useState } from 'react';
import { ErrorNote } from '../../shared/components.tsx';
import { useMutation } from '../../shared/use-command.ts';
import type { View } from './common.tsx';

type MeasureRow = View['columns']['measures'][number];
type GroupRow = View['columns']['groups'][number];

/**
 * How one column of the validation data is read, as a form: the column, the planned relation it
 * answers, the settings of its kind (children), why it is read this way, and the reason in force.
 * The relation and the reason are kept here; `save` says whether the setting was stored.
 */
function ColumnForm(props: {
  label: string;
  column: string;
  /** The planned relations this kind of column can answer, each with the words its option shows. */
  relations: { id: number; text: string }[];
  relationId: number | null;
  whyPlaceholder: string;
  /** The reason of the setting in force, if there is one. */
  now: string | undefined;
  /** The save's state: running, and the message of its last refusal. */
  saving: { busy: boolean; error?: string };
  save(relationId: number | null, rationale: string): Promise<boolean>;
  children: ReactNode;
}) {
  const [relationId, setRelationId] = useState(props.relationId);
  const [rationale, setRationale] = useState('');
  return (
    <form
      className="column-form"
      aria-label={props.label}
      onSubmit={async (e) => {
        e.preventDefault();
        if (await props.save(relationId, rationale)) setRationale('');
      }}
    >
      <strong className="item-code">{props.column}</strong>
      <select
        aria-label="Relation it answers"
        value={relationId ?? ''}
        onChange={(e) => setRelationId(e.target.value === '' ? null : Number(e.target.value))}
      >
        <option value="">no planned relation</option>
        {props.relations.map((r) => (
          <option key={r.id} value={r.id}>
            {r.text}
          </option>
        ))}
      </select>
      {props.children}
      <input
        aria-label="Why"
        placeholder={props.whyPlaceholder}
        value={rationale}
        onChange={(e) => setRationale(e.target.value)}
      />
      <button type="submit" className="secondary" disabled={props.saving.busy || rationale.trim() === ''}>
        Save
      </button>
      {props.now !== undefined && <span className="muted setting-now">now: {props.now}</span>}
      <ErrorNote message={props.saving.error} />
    </form>
  );
}

/** How one criterion column is read: the relation it answers, when it was measured, its reliability. */
export function MeasureForm({ row, view }: { row: MeasureRow; view: View }) {
  const save = useMutation('validity.describeMeasure');
  const s = row.setting;
  const [timing, setTiming] = useState<'concurrent' | 'predictive'>(s?.timing ?? 'concurrent');
  const [reliability, setReliability] = useState(s?.reliability === null || !s ? '' : String(s.reliability));
  return (
    <ColumnForm
      label={`Column ${row.column}`}
      column={row.column}
      relations={view.relations
        .filter((r) => r.kind !== 'known-groups')
        .map((r) => ({ id: r.id, text: `${r.otherConstruct} (${r.kind})` }))}
      relationId={s?.relationId ?? null}
      whyPlaceholder="Why it is read this way"
      now={s?.rationale}
      saving={save}
      save={async (relationId, rationale) =>
        (await save.run({
          column: row.column,
          relationId,
          timing,
          reliability: reliability.trim() === '' ? null : Number(reliability),
          rationale,
        })) !== undefined
      }
    >
      <select
        aria-label="When it was measured"
        value={timing}
        onChange={(e) => setTiming(e.target.value as 'concurrent' | 'predictive')}
      >
        <option value="concurrent">same time (concurrent)</option>
        <option value="predictive">later (predictive)</option>
      </select>
      <input
        aria-label="Its reliability"
        placeholder="reliability"
        size={8}
        value={reliability}
        onChange={(e) => setReliability(e.target.value)}
      />
    </ColumnForm>
  );
}

/** How one group column answers a known-groups relation: which group should score higher. */
export function GroupForm({ row, view }: { row: GroupRow; view: View }) {
  const save = useMutation('validity.describeGroups');
  const s = row.setting;
  const levels = row.levels.map((l) => l.name);
  const [higher, setHigher] = useState(s?.higher ?? levels.at(-1) ?? '');
  const [lower, setLower] = useState(s?.lower ?? levels[0] ?? '');
  return (
    <ColumnForm
      label={`Group column ${row.column}`}
      column={row.column}
      relations={view.relations
        .filter((r) => r.kind === 'known-groups')
        .map((r) => ({ id: r.id, text: r.otherConstruct }))}
      relationId={s?.relationId ?? null}
      whyPlaceholder="Why these groups"
      now={s?.rationale}
      saving={save}
      save={async (relationId, rationale) =>
        (await save.run({ column: row.column, relationId, higher, lower, rationale })) !== undefined
      }
    >
      <select aria-label="Expected higher" value={higher} onChange={(e) => setHigher(e.target.value)}>
        {levels.map((l) => (
          <option key={l}>{l}</option>
        ))}
      </select>
      <span>above</span>
      <select aria-label="Expected lower" value={lower} onChange={(e) => setLower(e.target.value)}>
        {levels.map((l) => (
          <option key={l}>{l}</option>
        ))}
      </select>
    </ColumnForm>
  );
}
