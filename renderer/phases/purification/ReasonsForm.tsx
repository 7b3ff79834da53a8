import { type ReactNode, useState } from 'react';
import type { RoundItemRow } from '../../../app/api/contracts/purification.ts';
import { ErrorNote, Panel } from '../../shared/components.tsx';

/** The two reasons a purification decision asks for: the construct's domain, and the statistics. */
export function useReasons() {
  const [domain, setDomain] = useState('');
  const [statistical, setStatistical] = useState('');
  return {
    domain,
    statistical,
    setDomain,
    setStatistical,
    clear() {
      setDomain('');
      setStatistical('');
    },
  };
}

export type Reasons = ReturnType<typeof useReasons>;

/** A reason's text area: the id its label points at, and the question the label asks. */
export interface ReasonField {
  id: string;
  label: string;
}

/**
 * A decision on several items at once, in its own panel: what varies (the items, the action, its
 * settings) comes as children, then the two reasons, the button that records it, what was done,
 * and why it was refused.
 */
export function ReasonsForm(props: {
  title: string;
  className: string;
  reasons: Reasons;
  domainField: ReasonField;
  statisticalField: ReasonField;
  submitLabel: string;
  disabled: boolean;
  onSubmit(): Promise<void>;
  done?: string;
  error?: string;
  children: ReactNode;
}) {
  const { reasons } = props;
  return (
    <Panel title={props.title}>
      <form
        className={props.className}
        onSubmit={(e) => {
          e.preventDefault();
          void props.onSubmit();
        }}
      >
        {props.children}
        {[
          { field: props.domainField, value: reasons.domain, set: reasons.setDomain },
          { field: props.statisticalField, value: reasons.statistical, set: reasons.setStatistical },
        ].map(({ field, value, set }) => (
          <div className="field" key={field.id}>
            <label htmlFor={field.id}>{field.label}</label>
            <textarea id={field.id} rows={2} value={value} onChange={(e) => set(e.target.value)} />
          </div>
        ))}
        <button type="submit" className="primary" disabled={props.disabled}>
          {props.submitLabel}
        </button>
        {props.done && <p className="done-note">{props.done}</p>}
        <ErrorNote message={props.error} />
      </form>
    </Panel>
  );
}

/** Items to tick, each with its code and text, and what else the form says about it. */
export function ItemChecklist(props: {
  rows: RoundItemRow[];
  chosen: Set<string>;
  onChange(chosen: Set<string>): void;
  note?(row: RoundItemRow): ReactNode;
}) {
  return (
    <ul className="batch-items">
      {props.rows.map((row) => (
        <li key={row.code}>
          <label>
            <input
              type="checkbox"
              checked={props.chosen.has(row.code)}
              onChange={(e) => {
                const next = new Set(props.chosen);
                if (e.target.checked) next.add(row.code);
                else next.delete(row.code);
                props.onChange(next);
              }}
            />{' '}
            <strong>{row.code}</strong> {row.text}
            {props.note && <> {props.note(row)}</>}
          </label>
        </li>
      ))}
    </ul>
  );
}
