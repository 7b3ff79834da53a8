import type { ColumnMapping, ColumnRole, RoleName } from '../../../app/api/contracts/pilot.ts';
import type { DataFilePreview } from '../../../app/api/contracts/pilot.ts';
import { plural } from '../../../app/api/format.ts';

const ROLE_OPTIONS: { value: RoleName; label: string }[] = [
  { value: 'item', label: 'Item' },
  { value: 'id', label: 'Respondent id' },
  { value: 'criterion', label: 'Criterion or other measure' },
  { value: 'group', label: 'Group variable' },
  { value: 'retestLink', label: 'Retest link id' },
  { value: 'duration', label: 'Duration' },
  { value: 'attention', label: 'Attention check' },
  { value: 'ignored', label: 'Ignored' },
];

/** Roles a dataset gives to one column only. */
const SINGLE: RoleName[] = ['id', 'retestLink', 'duration'];

/** Up to four different non-blank values of a column in the preview rows. */
function samples(preview: DataFilePreview, column: number): string[] {
  const seen: string[] = [];
  for (const row of preview.rows) {
    const cell = (row[column] ?? '').trim();
    if (cell !== '' && !seen.includes(cell)) seen.push(cell);
    if (seen.length === 4) break;
  }
  return seen;
}

/** An item of the pool, as the column step offers it for matching. */
export interface PoolItem {
  code: string;
  text: string;
  facetName: string | null;
  state: string;
}

function roleFor(value: RoleName, current: ColumnRole, column: string, pool: PoolItem[]): ColumnRole {
  switch (value) {
    case 'item': {
      if (current.role === 'item') return current;
      const byName = pool.find((it) => it.code.toLowerCase() === column.trim().toLowerCase());
      return { role: 'item', itemCode: byName?.code ?? '' };
    }
    case 'attention':
      return current.role === 'attention' ? current : { role: 'attention', correctAnswer: '' };
    default:
      return { role: value } as ColumnRole;
  }
}

/**
 * Step 3: every column with a few of its values and its role. Item columns were matched to the pool
 * by code; any role can be changed here, and an item column can answer any pool item.
 */
export function ColumnsStep(props: {
  preview: DataFilePreview;
  pool: PoolItem[];
  mapping: ColumnMapping;
  onChange(mapping: ColumnMapping): void;
}) {
  const { preview, pool, mapping } = props;
  const roleOf = (column: string): ColumnRole => mapping[column] ?? { role: 'ignored' };
  const set = (column: string, role: ColumnRole) => props.onChange({ ...mapping, [column]: role });
  const itemColumns = preview.header.filter((h) => roleOf(h).role === 'item');
  const mappedCodes = new Map<string, string[]>();
  for (const h of itemColumns) {
    const code = (roleOf(h) as { itemCode: string }).itemCode.toLowerCase();
    mappedCodes.set(code, [...(mappedCodes.get(code) ?? []), h]);
  }
  const active = pool.filter((it) => it.state !== 'retired');
  const withoutColumn = active.filter((it) => !mappedCodes.has(it.code.toLowerCase()));
  const taken = (role: RoleName) => preview.header.filter((h) => roleOf(h).role === role);
  const notes: string[] = [];
  for (const role of SINGLE) {
    const columns = taken(role);
    if (columns.length > 1) {
      notes.push(
        `${columns.map((c) => `'${c}'`).join(' and ')} are all mapped as ${ROLE_OPTIONS.find((o) => o.value === role)?.label.toLowerCase()}; only one column may have that role`,
      );
    }
  }
  for (const [code, columns] of mappedCodes) {
    if (code !== '' && columns.length > 1) {
      notes.push(`${columns.map((c) => `'${c}'`).join(' and ')} answer the same item ${code.toUpperCase()}`);
    }
  }
  for (const h of itemColumns) {
    if ((roleOf(h) as { itemCode: string }).itemCode === '')
      notes.push(`choose the item that column '${h}' answers`);
  }
  for (const h of taken('attention')) {
    if ((roleOf(h) as { correctAnswer: string }).correctAnswer.trim() === '') {
      notes.push(`give the correct answer of attention check '${h}'`);
    }
  }

  return (
    <div className="wizard-body" data-testid="import-columns">
      <p>
        {plural(itemColumns.length, 'column')} answer items of the pool
        {withoutColumn.length === 0 ? ', and every item of the pool has a column.' : '.'}{' '}
        {withoutColumn.length > 0 && (
          <span className="warn-text">
            No column answers {withoutColumn.map((it) => it.code).join(', ')} (the phase checklist asks for
            every item).
          </span>
        )}
      </p>
      <p className="hint">
        Columns whose header is an item code were matched to that item; a header that names a respondent id
        (“ID”, “Respondent ID”, “participant no.”…) or a response time (“duration_s”, “Duration (sec)”,
        “time_taken”…) was proposed for that role: check each proposal. Give the other columns their roles:
        the answers are stored as they are in the file, and reverse keys are applied from the item pool when
        scores are computed.
      </p>
      <div className="button-row">
        <button type="button" className="secondary" onClick={() => props.onChange(preview.proposal.mapping)}>
          Match by code again
        </button>
      </div>
      {notes.length > 0 && (
        <ul className="warning-list" aria-label="Mapping to fix">
          {notes.map((n) => (
            <li key={n}>{n}</li>
          ))}
        </ul>
      )}
      <div className="preview-scroll columns-scroll">
        <table className="data-table columns-table">
          <thead>
            <tr>
              <th>Column</th>
              <th>Values in the first rows</th>
              <th>Role</th>
              <th>Item or correct answer</th>
            </tr>
          </thead>
          <tbody>
            {preview.header.map((column, c) => {
              const role = roleOf(column);
              const proposed = preview.proposal.mapping[column];
              const automatic =
                role.role === 'item' &&
                proposed?.role === 'item' &&
                proposed.itemCode.toLowerCase() === role.itemCode.toLowerCase();
              return (
                <tr
                  key={column}
                  data-column={column}
                  className={role.role === 'ignored' ? 'ignored-row' : undefined}
                >
                  <td className="nowrap">
                    <strong>{column}</strong>
                  </td>
                  <td className="sample-values">{samples(preview, c).join(' · ')}</td>
                  <td>
                    <select
                      aria-label={`Role of column ${column}`}
                      value={role.role}
                      onChange={(e) => set(column, roleFor(e.target.value as RoleName, role, column, pool))}
                    >
                      {ROLE_OPTIONS.map((o) => (
                        <option key={o.value} value={o.value}>
                          {o.label}
                        </option>
                      ))}
                    </select>
                  </td>
                  <td>
                    {role.role === 'item' && (
                      <span className="item-choice">
                        <select
                          aria-label={`Item answered by column ${column}`}
                          value={
                            pool.find((it) => it.code.toLowerCase() === role.itemCode.toLowerCase())?.code ??
                            ''
                          }
                          onChange={(e) => set(column, { role: 'item', itemCode: e.target.value })}
                        >
                          <option value="">choose an item…</option>
                          {pool.map((it) => (
                            <option key={it.code} value={it.code}>
                              {it.code}
                              {it.state === 'retired' ? ' (retired)' : ''}: {it.text.slice(0, 60)}
                            </option>
                          ))}
                        </select>
                        {automatic && <span className="badge matched">matched by code</span>}
                      </span>
                    )}
                    {(role.role === 'id' || role.role === 'duration') &&
                      proposed?.role === role.role &&
                      preview.proposal.reasons[column] && (
                        <span className="badge matched" title={preview.proposal.reasons[column]}>
                          proposed: {preview.proposal.reasons[column]}
                        </span>
                      )}
                    {role.role === 'attention' && (
                      <input
                        aria-label={`Correct answer of attention check ${column}`}
                        placeholder="the answer an attentive respondent gives"
                        value={role.correctAnswer}
                        onChange={(e) => set(column, { role: 'attention', correctAnswer: e.target.value })}
                      />
                    )}
                  </td>
                </tr>
              );
            })}
          </tbody>
        </table>
      </div>
    </div>
  );
}
