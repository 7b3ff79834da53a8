import { useState } from 'react';
import type { CommandInput, CommandOutput } from '../../../app/api/commands.ts';
import { call } from '../../api/client.ts';
import { ErrorNote, Panel } from '../../shared/components.tsx';
import { downloadBase64, formatBytes } from '../../shared/files.ts';
import { PhaseControls } from '../../shared/phase-controls.tsx';
import { useQuery } from '../../shared/use-command.ts';
import './appendix.css';

type Format = CommandInput<'export.appendix'>['format'];

const FORMATS: { format: Format; label: string; what: string }[] = [
  { format: 'pdf', label: 'PDF', what: 'for a supplement or a reviewer' },
  { format: 'docx', label: 'Word', what: 'to edit into a manuscript' },
  { format: 'html', label: 'HTML', what: 'one self-contained page' },
  { format: 'md', label: 'Markdown', what: 'for a repository or preregistration' },
];

/** The methods appendix: rendered from the study file on request, in four formats, and saved. */
export function AppendixScreen() {
  const overview = useQuery('study.overview', {});
  const phase = overview.data?.find((p) => p.id === 'appendix');
  const [busy, setBusy] = useState<Format | null>(null);
  const [error, setError] = useState<string | undefined>(undefined);
  const [last, setLast] = useState<CommandOutput<'export.appendix'> | null>(null);

  async function save(format: Format) {
    setBusy(format);
    setError(undefined);
    try {
      const file = await call('export.appendix', { format });
      downloadBase64(file.fileName, file.base64, file.mediaType);
      setLast(file);
    } catch (e) {
      setError((e as Error).message);
    } finally {
      setBusy(null);
    }
  }

  return (
    <div className="screen">
      <header className="screen-head">
        <div>
          <p className="eyebrow">Phase</p>
          <h1>Methods appendix</h1>
          <p className="muted">
            Rendered from the study file alone: every phase that is done, a plain note for each that is not,
            the references of every method used, and the file’s verification at the moment of export.
          </p>
        </div>
      </header>
      <Panel title="Export the appendix">
        <ul className="appendix-formats">
          {FORMATS.map((f) => (
            <li key={f.format}>
              <button
                type="button"
                onClick={() => save(f.format)}
                disabled={busy !== null}
                data-format={f.format}
              >
                {busy === f.format ? `Rendering ${f.label}…` : `Save as ${f.label}`}
              </button>{' '}
              <span className="muted">{f.what}</span>
            </li>
          ))}
        </ul>
        <ErrorNote message={error} />
        {last && (
          <p className={last.intact ? 'muted' : 'error'} role="status">
            Saved {last.fileName} ({formatBytes(last.size)}). Log head recorded in it:{' '}
            <code>{last.head ?? 'none'}</code>
            {last.intact
              ? '. The file verified at export.'
              : '. The file FAILED verification at export; the appendix lists the breaks.'}
          </p>
        )}
        <p className="muted">
          The appendix states the cautions on use: a new scale is not validated for diagnosis, hiring,
          admission or other high-stakes decisions.
        </p>
      </Panel>
      {phase && <PhaseControls phase={phase} />}
    </div>
  );
}
