import { useCallback, useRef, useState } from 'react';
import type { ReadCheck } from '../../../app/api/contracts/pilot.ts';
import type { ColumnMapping } from '../../../app/api/contracts/pilot.ts';
import type { DataFilePreview } from '../../../app/api/contracts/pilot.ts';
import type { ReadSettings } from '../../../app/api/contracts/pilot.ts';
import type { TaskStatus } from '../../../app/api/contracts/tasks.ts';
import type { DatasetRole } from '../../../app/api/contracts/pilot.ts';
import { call } from '../../api/client.ts';
import { ErrorNote, Panel } from '../../shared/components.tsx';
import { TaskProgress } from '../../shared/task-progress.tsx';
import { useMutation } from '../../shared/use-command.ts';
import { CheckStep, type CurrentChoice } from './CheckStep.tsx';
import { ColumnsStep, type PoolItem } from './ColumnsStep.tsx';
import { formatBytes, readFileBase64 } from '../../shared/files.ts';
import { type MissingDraft, MissingStep } from './MissingStep.tsx';
import { PreviewStep } from './PreviewStep.tsx';

const STEPS = [
  { id: 'choose', label: 'File' },
  { id: 'preview', label: 'Preview' },
  { id: 'columns', label: 'Columns' },
  { id: 'missing', label: 'Missing values' },
  { id: 'check', label: 'Check' },
  { id: 'confirm', label: 'Confirm' },
] as const;

type StepId = (typeof STEPS)[number]['id'];

/** Mapping entries carried over to a new preview: the researcher's choices for columns still there. */
function carryOver(
  proposal: ColumnMapping,
  earlier: ColumnMapping | undefined,
  header: string[],
): ColumnMapping {
  if (!earlier) return proposal;
  const out: ColumnMapping = {};
  for (const column of header) out[column] = earlier[column] ?? proposal[column] ?? { role: 'ignored' };
  return out;
}

/**
 * The import wizard: choose a file, check how it was read, give each column its role, declare the
 * missing-value codes, read the whole file in a worker (progress bar and Cancel), review every
 * problem by row and column, and only then store it. Until the last step nothing is written to the
 * study; Close at any step forgets the file.
 */
export function ImportWizard(props: {
  pool: PoolItem[];
  roles: { role: DatasetRole; label: string }[];
  bounds: { min: number; max: number };
  anchors: string[];
  maxUploadBytes: number;
  onClose(): void;
  onImported(datasetId: number): void;
}) {
  const [step, setStep] = useState<StepId>('choose');
  const [role, setRole] = useState<DatasetRole>('pilot');
  const [file, setFile] = useState<{ name: string; size: number } | undefined>();
  const [stageId, setStageId] = useState<string | undefined>();
  const [preview, setPreview] = useState<DataFilePreview | undefined>();
  const [reading, setReading] = useState<ReadSettings>({});
  const [mapping, setMapping] = useState<ColumnMapping>({});
  const [missing, setMissing] = useState<MissingDraft>({ text: [], numeric: [] });
  const [taskId, setTaskId] = useState<string | undefined>();
  const [check, setCheck] = useState<ReadCheck | undefined>();
  const [error, setError] = useState<string | undefined>();
  const [busy, setBusy] = useState(false);
  const collecting = useRef<string | undefined>(undefined);
  const confirm = useMutation('pilot.confirmImport');
  const { onImported } = props;

  async function choose(chosen: File | undefined) {
    setError(undefined);
    setPreview(undefined);
    setCheck(undefined);
    if (!chosen) return;
    if (chosen.size > props.maxUploadBytes) {
      setError(
        `${chosen.name} is ${formatBytes(chosen.size)}; the import screen takes files up to ${formatBytes(props.maxUploadBytes)} (use the command line, project import, for larger files)`,
      );
      return;
    }
    setBusy(true);
    try {
      const content = await readFileBase64(chosen);
      const staged = await call('pilot.stage', { fileName: chosen.name, content });
      setFile({ name: chosen.name, size: chosen.size });
      setStageId(staged.stageId);
      setPreview(staged.preview);
      setReading({});
      setMapping(staged.preview.proposal.mapping);
      setMissing({ text: [], numeric: [] });
      setStep('preview');
    } catch (e) {
      setError((e as Error).message);
    } finally {
      setBusy(false);
    }
  }

  async function reread(next: ReadSettings) {
    if (!stageId) return;
    setError(undefined);
    setBusy(true);
    try {
      const fresh = await call('pilot.preview', { stageId, reading: next });
      setReading(next);
      setPreview(fresh);
      setMapping((earlier) =>
        carryOver(
          fresh.proposal.mapping,
          fresh.header.join('\u0000') === preview?.header.join('\u0000') ? earlier : undefined,
          fresh.header,
        ),
      );
    } catch (e) {
      setError((e as Error).message);
    } finally {
      setBusy(false);
    }
  }

  async function startRead() {
    if (!stageId || !preview) return;
    setError(undefined);
    setCheck(undefined);
    try {
      const started = await call('pilot.startRead', {
        stageId,
        role,
        mapping,
        missingCodes: missing,
        // The decimal mark shown in the preview (detected or chosen) is the one the whole file is read with.
        reading: { ...reading, decimalMark: reading.decimalMark ?? preview.decimalMark },
      });
      setTaskId(started.taskId);
      setStep('check');
    } catch (e) {
      setError((e as Error).message);
    }
  }

  const finished = useCallback(
    async (_status: TaskStatus) => {
      if (!taskId || collecting.current === taskId) return;
      collecting.current = taskId;
      try {
        setCheck(await call('pilot.collectRead', { taskId }));
      } catch (e) {
        setError((e as Error).message);
        setStep('missing');
      } finally {
        setTaskId(undefined);
      }
    },
    [taskId],
  );

  async function close() {
    await call('pilot.discard', {}).catch(() => undefined);
    props.onClose();
  }

  async function store(name: string, acceptProblems: boolean, current: CurrentChoice) {
    if (!check) return;
    const done = await confirm.run({ readId: check.readId, name, acceptProblems, current });
    if (done) onImported(done.datasetId);
  }

  const at = STEPS.findIndex((s) => s.id === step);
  const reachable = (id: StepId) => {
    if (id === 'choose') return true;
    if (!preview) return false;
    if (id === 'confirm') return check !== undefined;
    if (id === 'check') return check !== undefined || taskId !== undefined;
    return true;
  };

  return (
    <Panel
      title="Import a data file"
      aside={
        <button type="button" className="link" onClick={close}>
          Close without importing
        </button>
      }
    >
      <ol className="wizard-steps" aria-label="Import steps">
        {STEPS.map((s, i) => (
          <li
            key={s.id}
            className={i === at ? 'current' : i < at ? 'done' : ''}
            aria-current={i === at ? 'step' : undefined}
          >
            <button
              type="button"
              className="step-link"
              disabled={!reachable(s.id) || taskId !== undefined}
              onClick={() => setStep(s.id)}
            >
              <span className="step-number">{i + 1}</span> {s.label}
            </button>
          </li>
        ))}
      </ol>
      <p className="hint wizard-promise">
        Nothing is written to the study until you press Import in step 6. Closing the wizard forgets the file.
      </p>

      {step === 'choose' && (
        <div className="wizard-body">
          <div className="choose-row">
            <label>
              The data are
              <select
                value={role}
                onChange={(e) => setRole(e.target.value as DatasetRole)}
                aria-label="Dataset role"
              >
                {props.roles.map((r) => (
                  <option key={r.role} value={r.role}>
                    {r.label}
                  </option>
                ))}
              </select>
            </label>
            <label>
              Data file (CSV, TSV or .xlsx)
              <input
                type="file"
                accept=".csv,.tsv,.txt,.tab,.dat,.xlsx,text/csv,text/tab-separated-values"
                aria-label="Data file"
                disabled={busy}
                onChange={(e) => void choose(e.target.files?.[0])}
              />
            </label>
          </div>
          {file && preview && (
            <p className="muted">
              Chosen: <strong>{file.name}</strong> ({formatBytes(file.size)}).{' '}
              <button type="button" className="link" onClick={() => setStep('preview')}>
                Go to the preview
              </button>
            </p>
          )}
          {busy && <p className="muted">Reading the start of the file…</p>}
        </div>
      )}

      {step === 'preview' && preview && (
        <PreviewStep preview={preview} reading={reading} busy={busy} onReread={reread} />
      )}
      {step === 'columns' && preview && (
        <ColumnsStep preview={preview} pool={props.pool} mapping={mapping} onChange={setMapping} />
      )}
      {step === 'missing' && preview && (
        <MissingStep
          preview={preview}
          missing={missing}
          bounds={props.bounds}
          anchors={props.anchors}
          onChange={setMissing}
        />
      )}
      {step === 'check' && taskId && (
        <div className="wizard-body">
          <TaskProgress
            taskId={taskId}
            label={`Reading ${file?.name ?? 'the file'} (bytes read)`}
            onFinished={finished}
          />
        </div>
      )}
      {(step === 'check' || step === 'confirm') && !taskId && check && (
        <CheckStep
          check={check}
          stage={step}
          busy={confirm.busy}
          error={confirm.error}
          onBack={() => setStep('missing')}
          onContinue={() => setStep('confirm')}
          onImport={store}
        />
      )}

      <ErrorNote message={error} />

      {step !== 'choose' && step !== 'check' && step !== 'confirm' && (
        <div className="button-row wizard-nav">
          <button type="button" className="secondary" onClick={() => setStep(STEPS[at - 1].id)}>
            Back
          </button>
          {step === 'missing' ? (
            <button type="button" className="primary" onClick={startRead} disabled={busy}>
              Read the whole file
            </button>
          ) : (
            <button
              type="button"
              className="primary"
              onClick={() => setStep(STEPS[at + 1].id)}
              disabled={busy}
            >
              Next: {STEPS[at + 1].label.toLowerCase()}
            </button>
          )}
        </div>
      )}
    </Panel>
  );
}
