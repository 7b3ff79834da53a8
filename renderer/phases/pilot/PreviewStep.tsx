import type { DataFilePreview } from '../../../app/api/contracts/pilot.ts';
import type { ReadSettings } from '../../../app/api/contracts/pilot.ts';
import { formatBytes } from '../../shared/files.ts';
import { DECIMAL_MARK_NAME } from '../../../app/api/format.ts';

const ENCODINGS = ['utf-8', 'windows-1252', 'utf-16le', 'utf-16be'];
const DELIMITERS = [
  { value: ',', label: 'comma' },
  { value: ';', label: 'semicolon' },
  { value: 'tab', label: 'tab' },
  { value: '|', label: 'pipe' },
];

/** Step 2: the first rows as read, with what was detected and a way to read the file another way. */
export function PreviewStep(props: {
  preview: DataFilePreview;
  reading: ReadSettings;
  busy: boolean;
  onReread(next: ReadSettings): void;
}) {
  const { preview, reading } = props;
  const workbook = preview.kind === 'workbook';
  const set = (key: keyof ReadSettings, value: string) => {
    const next: ReadSettings = { ...reading };
    if (value === '') delete next[key];
    else (next as Record<string, string>)[key] = value;
    props.onReread(next);
  };
  const detected = (given: string | undefined) => (given === undefined ? ' (detected)' : ' (as you chose)');
  return (
    <div className="wizard-body" data-testid="import-preview">
      <p>
        <strong>{preview.fileName}</strong>, {formatBytes(preview.fileSize)}:{' '}
        {workbook ? (
          <>
            sheet <strong>{preview.sheet}</strong> of a workbook
          </>
        ) : (
          <>
            read as <strong data-testid="detected-encoding">{preview.encoding}</strong>, fields separated by{' '}
            <strong data-testid="detected-delimiter">{preview.delimiterName}</strong>
          </>
        )}
        , decimal mark{' '}
        <strong data-testid="detected-decimal">{DECIMAL_MARK_NAME[preview.decimalMark]}</strong>.
        {preview.truncated
          ? ` The first ${preview.rows.length} rows are shown; every row is read and checked in step 5.`
          : ` All ${preview.rows.length} rows are shown.`}
      </p>
      <div className="reading-row">
        {workbook ? (
          <label>
            Sheet
            <select value={reading.sheet ?? preview.sheet} onChange={(e) => set('sheet', e.target.value)}>
              {(preview.sheets ?? []).map((name) => (
                <option key={name} value={name}>
                  {name}
                </option>
              ))}
            </select>
          </label>
        ) : (
          <>
            <label>
              Encoding{detected(reading.encoding)}
              <select
                aria-label="Encoding"
                value={reading.encoding ?? ''}
                disabled={props.busy}
                onChange={(e) => set('encoding', e.target.value)}
              >
                <option value="">detect ({preview.encoding})</option>
                {ENCODINGS.map((e) => (
                  <option key={e} value={e}>
                    {e}
                  </option>
                ))}
              </select>
            </label>
            <label>
              Delimiter{detected(reading.delimiter)}
              <select
                aria-label="Delimiter"
                value={reading.delimiter ?? ''}
                disabled={props.busy}
                onChange={(e) => set('delimiter', e.target.value)}
              >
                <option value="">detect ({preview.delimiterName})</option>
                {DELIMITERS.map((d) => (
                  <option key={d.value} value={d.value}>
                    {d.label}
                  </option>
                ))}
              </select>
            </label>
          </>
        )}
        <label>
          Decimal mark{detected(reading.decimalMark)}
          <select
            aria-label="Decimal mark"
            value={reading.decimalMark ?? ''}
            disabled={props.busy}
            onChange={(e) => set('decimalMark', e.target.value)}
          >
            <option value="">detect ({DECIMAL_MARK_NAME[preview.decimalMark]})</option>
            <option value=".">point (2.5)</option>
            <option value=",">comma (2,5)</option>
          </select>
        </label>
      </div>
      {preview.warnings.length > 0 && (
        <ul className="warning-list" aria-label="Notes on reading the file">
          {preview.warnings.map((w) => (
            <li key={w}>{w}</li>
          ))}
        </ul>
      )}
      {preview.sameName.length > 0 && (
        <p className="hint">
          A file of this name was imported before as{' '}
          {preview.sameName.map((d) => `“${d.name}” (${d.role})`).join(', ')}. Step 5 says whether it is the
          very same file.
        </p>
      )}
      <div className="preview-scroll">
        <table className="data-table preview-table">
          <thead>
            <tr>
              <th className="num">Row</th>
              {preview.header.map((h) => (
                <th key={h}>{h}</th>
              ))}
            </tr>
          </thead>
          <tbody>
            {preview.rows.map((row, r) => (
              <tr key={preview.rowNumbers[r]}>
                <td className="num muted">{preview.rowNumbers[r]}</td>
                {preview.header.map((h, c) => (
                  <td key={h}>{row[c]}</td>
                ))}
              </tr>
            ))}
          </tbody>
        </table>
      </div>
      <p className="hint">
        Row numbers count the header as row 1, as a spreadsheet does; every message uses them.
      </p>
    </div>
  );
}
