import { count } from '../../app/api/format.ts';
import { useEffect, useState } from 'react';
import type { TaskStatus } from '../../app/api/contracts/tasks.ts';
import { call } from '../api/client.ts';

const POLL_MS = 150;

/**
 * Follows a long task (run in a worker thread): a progress bar with a Cancel button. Calls
 * `onFinished` once the task is no longer running, with its final status.
 */
export function TaskProgress(props: { taskId: string; label: string; onFinished(status: TaskStatus): void }) {
  const [status, setStatus] = useState<TaskStatus | undefined>(undefined);
  const { taskId, onFinished } = props;
  useEffect(() => {
    let live = true;
    let timer: ReturnType<typeof setTimeout>;
    const poll = async () => {
      const next = await call('task.status', { id: taskId });
      if (!live) return;
      setStatus(next);
      if (next.state === 'running') timer = setTimeout(poll, POLL_MS);
      else onFinished(next);
    };
    void poll();
    return () => {
      live = false;
      clearTimeout(timer);
    };
  }, [taskId, onFinished]);

  const share = status && status.total > 0 ? status.done / status.total : 0;
  return (
    <div className="task-progress" role="status">
      <span>{props.label}</span>
      <progress max={1} value={share} aria-label={props.label} />
      <span className="muted">
        {status?.note ??
          (status && status.total > 0 ? `${count(status.done)} of ${count(status.total)}` : 'starting…')}
      </span>
      <button type="button" className="secondary" onClick={() => void call('task.cancel', { id: taskId })}>
        Cancel
      </button>
    </div>
  );
}
