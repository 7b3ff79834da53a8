import { Fragment } from 'react';
import type {
  FacetResult,
  FlagRule,
  RoundItemRow,
  RuleOfThumb,
} from '../../../app/api/contracts/purification.ts';
import { STAT_LABELS, bounded, percent, unbounded } from '../../../app/api/format.ts';
import { sourceNotes } from '../../../app/api/source-notes.ts';
import { SourceNotes } from '../../shared/source-notes.tsx';
import { historyLink } from '../../shared/history-links.ts';

type SortKey =
  | 'order'
  | 'code'
  | 'facet'
  | 'mean'
  | 'sd'
  | 'skewness'
  | 'kurtosis'
  | 'floorCeiling'
  | 'missing'
  | 'r'
  | 'ifDeleted'
  | 'flags';

interface Column {
  key: SortKey;
  label: string;
  title: string;
  numeric?: boolean;
}

const FACET_COLUMN: Column = {
  key: 'facet',
  label: 'Facet',
  title: 'The facet the item belongs to in this round',
};

/** The item table's columns; numeric headers take their labels from the one table of statistic labels. */
export const COLUMNS: Column[] = [
  {
    key: 'code',
    label: 'Item and wording',
    title: 'Item code and wording; R marks a reverse-keyed item (scored min + max − x)',
  },
  { key: 'mean', label: STAT_LABELS.mean, title: 'Mean of the scored answers', numeric: true },
  { key: 'sd', label: STAT_LABELS.sd, title: 'Standard deviation (divisor n − 1)', numeric: true },
  {
    key: 'skewness',
    label: STAT_LABELS.skewness,
    title: 'Skewness (adjusted Fisher–Pearson G1)',
    numeric: true,
  },
  { key: 'kurtosis', label: STAT_LABELS.kurtosis, title: 'Excess kurtosis (G2)', numeric: true },
  {
    key: 'floorCeiling',
    label: `${STAT_LABELS.floor} / ${STAT_LABELS.ceiling}`,
    title: 'Shares of answers at the lowest and at the highest category',
    numeric: true,
  },
  {
    key: 'missing',
    label: STAT_LABELS.missing,
    title: 'Respondents who left the item unanswered',
    numeric: true,
  },
  {
    key: 'r',
    label: STAT_LABELS.correctedItemTotal,
    title: 'Corrected item-total correlation: r with the sum of the other items',
    numeric: true,
  },
  {
    key: 'ifDeleted',
    label: STAT_LABELS.alphaIfDeleted,
    title: 'Alpha of the other items if this one were dropped',
    numeric: true,
  },
  {
    key: 'flags',
    label: 'Flags',
    title:
      'The decision in force (out, kept, moved, back), then the rules of thumb the item meets (legend below)',
  },
];

function sortValue(row: RoundItemRow, key: SortKey, index: number): number | string {
  const s = row.stats;
  switch (key) {
    case 'order':
      return index;
    case 'code':
      return row.code;
    case 'facet':
      return row.facetName ?? '';
    case 'mean':
      return s.mean;
    case 'sd':
      return s.sd;
    case 'skewness':
      return s.skewness ?? Number.NEGATIVE_INFINITY;
    case 'kurtosis':
      return s.kurtosis ?? Number.NEGATIVE_INFINITY;
    case 'floorCeiling':
      return Math.max(s.floorShare ?? 0, s.ceilingShare ?? 0);
    case 'missing':
      return s.missing;
    case 'r':
      return s.correctedItemTotal ?? Number.NEGATIVE_INFINITY;
    case 'ifDeleted':
      return s.alphaIfDeleted ?? Number.NEGATIVE_INFINITY;
    case 'flags':
      return row.flags.length;
  }
}

/** How the item table is sorted and whether rows are grouped by facet. */
export interface TableView {
  sort: { key: SortKey; descending: boolean };
  grouped: boolean;
}

export const INITIAL_TABLE_VIEW: TableView = { sort: { key: 'order', descending: false }, grouped: true };

const DECISION_WORD = { drop: 'out', keep: 'kept', move: 'moved', restore: 'back' } as const;

/**
 * The round's items: descriptives, corrected item-total, alpha if deleted and flags, grouped by
 * facet (or in one list), sortable by any column (click a header; click again to reverse).
 * Clicking a row opens its decision panel.
 */
export function ItemTable(props: {
  rows: RoundItemRow[];
  facets: FacetResult[];
  rules: readonly RuleOfThumb[];
  selected: string | undefined;
  onSelect(code: string): void;
  /** How the table is sorted and grouped; kept by the screen so it survives a change of round. */
  view: TableView;
  onView(view: TableView): void;
}) {
  const { sort, grouped } = props.view;
  const setSort = (next: TableView['sort'] | ((now: TableView['sort']) => TableView['sort'])) =>
    props.onView({ grouped, sort: typeof next === 'function' ? next(sort) : next });
  const setGrouped = (next: boolean) => props.onView({ sort, grouped: next });
  const statement = new Map(props.rules.map((r) => [r.rule, r]));
  const sources = props.rules.flatMap((r) => (r.source ? [r.source] : []));
  const markers = new Map(sourceNotes(sources).rules.map((r) => [r.id, r.marker]));
  const ordered = props.rows
    .map((row, index) => ({ row, index }))
    .sort((a, b) => {
      const x = sortValue(a.row, sort.key, a.index);
      const y = sortValue(b.row, sort.key, b.index);
      const order = typeof x === 'string' ? x.localeCompare(String(y)) : x - (y as number);
      return (sort.descending ? -order : order) || a.index - b.index;
    });
  const columns = grouped ? COLUMNS : [COLUMNS[0], FACET_COLUMN, ...COLUMNS.slice(1)];
  const groups: { key: string; title: string | null; facet?: FacetResult; rows: typeof ordered }[] = grouped
    ? [
        ...props.facets.map((facet) => ({
          key: `facet-${facet.facetId}`,
          title: facet.name,
          facet,
          rows: ordered.filter(({ row }) => row.facetId === facet.facetId),
        })),
        {
          key: 'no-facet',
          title: 'No facet',
          rows: ordered.filter(({ row }) => !props.facets.some((f) => f.facetId === row.facetId)),
        },
      ].filter((g) => g.rows.length > 0)
    : [{ key: 'all', title: null, rows: ordered }];

  function toggle(key: SortKey) {
    setSort((s) =>
      s.key === key ? { key, descending: !s.descending } : { key, descending: key === 'flags' },
    );
  }

  return (
    <div className="item-table-wrap">
      <div className="table-options">
        <label className="check">
          <input type="checkbox" checked={grouped} onChange={(e) => setGrouped(e.target.checked)} />
          Group by facet
        </label>
        {sort.key !== 'order' && (
          <button type="button" className="link" onClick={() => setSort({ key: 'order', descending: false })}>
            Pool order
          </button>
        )}
      </div>
      <table className="data-table item-table">
        <thead>
          <tr>
            {columns.map((c) => (
              <th
                key={c.key}
                className={c.numeric ? 'num' : undefined}
                aria-sort={sort.key === c.key ? (sort.descending ? 'descending' : 'ascending') : 'none'}
              >
                <button type="button" className="sort" title={c.title} onClick={() => toggle(c.key)}>
                  {c.label}
                  <span className="sort-mark" aria-hidden="true">
                    {sort.key === c.key ? (sort.descending ? '▼' : '▲') : ''}
                  </span>
                </button>
              </th>
            ))}
          </tr>
        </thead>
        <tbody>
          {groups.map((group) => (
            <Fragment key={group.key}>
              {group.title !== null && (
                <tr className="group-row">
                  <th colSpan={columns.length} scope="rowgroup" title={group.facet?.definition}>
                    {group.title}
                    <span className="muted">
                      {' '}
                      · {group.rows.length} item{group.rows.length === 1 ? '' : 's'}
                      {group.facet?.analysis ? ` · facet α ${bounded(group.facet.analysis.alpha.value)}` : ''}
                    </span>
                  </th>
                </tr>
              )}
              {group.rows.map(({ row }) => (
                <ItemRow
                  key={row.code}
                  row={row}
                  showFacet={!grouped}
                  selected={props.selected === row.code}
                  onSelect={props.onSelect}
                  statement={statement}
                />
              ))}
            </Fragment>
          ))}
        </tbody>
      </table>
      <dl className="rule-legend" aria-label="Rules of thumb behind the flags">
        {props.rules.map((r) => (
          <div key={r.rule}>
            <dt>
              <span className={`flag flag-${r.rule}`}>{r.label}</span>
            </dt>
            <dd>
              {r.statement}
              {r.source && <sup>{markers.get(r.source)}</sup>}
            </dd>
          </div>
        ))}
      </dl>
      <SourceNotes ids={sources} withRules={false} />
    </div>
  );
}

function ItemRow(props: {
  row: RoundItemRow;
  showFacet: boolean;
  selected: boolean;
  onSelect(code: string): void;
  statement: Map<FlagRule, RuleOfThumb>;
}) {
  const { row, statement } = props;
  const s = row.stats;
  const hit = new Set(row.flags.map((f) => f.rule));
  const last = row.decisions.at(-1);
  const mark = (...rules: FlagRule[]) => (rules.some((r) => hit.has(r)) ? 'num hit' : 'num');
  return (
    <tr
      className={`${props.selected ? 'selected' : ''} ${row.droppedNow ? 'dropped' : ''}`}
      onClick={() => props.onSelect(row.code)}
    >
      <td>
        <span className="code-cell">
          <button
            type="button"
            className="item-code"
            title={row.text}
            aria-label={`Item ${row.code}`}
            onClick={(e) => {
              e.stopPropagation();
              props.onSelect(row.code);
            }}
          >
            {row.code}
          </button>
          {row.keying === 'reverse' && (
            <span className="keying" title="Reverse-keyed: scored min + max − x">
              R
            </span>
          )}
        </span>
        <span className="item-wording">{row.text}</span>
        <a
          className="life-story-link"
          href={historyLink.item(row.code)}
          onClick={(e) => e.stopPropagation()}
          aria-label={`Life story of item ${row.code}`}
        >
          Life story
        </a>
      </td>
      {props.showFacet && (
        <td className="facet-cell" title={row.facetDefinition}>
          {row.facetName ?? 'no facet'}
        </td>
      )}
      <td className="num">{unbounded(s.mean)}</td>
      <td className="num">{unbounded(s.sd)}</td>
      <td className={mark('skewness')}>{unbounded(s.skewness)}</td>
      <td className={mark('kurtosis')}>{unbounded(s.kurtosis)}</td>
      <td className="num nowrap">
        <span className={hit.has('floor') ? 'hit' : undefined}>{percent(s.floorShare, 0)}</span>
        {' / '}
        <span className={hit.has('ceiling') ? 'hit' : undefined}>{percent(s.ceilingShare, 0)}</span>
      </td>
      <td className={mark('missing')}>{s.missing}</td>
      <td className={mark('low-item-total', 'negative-item-total', 'no-variance')}>
        {bounded(s.correctedItemTotal, 2)}
      </td>
      <td className={mark('alpha-rises')}>{bounded(s.alphaIfDeleted)}</td>
      <td>
        <span className="flags">
          {row.droppedNow ? (
            <span className="decision-tag tag-drop" title="Dropped: not in the next round">
              out
            </span>
          ) : last ? (
            <span className={`decision-tag tag-${last.action}`}>{DECISION_WORD[last.action]}</span>
          ) : null}
          {row.flags.map((f) => (
            <span
              key={f.rule}
              className={`flag flag-${f.rule}`}
              title={`${f.text}. ${statement.get(f.rule)?.statement ?? ''}`}
            >
              {statement.get(f.rule)?.label ?? f.rule}
            </span>
          ))}
        </span>
      </td>
    </tr>
  );
}
