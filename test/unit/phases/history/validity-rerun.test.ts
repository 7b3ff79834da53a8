import fs from 'node:fs';
import path from 'node:path';
import Database from 'better-sqlite3';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { fillDemoStudy } from '../../../../app/demo/index.ts';
import { RERUN_KINDS, rerunStoredRuns, verifyWithReruns } from '../../../../app/phases/history/index.ts';
import { reopenPhase } from '../../../../app/phases/index.ts';
import { excludeRespondents, includeRespondents } from '../../../../app/phases/pilot/screening-actions.ts';
import type { RelationsResults } from '../../../../app/phases/validity/relations.ts';
import { type RetestResults, runRetest } from '../../../../app/phases/validity/retest.ts';
import { canonicalJson } from '../../../../db/canonical-json.ts';
import { Study } from '../../../../db/study.ts';
import { verifyStudy } from '../../../../db/verify.ts';
import { runCli } from '../../../helpers/cli.ts';
import { editAndReseal } from '../../../helpers/reseal.ts';
import { runIdOf, withStudy } from '../../../helpers/study-file.ts';
import { TEST_ACTOR, tempDir } from '../../../helpers/tmp.ts';

/**
 * The validity phase's stored runs on the full demo (two CFAs, the relations to other variables and
 * the retest), each re-run by `project verify` from what the file stores. Every forged value here
 * is resealed (all digests and the whole chain recomputed), so only the re-run can tell.
 */

let tmp: ReturnType<typeof tempDir>;
let full: string;
beforeAll(() => {
  tmp = tempDir();
  full = path.join(tmp.dir, 'full.scalewright');
  Study.create(full, { actor: TEST_ACTOR, app: 'test' }, { init: (study) => fillDemoStudy(study) }).close();
}, 180_000);
afterAll(() => tmp.cleanup());

function copyOfFull(): string {
  const file = path.join(tmp.dir, `copy-${Math.random().toString(36).slice(2)}.scalewright`);
  fs.copyFileSync(full, file);
  return file;
}

/** Reopens the pilot phase and excludes the retest data's first respondent; returns the dataset id. */
function excludeFirstRetestRespondent(study: Study): number {
  const retestId = (study.db.prepare("SELECT id FROM dataset WHERE role = 'retest'").get() as { id: number })
    .id;
  reopenPhase(study, 'pilot', 'One retest respondent answered for someone else');
  excludeRespondents(study, retestId, {
    respondents: [0],
    reason: 'Answered the retest on behalf of another respondent (demo).',
  });
  return retestId;
}

/** Rewrites the stored results of the first run of a kind, and reseals the file. Returns the run id. */
function forge<T>(file: string, kind: string, edit: (results: T) => void): number {
  let runId = 0;
  editAndReseal(file, (db) => {
    runId = runIdOf(db, kind);
    const row = db.prepare('SELECT results FROM analysis_run WHERE id = ?').get(runId) as { results: string };
    const results = JSON.parse(row.results) as T;
    edit(results);
    db.prepare('UPDATE analysis_run SET results = ? WHERE id = ?').run(JSON.stringify(results), runId);
  });
  return runId;
}

describe('the full demo', () => {
  it('re-runs every stored run, the relations and retest runs included, and each reproduces', () => {
    const report = withStudy(full, (study) => verifyWithReruns(study));
    expect(report.intact).toBe(true);
    const kinds = [...new Set(report.rerun.runs.map((r) => r.kind))].sort();
    expect(kinds).toEqual([
      'cfa',
      'content-validity',
      'purification-round',
      'relations',
      'retest',
      'screening',
    ]);
    for (const kind of kinds) expect(RERUN_KINDS[kind], kind).toBeDefined();
    for (const run of report.rerun.runs)
      expect(run.status, `run ${run.runId} (${run.kind})`).toBe('reproduced');
  }, 60_000);

  it('keeps the order the columns were described in, which is not the order of their names', () => {
    // The re-run reads the column settings from an object by column, whose stored key order is
    // sorted; the demo describes its columns in another order, so the re-run must restore it.
    const stored = withStudy(full, (study) =>
      study.db.prepare("SELECT results FROM analysis_run WHERE kind = 'relations'").get(),
    ) as { results: string };
    const columns = (JSON.parse(stored.results) as RelationsResults).measures.map((m) => m.column);
    expect(columns.length).toBeGreaterThan(1);
    expect(columns).not.toEqual([...columns].sort());
  });

  it('project verify says every stored analysis reproduced, and lists none as not re-run', () => {
    const run = runCli(['project', 'verify', full]);
    expect(run.code).toBe(0);
    expect(run.stdout).toMatch(/re-run of 9 stored analyses \(engine [^)]+\): 9 reproduced\n/);
    expect(run.stdout).not.toMatch(/not re-run/);
    const json = runCli(['project', 'verify', full, '--json']);
    const value = JSON.parse(json.stdout);
    expect(value.rerun.runs.filter((r: { status: string }) => r.status !== 'reproduced')).toEqual([]);
  }, 60_000);
});

describe('a forged value, resealed', () => {
  it('a fit index of a CFA is caught', () => {
    const file = copyOfFull();
    const runId = forge<Record<string, { cfi?: number }> & { cfi?: number }>(file, 'cfa', (results) => {
      const key = Object.keys(results).find((k) => typeof results[k]?.cfi === 'number');
      if (key) results[key].cfi = Math.min(1, (results[key].cfi as number) + 0.01);
      else results.cfi = Math.min(1, (results.cfi as number) + 0.01);
    });
    withStudy(file, (study) => {
      expect(verifyStudy(study).breaks).toEqual([]);
      const report = verifyWithReruns(study);
      expect(report.intact).toBe(false);
      expect(report.breaks.map((b) => b.row)).toEqual([`id ${runId}`]);
      expect((report.breaks[0].columns ?? []).join(' ')).toMatch(/cfi/);
    });
  }, 60_000);

  it('a criterion correlation is caught, naming the run, the field and both values', () => {
    const file = copyOfFull();
    let original = 0;
    const runId = forge<RelationsResults>(file, 'relations', (results) => {
      original = results.measures[0].correlation.r;
      results.measures[0].correlation.r = original + 0.05;
    });
    withStudy(file, (study) => {
      expect(verifyStudy(study).breaks).toEqual([]);
      const report = verifyWithReruns(study);
      expect(report.intact).toBe(false);
      expect(report.breaks).toHaveLength(1);
      expect(report.breaks[0]).toMatchObject({ check: 'rerun', table: 'analysis_run', row: `id ${runId}` });
      expect(report.breaks[0].columns).toEqual(['results.measures[0].correlation.r']);
      expect(report.breaks[0].problem).toMatch(
        /analysis of relations to other variables no longer reproduces .*measures\[0\]\.correlation\.r stored/,
      );
      const [check] = report.rerun.breaks;
      expect(check).toMatchObject({ runId, kind: 'relations', status: 'differs', differenceCount: 1 });
      expect(check.differences[0].stored).toBeCloseTo(original + 0.05, 12);
      expect(check.differences[0].recomputed).toBe(original);
    });
  }, 60_000);

  it('a known-groups effect size is caught', () => {
    const file = copyOfFull();
    forge<RelationsResults>(file, 'relations', (results) => {
      results.groups[0].comparison.cohensD *= 1.1;
    });
    withStudy(file, (study) => {
      const [check] = rerunStoredRuns(study).breaks;
      expect(check.kind).toBe('relations');
      expect(check.differences.map((d) => d.field)).toEqual(['groups[0].comparison.cohensD']);
    });
  }, 60_000);

  it('an ICC is caught, naming the form’s field and both values', () => {
    const file = copyOfFull();
    let at = -1;
    let original = 0;
    const runId = forge<RetestResults>(file, 'retest', (results) => {
      at = results.icc.forms.findIndex((f) => f.form === results.form);
      original = results.icc.forms[at].value;
      results.icc.forms[at].value = original - 0.03;
    });
    withStudy(file, (study) => {
      expect(verifyStudy(study).breaks).toEqual([]);
      const report = verifyWithReruns(study);
      expect(report.intact).toBe(false);
      expect(report.breaks.map((b) => [b.row, b.columns])).toEqual([
        [`id ${runId}`, [`results.icc.forms[${at}].value`]],
      ]);
      expect(report.breaks[0].problem).toMatch(/test–retest analysis no longer reproduces/);
      const [check] = report.rerun.breaks;
      expect(check.differences[0].stored).toBeCloseTo(original - 0.03, 12);
      expect(check.differences[0].recomputed).toBe(original);
    });
  }, 60_000);

  it('an SEM and an MDC are caught', () => {
    const file = copyOfFull();
    forge<RetestResults>(file, 'retest', (results) => {
      results.sem *= 0.9;
      results.mdc95 *= 0.9;
    });
    withStudy(file, (study) => {
      const [check] = rerunStoredRuns(study).breaks;
      expect(check.kind).toBe('retest');
      expect(check.differences.map((d) => d.field)).toEqual(['mdc95', 'sem']);
    });
  }, 60_000);
});

describe('runs stored before their score rule and bounds were kept among their inputs', () => {
  it('still reproduce: the name and keys their results report, and the declared bounds', () => {
    const file = copyOfFull();
    editAndReseal(file, (db) => {
      for (const [kind, drop] of [
        ['relations', 'score'],
        ['retest', 'bounds'],
      ] as const) {
        const id = runIdOf(db, kind);
        const row = db.prepare('SELECT inputs FROM analysis_run WHERE id = ?').get(id) as { inputs: string };
        const inputs = JSON.parse(row.inputs) as Record<string, unknown>;
        expect(inputs[drop], `${kind} stores ${drop}`).toBeDefined();
        delete inputs[drop];
        db.prepare('UPDATE analysis_run SET inputs = ? WHERE id = ?').run(canonicalJson(inputs), id);
      }
    });
    withStudy(file, (study) => {
      const report = verifyWithReruns(study);
      expect(report.intact).toBe(true);
      for (const kind of ['relations', 'retest'])
        expect(report.rerun.runs.find((r) => r.kind === kind)?.status, kind).toBe('reproduced');
    });
  }, 60_000);
});

describe('inputs that can no longer be rebuilt', () => {
  it('a removed retest dataset makes the retest run one that no longer runs, not a mismatch', () => {
    const file = copyOfFull();
    // The app never deletes a dataset; someone editing the file does, then reseals it.
    const db = new Database(file);
    let datasetId = 0;
    let name = '';
    try {
      db.pragma('foreign_keys = OFF');
      ({ id: datasetId, name } = db.prepare("SELECT id, name FROM dataset WHERE role = 'retest'").get() as {
        id: number;
        name: string;
      });
      db.prepare('DELETE FROM dataset_column WHERE dataset_id = ?').run(datasetId);
      db.prepare('DELETE FROM respondent_exclusion WHERE dataset_id = ?').run(datasetId);
      db.prepare('DELETE FROM dataset WHERE id = ?').run(datasetId);
    } finally {
      db.close();
    }
    editAndReseal(file, () => {});
    withStudy(file, (study) => {
      const report = verifyWithReruns(study);
      const retest = report.rerun.runs.find((r) => r.kind === 'retest');
      expect(retest).toMatchObject({ status: 'failed', differences: [], differenceCount: 0 });
      expect(retest?.note).toBe(
        `the test–retest analysis no longer runs on its stored inputs: dataset ${datasetId} ("${name}") is no longer in the study`,
      );
      expect(report.rerun.breaks.map((r) => r.kind)).toEqual(['retest']);
      expect(report.rerun.runs.filter((r) => r.kind !== 'retest').map((r) => r.status)).toEqual(
        report.rerun.runs.filter((r) => r.kind !== 'retest').map(() => 'reproduced'),
      );
    });
  }, 60_000);

  it('an exclusion made after the retest run leaves its inputs gone, said plainly, not a break', () => {
    const study = Study.open(copyOfFull(), { actor: TEST_ACTOR, app: 'test' });
    try {
      excludeFirstRetestRespondent(study);
      const report = rerunStoredRuns(study);
      const retest = report.runs.find((r) => r.kind === 'retest');
      expect(retest?.status).toBe('inputs-gone');
      expect(retest?.note).toMatch(
        /exclusions in ".*" changed after this run \(0 respondents excluded then, 1 now\)/,
      );
      expect(report.breaks).toEqual([]);
      // The relations run read the validation data only, and still reproduces.
      expect(report.runs.find((r) => r.kind === 'relations')?.status).toBe('reproduced');
    } finally {
      study.close();
    }
  }, 60_000);

  it('one exclusion swapped for another after a run (the same count) leaves its inputs gone, not a break', () => {
    const study = Study.open(copyOfFull(), { actor: TEST_ACTOR, app: 'test' });
    try {
      const retestId = excludeFirstRetestRespondent(study);
      reopenPhase(study, 'validity', 'The retest is run again without that respondent');
      const runId = runRetest(study);
      expect(rerunStoredRuns(study).runs.find((r) => r.runId === runId)?.status).toBe('reproduced');
      includeRespondents(study, retestId, {
        respondents: [0],
        reason: 'The first exclusion was a mix-up (demo).',
      });
      excludeRespondents(study, retestId, {
        respondents: [1],
        reason: 'This one answered for someone else instead (demo).',
      });
      const report = rerunStoredRuns(study);
      const swapped = report.runs.find((r) => r.runId === runId);
      expect(swapped?.status).toBe('inputs-gone');
      expect(swapped?.note).toMatch(
        /exclusions in ".*" changed after this run \(as many excluded then as now \(1\), but not the same respondents\)/,
      );
      expect(report.breaks).toEqual([]);
    } finally {
      study.close();
    }
  }, 60_000);
});
