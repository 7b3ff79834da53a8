import type { RunRecord } from '../../../db/repos/analysis-runs.ts';
import type { Study } from '../../../db/study.ts';

/**
 * How a stored analysis run is computed again. `rerun` rebuilds the run's input from what the study
 * file stores (the stored dataset rows, the stored ratings), the run's stored inputs, options and
 * seed, calls the same engine function the phase called, and returns the results in the shape the
 * phase stored them. It reads and never writes. When the inputs are no longer in the file (ratings
 * taken out of a round later), it throws `InputsGone` saying which; any other error means the stored
 * inputs no longer lead to a result, which verify reports as a break.
 */
export interface RerunKind {
  /** What the run is, in words ("purification round"). */
  title: string;
  rerun(study: Study, run: RunRecord): unknown;
}

/** The stored inputs of a run are no longer in the file, for a reason the study records. */
export class InputsGone extends Error {
  constructor(message: string) {
    super(message);
    this.name = 'InputsGone';
  }
}
