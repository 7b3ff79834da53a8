import { useState } from 'react';
import type { ReadCheck } from '../../../app/api/contracts/pilot.ts';
import { ErrorNote } from '../../shared/components.tsx';
import { formatBytes } from '../../shared/files.ts';
import { DECIMAL_MARK_NAME, plural } from '../../../app/api/format.ts';

const ROLE_WORDS: Record<string, [string, string]> = {
  item: ['item', 'items'],
  id: ['respondent id', 'respondent ids'],
  criterion: ['criterion', 'criteria'],
  group: ['group variable', 'group variables'],
  retestLink: ['retest link', 'retest links'],
  duration: ['duration', 'durations'],
  attention: ['attention check', 'attention checks'],
  ignored: ['ignored column', 'ignored columns'],
};

function columnSummary(check: ReadCheck): string {
  const counts = new Map<string, number>();
  for (const c of check.columns) counts.set(c.role, (counts.get(c.role) ?? 0) + 1);
  return Object.keys(ROLE_WORDS)
    .filter((role) => counts.has(role))
    .map((role) => {
      const n = counts.get(role) ?? 0;
      return `${n} ${ROLE_WORDS[role][n === 1 ? 0 : 1]}`;
    })
    .join(', ');
}

/** Whether the new dataset becomes the current one of its role, and why. */
export interface CurrentChoice {
  makeCurrent: boolean;
  reason?: string;
}

/**
 * The question an import asks before storing: does the new file become the data analyses use? The
 * safe answer is preselected (keep the current dataset when there is one) and the effect of each
 * answer is spelled out; replacing the current dataset needs a reason for the log.
 */
function CurrentQuestion(props: {
  check: ReadCheck;
  value: CurrentChoice;
  onChange(value: CurrentChoice): void;
}) {
  const c = props.check.currentChoice;
  const label = `${props.check.role} data`;
  return (
    <fieldset className="current-question" data-testid="current-question">
      <legend>Which {label} do the analyses use?</legend>
      <label>
        <input
          type="radio"
          name="current-choice"
          checked={!props.value.makeCurrent}
          onChange={() => props.onChange({ makeCurrent: false })}
        />{' '}
        {c.current ? `Keep “${c.current.name}” current` : 'Store it without making it current'}
        <span className="hint"> — {c.ifKept}.</span>
      </label>
      <label>
        <input
          type="radio"
          name="current-choice"
          checked={props.value.makeCurrent}
          onChange={() => props.onChange({ makeCurrent: true, reason: props.value.reason })}
        />{' '}
        Make the new file the current {label}
        <span className="hint"> — {c.ifMadeCurrent}.</span>
      </label>
      {props.value.makeCurrent && c.current && (
        <div className="field">
          <label htmlFor="current-reason">
            Why does it replace “{c.current.name}”? (goes into the decision log)
          </label>
          <input
            id="current-reason"
            value={props.value.reason ?? ''}
            maxLength={10_000}
            onChange={(e) => props.onChange({ makeCurrent: true, reason: e.target.value })}
          />
        </div>
      )}
    </fieldset>
  );
}

/**
 * Steps 5 and 6: what the whole file gave (respondents, columns, missing cells, every problem by row
 * and column, notes), then the confirmation that stores it. A file with problems is stored only when
 * the researcher says the values may be kept as they are.
 */
export function CheckStep(props: {
  check: ReadCheck;
  stage: 'check' | 'confirm';
  busy: boolean;
  error?: string;
  onBack(): void;
  onContinue(): void;
  onImport(name: string, acceptProblems: boolean, current: CurrentChoice): void;
}) {
  const { check } = props;
  const [name, setName] = useState(check.name);
  const [accept, setAccept] = useState(false);
  const [current, setCurrent] = useState<CurrentChoice>({
    makeCurrent: check.currentChoice.defaultMakeCurrent,
  });
  const reasonMissing =
    current.makeCurrent && check.currentChoice.current !== null && (current.reason ?? '').trim() === '';
  const items = check.columns.filter((c) => c.role === 'item');
  const missingCells = items.reduce((s, c) => s + (c.missing ?? 0), 0);
  const hasProblems = check.problemCount > 0;

  if (props.stage === 'confirm') {
    return (
      <div className="wizard-body" data-testid="import-confirm">
        <div className="field">
          <label htmlFor="dataset-name">Name of the dataset</label>
          <input id="dataset-name" value={name} maxLength={200} onChange={(e) => setName(e.target.value)} />
        </div>
        <p>
          Import <strong>{plural(check.respondents, 'respondent')}</strong> as {check.role} data. The study
          will keep the original file ({check.fileName}, {formatBytes(check.byteLength)}, SHA-256{' '}
          <code>{check.sha256.slice(0, 16)}…</code>), how it was read, the column roles, the missing-value
          codes, and the answers exactly as given; the import is logged under your name.
        </p>
        <CurrentQuestion check={check} value={current} onChange={setCurrent} />
        {hasProblems && (
          <label className="accept-problems">
            <input type="checkbox" checked={accept} onChange={(e) => setAccept(e.target.checked)} />I have
            read the {plural(check.problemCount, 'problem')} listed in step 5; import the values as they are
            (nothing is clipped or changed).
          </label>
        )}
        <div className="button-row">
          <button type="button" className="secondary" onClick={props.onBack}>
            Back to missing values
          </button>
          <button
            type="button"
            className="primary"
            disabled={props.busy || name.trim() === '' || (hasProblems && !accept) || reasonMissing}
            onClick={() => props.onImport(name.trim(), accept, current)}
          >
            Import {plural(check.respondents, 'respondent')}
          </button>
        </div>
        <ErrorNote message={props.error} />
      </div>
    );
  }

  return (
    <div className="wizard-body" data-testid="import-check">
      <p className="check-summary">
        <strong data-testid="check-respondents">{plural(check.respondents, 'respondent')}</strong> read from{' '}
        {plural(check.columns.length, 'column')}: {columnSummary(check)}.{' '}
        {check.kind === 'workbook'
          ? `Sheet “${check.sheet}”.`
          : `${check.encoding}, ${check.delimiterName}-separated, decimal ${DECIMAL_MARK_NAME[check.decimalMark]}.`}
      </p>
      <p>
        {plural(missingCells, 'item answer')} missing (blank
        {check.missingCodes.numeric.length + check.missingCodes.text.length > 0
          ? ` or ${[...check.missingCodes.numeric.map(String), ...check.missingCodes.text].join(', ')}`
          : ''}
        ). Answers checked against the declared scale {check.bounds.min} to {check.bounds.max}.
      </p>
      {check.poolItemsWithoutColumn.length > 0 && (
        <p className="warn-text">No column answers {check.poolItemsWithoutColumn.join(', ')}.</p>
      )}
      {check.repeatedIds > 0 && (
        <p className="hint">
          {plural(check.repeatedIds, 'row')} share an id with another row; screening will flag them for you to
          decide.
        </p>
      )}
      {check.alreadyImported.length > 0 && (
        <p className="warn-text">
          This very file (same SHA-256) is already in the study as{' '}
          {check.alreadyImported.map((d) => `“${d.name}” (${d.role})`).join(', ')}. Importing it again adds a
          second dataset.
        </p>
      )}
      {check.warnings.length > 0 && (
        <ul className="warning-list" aria-label="Notes on the file">
          {check.warnings.map((w) => (
            <li key={w}>{w}</li>
          ))}
        </ul>
      )}
      {hasProblems ? (
        <>
          <p className="problem-head" role="alert">
            {plural(check.problemCount, 'cell needs', 'cells need')} a look
            {check.problems.length < check.problemCount ? ` (the first ${check.problems.length} listed)` : ''}
            . Go back to declare a missing-value code, fix the file and choose it again, or import the values
            as they are.
          </p>
          <div className="preview-scroll problems-scroll">
            <table className="data-table problem-table" aria-label="Problems by row and column">
              <thead>
                <tr>
                  <th className="num">Row</th>
                  <th>Column</th>
                  <th>Problem</th>
                </tr>
              </thead>
              <tbody>
                {check.problems.map((p) => (
                  <tr key={`${p.row}:${p.column}`}>
                    <td className="num">{p.row}</td>
                    <td className="nowrap">{p.column}</td>
                    <td>{p.message.replace(/^row \d+, column '[^']*': /, '')}</td>
                  </tr>
                ))}
              </tbody>
            </table>
          </div>
        </>
      ) : (
        <p className="verify-ok" data-testid="no-problems">
          No problems: every answer is a number within {check.bounds.min} to {check.bounds.max} or a declared
          missing value.
        </p>
      )}
      <div className="button-row">
        <button type="button" className="secondary" onClick={props.onBack}>
          Back to missing values
        </button>
        <button type="button" className="primary" onClick={props.onContinue}>
          Next: confirm
        </button>
      </div>
    </div>
  );
}
