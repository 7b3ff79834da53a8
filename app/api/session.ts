import path from 'node:path';
import type { Actor } from '../../db/decision-log.ts';
import { StudyFileError } from '../../db/errors.ts';
import { Study } from '../../db/study.ts';
import { TaskRunner } from '../workers/tasks.ts';

/**
 * The study a window (desktop) or a browser-mode server has open, and who is working on it.
 * Commands reach the study only through here.
 */
export class Session {
  private current: Study | undefined;
  /** Long computations of this session, run in worker threads (progress, cancel). */
  readonly tasks = new TaskRunner();

  constructor(
    public actor: Actor,
    readonly app: string,
    private readonly options: {
      /** A better-sqlite3 addon built for another ABI (the Electron shell passes its own). */
      nativeBinding?: string;
      /** Keeps a new display name for the next launch (the user's settings file). */
      saveDisplayName?: (name: string) => void;
      /** Where the recent studies are kept between launches (the user's settings file). */
      recentStudies?: { list(): string[]; remember(file: string): void };
    } = {},
  ) {}

  private readonly recentInMemory: string[] = [];

  /** Studies opened or created lately, newest first. */
  recent(): string[] {
    return this.options.recentStudies?.list() ?? [...this.recentInMemory];
  }

  private remember(file: string): void {
    if (this.options.recentStudies) this.options.recentStudies.remember(file);
    else {
      const at = this.recentInMemory.indexOf(file);
      if (at >= 0) this.recentInMemory.splice(at, 1);
      this.recentInMemory.unshift(file);
      this.recentInMemory.length = Math.min(this.recentInMemory.length, 10);
    }
  }

  /** The native addon path, for code that opens a second connection (a copy's check). */
  get addon(): string | undefined {
    return this.options.nativeBinding;
  }

  private get nativeBinding(): string | undefined {
    return this.options.nativeBinding;
  }

  get study(): Study {
    if (!this.current) throw new StudyFileError('not-found', 'no study is open; open or create one first');
    return this.current;
  }

  get hasStudy(): boolean {
    return this.current !== undefined;
  }

  open(file: string): Study {
    const next = Study.open(path.resolve(file), {
      actor: this.actor,
      app: this.app,
      nativeBinding: this.nativeBinding,
    });
    this.close();
    this.current = next;
    this.remember(next.path);
    return next;
  }

  create(file: string, title: string): Study {
    const next = Study.create(
      path.resolve(file),
      { actor: this.actor, app: this.app, nativeBinding: this.nativeBinding },
      { title },
    );
    this.close();
    this.current = next;
    this.remember(next.path);
    return next;
  }

  /** Adopts a study opened elsewhere (the launcher opens the demo before serving). */
  adopt(study: Study): void {
    this.close();
    this.current = study;
    this.remember(study.path);
  }

  /** The name shown in the log rows written from now on; earlier rows keep the name they had. */
  setDisplayName(name: string): void {
    this.actor = { ...this.actor, name };
    if (this.current) this.current.actor = this.actor;
    this.options.saveDisplayName?.(name);
  }

  close(): void {
    this.current?.close();
    this.current = undefined;
  }

  /** Ends the session: stops running tasks and closes the study. */
  async shutdown(): Promise<void> {
    await this.tasks.shutdown();
    this.close();
  }
}
