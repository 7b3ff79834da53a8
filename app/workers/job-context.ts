/** What a job may do while it runs: report progress, and ask whether it should stop. */
export interface JobContext {
  /** `note` says in words what is being counted, for the progress bar. */
  progress(done: number, total: number, note?: string): void;
  shouldStop(): boolean;
}
