import { useCallback, useRef, useState } from 'react';
import type { CommandOutput } from '../../../app/api/commands.ts';
import { call } from '../../api/client.ts';
import { ErrorNote } from '../../shared/components.tsx';
import { TaskProgress } from '../../shared/task-progress.tsx';
import { useMutation } from '../../shared/use-command.ts';

export type View = CommandOutput<'validity.view'>;

/** Which stored run a figure comes from, in the words every panel uses. */
export function RunNote(props: { runId: number; createdAt: string; outOfDate: string | null }) {
  return (
    <p className={props.outOfDate ? 'run-note stale' : 'run-note muted'}>
      Stored run {props.runId}, {new Date(props.createdAt).toLocaleString()}
      {props.outOfDate ? ` — out of date: ${props.outOfDate}` : ''}
    </p>
  );
}

/**
 * Starts an analysis in a worker (CFA or invariance), shows its progress with Cancel, and stores it
 * when it is done; the view then reloads with the new run.
 */
export function WorkerRun(props: {
  label: string;
  busyLabel: string;
  disabled?: boolean;
  running: { taskId: string } | undefined;
  start(): Promise<{ taskId: string }>;
}) {
  const collect = useMutation('validity.collect');
  const [taskId, setTaskId] = useState<string | undefined>(props.running?.taskId);
  const [error, setError] = useState<string | undefined>(undefined);
  const collecting = useRef<string | undefined>(undefined);
  const finished = useCallback(async () => {
    if (!taskId || collecting.current === taskId) return;
    collecting.current = taskId;
    await collect.run({ taskId });
    setTaskId(undefined);
  }, [taskId, collect.run]);
  return (
    <div className="worker-run">
      {taskId ? (
        <TaskProgress taskId={taskId} label={props.busyLabel} onFinished={finished} />
      ) : (
        <button
          type="button"
          disabled={props.disabled}
          onClick={async () => {
            setError(undefined);
            collect.clearError();
            try {
              setTaskId((await props.start()).taskId);
            } catch (e) {
              setError((e as Error).message);
            }
          }}
        >
          {props.label}
        </button>
      )}
      <ErrorNote message={error ?? collect.error} />
    </div>
  );
}

/** A button for an analysis that runs at once (relations, retest), with its error. */
export function QuickRun(props: {
  label: string;
  disabled?: boolean;
  name: 'validity.runRelations' | 'validity.runRetest';
}) {
  const run = useMutation(props.name);
  return (
    <div className="worker-run">
      <button type="button" disabled={props.disabled || run.busy} onClick={() => void run.run({})}>
        {run.busy ? 'Running…' : props.label}
      </button>
      <ErrorNote message={run.error} />
    </div>
  );
}

export { call };
