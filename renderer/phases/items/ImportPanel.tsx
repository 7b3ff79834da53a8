import { useState } from 'react';
import type { CommandOutput } from '../../../app/api/commands.ts';
import type { ItemSource } from '../../../app/api/contracts/items.ts';
import { call } from '../../api/client.ts';
import { ErrorNote, Panel } from '../../shared/components.tsx';
import { useMutation } from '../../shared/use-command.ts';
import { formatBytes, readFileBase64 } from '../../shared/files.ts';
import { SOURCE_OPTIONS } from './ItemRow.tsx';
import { FileNotes } from '../../shared/file-notes.tsx';

type Preview = CommandOutput<'items.previewImport'>;

/**
 * Bulk import of an item pool from CSV: choose a file, read the preview (every row, every problem
 * by row and column), then confirm. Nothing is written until the import button is pressed.
 */
export function ImportPanel({ maxBytes, onClose }: { maxBytes: number; onClose(): void }) {
  const [file, setFile] = useState<{ name: string; content: string } | undefined>();
  const [preview, setPreview] = useState<Preview | undefined>();
  const [readError, setReadError] = useState<string | undefined>();
  const [sourceType, setSourceType] = useState<ItemSource>('own-drafting');
  const [sourceNote, setSourceNote] = useState('');
  const importItems = useMutation('items.import');

  async function choose(chosen: File | undefined) {
    setPreview(undefined);
    setFile(undefined);
    setReadError(undefined);
    if (!chosen) return;
    if (chosen.size > maxBytes) {
      setReadError(
        `${chosen.name} is ${formatBytes(chosen.size)}; an item-pool file may be at most ${formatBytes(maxBytes)}`,
      );
      return;
    }
    try {
      const content = await readFileBase64(chosen);
      setFile({ name: chosen.name, content });
      setPreview(await call('items.previewImport', { fileName: chosen.name, content }));
    } catch (e) {
      setReadError((e as Error).message);
    }
  }

  const blocked = !preview || preview.problems.length > 0 || preview.rows.length === 0;
  return (
    <Panel
      title="Import items from a CSV file"
      aside={
        <button type="button" className="link" onClick={onClose}>
          Close
        </button>
      }
    >
      <p className="muted">
        Columns <code>code</code>, <code>text</code>, <code>facet</code> (a facet name) and{' '}
        <code>keying</code> (forward or reverse); optionally <code>source</code> and <code>source_note</code>.
        Items arrive as drafts. Nothing is written until you press Import.
      </p>
      <div className="import-choose">
        <input
          type="file"
          accept=".csv,.tsv,.txt,text/csv"
          aria-label="Item pool file"
          onChange={(e) => void choose(e.target.files?.[0])}
        />
        <select
          aria-label="Source of the imported items"
          value={sourceType}
          onChange={(e) => setSourceType(e.target.value as ItemSource)}
        >
          {SOURCE_OPTIONS.map((o) => (
            <option key={o.value} value={o.value}>
              {o.label}
            </option>
          ))}
        </select>
        <input
          aria-label="Where the imported items came from"
          placeholder="Where these items came from (for rows without a source)"
          value={sourceNote}
          onChange={(e) => setSourceNote(e.target.value)}
        />
      </div>
      <ErrorNote message={readError} />
      {preview && (
        <div className="import-preview" data-testid="item-import-preview">
          <p>
            <strong>{preview.fileName}</strong>: {preview.rowCount} row{preview.rowCount === 1 ? '' : 's'}{' '}
            read
            {preview.delimiter && `, ${preview.delimiter}-separated`}.{' '}
            {preview.problems.length === 0
              ? `${preview.rows.length} item${preview.rows.length === 1 ? '' : 's'} ready to import.`
              : `${preview.problems.length} problem${preview.problems.length === 1 ? '' : 's'} to fix first; nothing will be imported.`}
          </p>
          <FileNotes problems={preview.problems} warnings={preview.warnings} />
          {preview.rows.length > 0 && (
            <div className="preview-scroll">
              <table className="data-table">
                <thead>
                  <tr>
                    <th className="num">Row</th>
                    <th>Code</th>
                    <th>Wording</th>
                    <th>Facet</th>
                    <th>Keying</th>
                    <th>Wording flags</th>
                  </tr>
                </thead>
                <tbody>
                  {preview.rows.map((r) => (
                    <tr key={r.row}>
                      <td className="num">{r.row}</td>
                      <td className="nowrap">{r.code}</td>
                      <td>{r.text}</td>
                      <td>{r.facetName ?? <span className="muted">none yet</span>}</td>
                      <td>{r.keying}</td>
                      <td>{r.wordingFlags.join(', ').replaceAll('-', ' ')}</td>
                    </tr>
                  ))}
                </tbody>
              </table>
            </div>
          )}
          <div className="button-row">
            <button
              type="button"
              className="primary"
              disabled={blocked || importItems.busy || !file}
              onClick={async () => {
                if (!file) return;
                const done = await importItems.run({
                  fileName: file.name,
                  content: file.content,
                  sourceType,
                  sourceNote,
                });
                if (done !== undefined) onClose();
              }}
            >
              Import {preview.rows.length} item{preview.rows.length === 1 ? '' : 's'}
            </button>
            <button type="button" className="link" onClick={onClose}>
              Cancel
            </button>
          </div>
          <ErrorNote message={importItems.error} />
        </div>
      )}
    </Panel>
  );
}
