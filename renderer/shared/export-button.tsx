import { useState } from 'react';
import type { CommandInput } from '../../app/api/commands.ts';
import { call } from '../api/client.ts';
import { ErrorNote } from './components.tsx';
import { downloadText } from './files.ts';

/** Downloads one result table as CSV (headed by the study, what it is, and the log head). */
export function ExportButton(props: { request: CommandInput<'export.table'>; label?: string }) {
  const [error, setError] = useState<string | undefined>(undefined);
  return (
    <span className="export-button">
      <button
        type="button"
        className="link"
        onClick={async () => {
          setError(undefined);
          try {
            const file = await call('export.table', props.request);
            downloadText(file.fileName, file.text);
          } catch (e) {
            setError((e as Error).message);
          }
        }}
      >
        {props.label ?? 'Export CSV'}
      </button>
      <ErrorNote message={error} />
    </span>
  );
}
