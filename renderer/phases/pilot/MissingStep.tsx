import { useState } from 'react';
import type { DataFilePreview } from '../../../app/api/contracts/pilot.ts';

export interface MissingDraft {
  text: string[];
  numeric: number[];
}

const NUMBER = /^[+-]?(\d+(\.\d*)?|\.\d+)$/;

/**
 * Step 4: the dataset's missing-value codes (blank cells always count as missing) and the declared
 * bounds of the response format that every item answer is checked against.
 */
export function MissingStep(props: {
  preview: DataFilePreview;
  missing: MissingDraft;
  bounds: { min: number; max: number };
  anchors: string[];
  onChange(missing: MissingDraft): void;
}) {
  const { missing, bounds } = props;
  const [draft, setDraft] = useState('');
  const has = (code: string) =>
    NUMBER.test(code)
      ? missing.numeric.includes(Number(code))
      : missing.text.some((t) => t.toLowerCase() === code.toLowerCase());
  const add = (raw: string) => {
    const code = raw.trim();
    if (code === '' || has(code)) return;
    if (NUMBER.test(code)) props.onChange({ ...missing, numeric: [...missing.numeric, Number(code)] });
    else props.onChange({ ...missing, text: [...missing.text, code] });
  };
  const remove = (code: string | number) =>
    props.onChange(
      typeof code === 'number'
        ? { ...missing, numeric: missing.numeric.filter((n) => n !== code) }
        : { ...missing, text: missing.text.filter((t) => t !== code) },
    );
  const suggestions = props.preview.suggestedMissing.filter((s) => !has(s.code));
  return (
    <div className="wizard-body" data-testid="import-missing">
      <h3 className="step-title">Missing-value codes of this file</h3>
      <p className="hint">
        Blank cells are always missing. Add the codes this file uses for “no answer”: text such as NA, or
        numbers such as -9 or 99. A numeric code matches however it is written (-9 and -9.0).
      </p>
      <ul className="code-chips" aria-label="Missing-value codes">
        <li className="chip fixed">blank</li>
        {missing.numeric.map((n) => (
          <li key={`n${n}`} className="chip">
            {n}
            <button
              type="button"
              className="chip-remove"
              aria-label={`Remove missing code ${n}`}
              onClick={() => remove(n)}
            >
              ×
            </button>
          </li>
        ))}
        {missing.text.map((t) => (
          <li key={`t${t}`} className="chip">
            {t}
            <button
              type="button"
              className="chip-remove"
              aria-label={`Remove missing code ${t}`}
              onClick={() => remove(t)}
            >
              ×
            </button>
          </li>
        ))}
      </ul>
      <form
        className="add-code"
        onSubmit={(e) => {
          e.preventDefault();
          add(draft);
          setDraft('');
        }}
      >
        <input
          aria-label="New missing-value code"
          placeholder="e.g. -9, 99 or NA"
          value={draft}
          onChange={(e) => setDraft(e.target.value)}
        />
        <button type="submit" className="secondary" disabled={draft.trim() === ''}>
          Add code
        </button>
      </form>
      {suggestions.length > 0 && (
        <div className="suggestions">
          <p>
            In the first rows, the item columns also hold these values, which are outside the response format
            or not numbers:
          </p>
          <ul>
            {suggestions.map((s) => (
              <li key={s.code}>
                <code>{s.code}</code> in {s.cells} cell{s.cells === 1 ? '' : 's'}{' '}
                <button type="button" className="link" onClick={() => add(s.code)}>
                  Treat {s.code} as missing
                </button>
              </li>
            ))}
          </ul>
          <p className="hint">
            Leave a value out if it is a real answer entered wrongly: step 5 then lists each cell.
          </p>
        </div>
      )}
      <h3 className="step-title">Declared bounds</h3>
      <p>
        Item answers must lie from <strong>{bounds.min}</strong> to <strong>{bounds.max}</strong>, the
        response format of the Construct phase
        {props.anchors.length > 0 && props.anchors[0] && (
          <>
            {' '}
            ({bounds.min} = “{props.anchors[0]}”, {bounds.max} = “{props.anchors.at(-1)}”)
          </>
        )}
        . Answers outside are listed by row and column in the next step and kept as they are, never clipped.
      </p>
    </div>
  );
}
