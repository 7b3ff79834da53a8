import type { Study } from '../../../db/study.ts';
import { type IntegrityBreak, type VerifyReport, verifyStudy } from '../../../db/verify.ts';
import { checkProblem, type RerunReport, rerunStoredRuns } from './rerun.ts';

export interface FullVerifyReport extends VerifyReport {
  /** Every stored analysis run re-run from its stored inputs, and what did not reproduce. */
  rerun: RerunReport;
}

/**
 * Everything `verifyStudy` checks, and then every stored analysis run re-run from its stored
 * inputs (rerunStoredRuns): a run of this engine version that no longer reproduces is a break
 * (check `rerun`, naming the run, its log row and the first differing fields); runs of another
 * engine version that differ are reported in `rerun.engineDifferences` and break nothing. Reads only.
 */
export function verifyWithReruns(study: Study, options: { head?: string } = {}): FullVerifyReport {
  const report = verifyStudy(study, options);
  const rerun = rerunStoredRuns(study);
  const breaks: IntegrityBreak[] = rerun.breaks.map((c) => ({
    check: 'rerun',
    ...(c.seq === null ? {} : { seq: c.seq }),
    table: 'analysis_run',
    row: `id ${c.runId}`,
    ...(c.differences.length > 0 ? { columns: c.differences.map((d) => `results.${d.field}`) } : {}),
    problem: checkProblem(c),
  }));
  const all = [...report.breaks, ...breaks];
  return { ...report, intact: all.length === 0, breaks: all, rerun };
}
