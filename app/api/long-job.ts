import { EngineError } from '../engine/errors.ts';
import { RuleError } from '../phases/errors.ts';
import type { JobInput, JobName, JobOutput } from '../workers/jobs.ts';
import type { Session } from './session.ts';

/** How a long job's failures reach the researcher. */
export interface LongJobMessages<P> {
  /** Collecting a task this session did not start (or already collected, or forgot). */
  notFound(taskId: string): string;
  /** The job was cancelled; by default the worker's own message. */
  cancelled?(context: P, error: EngineError): string;
  /** Other engine error codes that are the researcher's to fix (a file that cannot be read), not internal. */
  refused?: readonly string[];
}

/**
 * The one way a command runs a long job: `start` runs it in a worker thread (the screen follows it
 * with task.status, and task.cancel stops it) and remembers, per session, what storing its result
 * needs; `collect`, from a second command, waits for the result and stores it. A cancelled job (and a
 * refused one) comes back as a rule message and stores nothing.
 */
export class LongJob<K extends JobName, P> {
  private readonly pending = new WeakMap<Session, Map<string, P>>();

  constructor(
    private readonly job: K,
    private readonly messages: LongJobMessages<P>,
  ) {}

  private of(session: Session): Map<string, P> {
    let map = this.pending.get(session);
    if (!map) {
      map = new Map();
      this.pending.set(session, map);
    }
    return map;
  }

  /** Starts the job and returns its task id. */
  start(session: Session, input: JobInput<K>, context: P): string {
    const task = session.tasks.start(this.job, input);
    this.of(session).set(task.id, context);
    return task.id;
  }

  /** Jobs this session started and has not collected, by task id, with their context. */
  running(session: Session): [string, P][] {
    return [...this.of(session).entries()];
  }

  /** Cancels a job and forgets it: collecting it afterwards is refused as not found. */
  abandon(session: Session, taskId: string): void {
    if (this.of(session).delete(taskId)) session.tasks.cancel(taskId);
  }

  /** Waits for the job's output and stores it with `store`; the job is forgotten either way. */
  async collect<R>(
    session: Session,
    taskId: string,
    store: (output: JobOutput<K>, context: P) => R,
  ): Promise<R> {
    const map = this.of(session);
    if (!map.has(taskId)) throw new RuleError(this.messages.notFound(taskId), 'not-found');
    const context = map.get(taskId) as P;
    try {
      const output = (await session.tasks.result(taskId)) as JobOutput<K>;
      return store(output, context);
    } catch (error) {
      if (error instanceof EngineError) {
        if (error.code === 'cancelled') {
          throw new RuleError(this.messages.cancelled?.(context, error) ?? error.message, 'cancelled');
        }
        if (this.messages.refused?.includes(error.code)) throw new RuleError(error.message, error.code);
      }
      throw error;
    } finally {
      map.delete(taskId);
    }
  }
}
