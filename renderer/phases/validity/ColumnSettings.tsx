import { useState } from 'react';
import { ErrorNote } from '../../shared/components.tsx';
import { useMutation } from '../../shared/use-command.ts';
import type { View } from './common.tsx';

type MeasureRow = View['columns']['measures'][number];
type GroupRow = View['columns']['groups'][number];

/** How one criterion column is read: the relation it answers, when it was measured, its reliability. */
export function MeasureForm({ row, view }: { row: MeasureRow; view: View }) {
  const save = useMutation('validity.describeMeasure');
  const s = row.setting;
  const [relationId, setRelationId] = useState<number | null>(s?.relationId ?? null);
  const [timing, setTiming] = useState<'concurrent' | 'predictive'>(s?.timing ?? 'concurrent');
  const [reliability, setReliability] = useState(s?.reliability === null || !s ? '' : String(s.reliability));
  const [rationale, setRationale] = useState('');
  const options = view.relations.filter((r) => r.kind !== 'known-groups');
  return (
    <form
      className="column-form"
      aria-label={`Column ${row.column}`}
      onSubmit={async (e) => {
        e.preventDefault();
        const ok = await save.run({
          column: row.column,
          relationId,
          timing,
          reliability: reliability.trim() === '' ? null : Number(reliability),
          rationale,
        });
        if (ok !== undefined) setRationale('');
      }}
    >
      <strong className="item-code">{row.column}</strong>
      <select
        aria-label="Relation it answers"
        value={relationId ?? ''}
        onChange={(e) => setRelationId(e.target.value === '' ? null : Number(e.target.value))}
      >
        <option value="">no planned relation</option>
        {options.map((r) => (
          <option key={r.id} value={r.id}>
            {r.otherConstruct} ({r.kind})
          </option>
        ))}
      </select>
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
      <input
        aria-label="Why"
        placeholder="Why it is read this way"
        value={rationale}
        onChange={(e) => setRationale(e.target.value)}
      />
      <button type="submit" className="secondary" disabled={save.busy || rationale.trim() === ''}>
        Save
      </button>
      {s && <span className="muted setting-now">now: {s.rationale}</span>}
      <ErrorNote message={save.error} />
    </form>
  );
}

/** How one group column answers a known-groups relation: which group should score higher. */
export function GroupForm({ row, view }: { row: GroupRow; view: View }) {
  const save = useMutation('validity.describeGroups');
  const s = row.setting;
  const levels = row.levels.map((l) => l.name);
  const [relationId, setRelationId] = useState<number | null>(s?.relationId ?? null);
  const [higher, setHigher] = useState(s?.higher ?? levels.at(-1) ?? '');
  const [lower, setLower] = useState(s?.lower ?? levels[0] ?? '');
  const [rationale, setRationale] = useState('');
  return (
    <form
      className="column-form"
      aria-label={`Group column ${row.column}`}
      onSubmit={async (e) => {
        e.preventDefault();
        const ok = await save.run({ column: row.column, relationId, higher, lower, rationale });
        if (ok !== undefined) setRationale('');
      }}
    >
      <strong className="item-code">{row.column}</strong>
      <select
        aria-label="Relation it answers"
        value={relationId ?? ''}
        onChange={(e) => setRelationId(e.target.value === '' ? null : Number(e.target.value))}
      >
        <option value="">no planned relation</option>
        {view.relations
          .filter((r) => r.kind === 'known-groups')
          .map((r) => (
            <option key={r.id} value={r.id}>
              {r.otherConstruct}
            </option>
          ))}
      </select>
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
      <input
        aria-label="Why"
        placeholder="Why these groups"
        value={rationale}
        onChange={(e) => setRationale(e.target.value)}
      />
      <button type="submit" className="secondary" disabled={save.busy || rationale.trim() === ''}>
        Save
      </button>
      {s && <span className="muted setting-now">now: {s.rationale}</span>}
      <ErrorNote message={save.error} />
    </form>
  );
}
