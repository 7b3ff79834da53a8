import fs from 'node:fs';
import path from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { fillDemoStudy } from '../../../../app/demo/index.ts';
import {
  columnFromBytes,
  columnToBytes,
  decodeColumn,
  encodeColumn,
} from '../../../../app/engine/columnar.ts';
import { ENGINE_VERSION } from '../../../../app/engine/version.ts';
import {
  compareResults,
  RERUN_KINDS,
  RERUN_TOLERANCE,
  rerunStoredRuns,
  verifyWithReruns,
} from '../../../../app/phases/history/index.ts';
import { editFacet } from '../../../../app/phases/construct/index.ts';
import { reopenPhase } from '../../../../app/phases/index.ts';
import { editItem } from '../../../../app/phases/items/index.ts';
import { listFacets } from '../../../../db/repos/construct.ts';
import { listItems } from '../../../../db/repos/items.ts';
import { Study } from '../../../../db/study.ts';
import { verifyStudy } from '../../../../db/verify.ts';
import { runCli } from '../../../helpers/cli.ts';
import { editAndReseal } from '../../../helpers/reseal.ts';
import { runIdOf, withStudy } from '../../../helpers/study-file.ts';
import { TEST_ACTOR, tempDir } from '../../../helpers/tmp.ts';

let tmp: ReturnType<typeof tempDir>;
let demo: string;
beforeAll(() => {
  tmp = tempDir();
  demo = path.join(tmp.dir, 'demo.scalewright');
  // The demo up to purification, which is quicker to make; the validity phase's runs on the full
  // demo are re-run in validity-rerun.test.ts.
  Study.create(
    demo,
    { actor: TEST_ACTOR, app: 'test' },
    { init: (study) => fillDemoStudy(study, 'purification') },
  ).close();
}, 120_000);
afterAll(() => tmp.cleanup());

/** A fresh copy of the demo study, for one tampering. */
function copyOfDemo(): string {
  const file = path.join(tmp.dir, `copy-${Math.random().toString(36).slice(2)}.scalewright`);
  fs.copyFileSync(demo, file);
  return file;
}

describe('compareResults', () => {
  it('agrees within the stated relative tolerance and names each differing field beyond it', () => {
    const stored = { scale: { alpha: { value: 0.9 }, items: [{ r: 0.5 }, { r: 0.4 }] }, note: 'x' };
    const within = {
      scale: { alpha: { value: 0.9 * (1 + RERUN_TOLERANCE.relative / 2) }, items: [{ r: 0.5 }, { r: 0.4 }] },
      note: 'x',
    };
    expect(compareResults(stored, within)).toEqual([]);
    const beyond = { scale: { alpha: { value: 0.9 * (1 + 1e-6) }, items: [{ r: 0.5 }] }, note: 'y' };
    expect(compareResults(stored, beyond).map((d) => d.field)).toEqual([
      'note',
      'scale.alpha.value',
      'scale.items.length',
    ]);
  });

  it('compares as JSON stores results: NaN equals null, an undefined key equals a missing one', () => {
    expect(compareResults({ a: null, b: 1 }, { a: Number.NaN, b: 1, c: undefined })).toEqual([]);
    expect(compareResults({ a: 0 }, { a: 1e-13 })).toEqual([]);
    expect(compareResults({ a: 0 }, { a: 1e-6 })).toHaveLength(1);
  });
});

describe('re-running the demo study', () => {
  it('reproduces every stored run, and every kind the demo stores has a re-run', () => {
    const report = withStudy(demo, (study) => verifyWithReruns(study));
    expect(report.intact).toBe(true);
    const kinds = new Set(report.rerun.runs.map((r) => r.kind));
    // The demo stores review statistics, screening and purification rounds.
    expect([...kinds].sort()).toEqual(['content-validity', 'purification-round', 'screening']);
    for (const kind of kinds) expect(RERUN_KINDS[kind], kind).toBeDefined();
    for (const run of report.rerun.runs) {
      expect(run.status, `run ${run.runId}`).toBe('reproduced');
      expect(run.seq).not.toBeNull();
    }
  }, 60_000);
});

describe('renames after a run', () => {
  it('leave the run reproducible: codes and facet names are taken as they were when it was stored', () => {
    const file = copyOfDemo();
    const study = Study.open(file, { actor: TEST_ACTOR, app: 'test' });
    try {
      reopenPhase(study, 'construct', 'rename a facet');
      const facet = listFacets(study).find((f) => f.name === 'Route planning');
      if (!facet) throw new Error('the demo has no facet "Route planning"');
      editFacet(study, facet.id, { name: 'Route choice' });
      reopenPhase(study, 'items', 'rename an item');
      const item = listItems(study).find((it) => it.code === 'RP01');
      if (!item) throw new Error('the demo has no item RP01');
      editItem(study, item.id, { code: 'RP01A' });
      const report = rerunStoredRuns(study);
      expect(report.runs.map((r) => [r.kind, r.status])).toEqual(
        report.runs.map((r) => [r.kind, 'reproduced']),
      );
    } finally {
      study.close();
    }
  }, 60_000);
});

describe('a forged result whose digests were all recomputed', () => {
  it('passes the chain and digest checks but not the re-run, which names the run, the field and both values', () => {
    const file = copyOfDemo();
    let runId = 0;
    let forged = 0;
    editAndReseal(file, (db) => {
      runId = runIdOf(db, 'purification-round');
      const row = db.prepare('SELECT results FROM analysis_run WHERE id = ?').get(runId) as {
        results: string;
      };
      const results = JSON.parse(row.results);
      forged = results.scale.alpha.value + 0.02;
      results.scale.alpha.value = forged;
      db.prepare('UPDATE analysis_run SET results = ? WHERE id = ?').run(JSON.stringify(results), runId);
    });
    withStudy(file, (study) => {
      expect(verifyStudy(study).breaks).toEqual([]);
      const report = verifyWithReruns(study);
      expect(report.intact).toBe(false);
      expect(report.breaks).toHaveLength(1);
      const [b] = report.breaks;
      expect(b).toMatchObject({ check: 'rerun', table: 'analysis_run', row: `id ${runId}` });
      expect(b.columns).toEqual(['results.scale.alpha.value']);
      const check = report.rerun.breaks[0];
      expect(check.differences[0].stored).toBe(forged);
      expect(check.differences[0].recomputed).toBeCloseTo(forged - 0.02, 12);
      expect(b.problem).toMatch(/purification round no longer reproduces .*scale\.alpha\.value stored/);
    });
  }, 60_000);
});

describe('a dataset row edited, with the file digests recomputed', () => {
  it('is caught by every stored analysis that read that row', () => {
    const file = copyOfDemo();
    editAndReseal(file, (db) => {
      const column = db
        .prepare(
          "SELECT dataset_id AS datasetId, position, encoded FROM dataset_column WHERE role = 'item' AND item_code = 'TR01' AND dataset_id = (SELECT min(id) FROM dataset WHERE role = 'pilot')",
        )
        .get() as { datasetId: number; position: number; encoded: Buffer };
      const values = decodeColumn(columnFromBytes(new Uint8Array(column.encoded)));
      // Respondent 0 is kept in the pilot analyses; move their answer to the other end of the scale.
      values[0] = values[0] >= 3 ? 1 : 5;
      db.prepare('UPDATE dataset_column SET encoded = ? WHERE dataset_id = ? AND position = ?').run(
        Buffer.from(columnToBytes(encodeColumn(values))),
        column.datasetId,
        column.position,
      );
    });
    withStudy(file, (study) => {
      expect(verifyStudy(study).breaks).toEqual([]);
      const report = verifyWithReruns(study);
      expect(report.intact).toBe(false);
      const broken = new Set(report.rerun.breaks.map((c) => c.kind));
      expect(broken.has('screening')).toBe(true);
      expect(broken.has('purification-round')).toBe(true);
      // The review statistics did not read the pilot data and still reproduce.
      expect(report.rerun.runs.filter((r) => r.kind === 'content-validity').map((r) => r.status)).toEqual([
        'reproduced',
        'reproduced',
      ]);
    });
  }, 60_000);
});

describe('runs stored by another engine version', () => {
  it('are re-run and compared, and a difference is reported apart, not as a break', () => {
    const file = copyOfDemo();
    editAndReseal(file, (db) => {
      const id = runIdOf(db, 'screening');
      const row = db.prepare('SELECT results FROM analysis_run WHERE id = ?').get(id) as { results: string };
      const results = JSON.parse(row.results);
      results.respondents[0].longstring += 1;
      db.prepare("UPDATE analysis_run SET results = ?, engine_version = '0.0.1' WHERE id = ?").run(
        JSON.stringify(results),
        id,
      );
    });
    withStudy(file, (study) => {
      const report = rerunStoredRuns(study);
      expect(report.engineVersion).toBe(ENGINE_VERSION);
      expect(report.breaks).toEqual([]);
      expect(report.engineDifferences).toHaveLength(1);
      expect(report.engineDifferences[0]).toMatchObject({
        kind: 'screening',
        otherEngine: true,
        status: 'differs',
      });
      expect(verifyWithReruns(study).intact).toBe(true);
    });
  }, 60_000);
});

describe('project verify re-runs the stored analyses', () => {
  it('exits 0 on the demo, saying how many reproduced', () => {
    const run = runCli(['project', 'verify', demo]);
    expect(run.code).toBe(0);
    expect(run.stdout).toMatch(/re-run of 5 stored analyses \(engine [^)]+\): 5 reproduced/);
    for (const line of run.stdout.split('\n')) expect(line.length).toBeLessThanOrEqual(100);
  }, 60_000);

  it('exits 1 on a forged result, naming run, field, stored and recomputed in the table and the JSON', () => {
    const file = copyOfDemo();
    let runId = 0;
    editAndReseal(file, (db) => {
      runId = runIdOf(db, 'content-validity');
      const row = db.prepare('SELECT results FROM analysis_run WHERE id = ?').get(runId) as {
        results: string;
      };
      const results = JSON.parse(row.results);
      results.items[0].iCvi = 0.5;
      db.prepare('UPDATE analysis_run SET results = ? WHERE id = ?').run(JSON.stringify(results), runId);
    });
    const table = runCli(['project', 'verify', file]);
    expect(table.code).toBe(1);
    expect(table.stdout).toMatch(/1 no longer reproduce/);
    expect(table.stdout).toMatch(/rerun: analysis_run \(id \d+\), log row \d+: the content-validity/);
    expect(table.stdout).toMatch(/items\[0\]\.iCvi stored 0\.5, recomputed/);
    expect(table.stderr).toMatch(
      /^error: .* failed verification: analysis_run \(id \d+\), log row \d+: [^\n]+\n$/,
    );
    for (const line of table.stdout.split('\n')) expect(line.length).toBeLessThanOrEqual(100);
    const json = runCli(['project', 'verify', file, '--json']);
    expect(json.code).toBe(1);
    const value = JSON.parse(json.stdout);
    expect(value.intact).toBe(false);
    expect(value.rerun.breaks).toHaveLength(1);
    expect(value.rerun.breaks[0]).toMatchObject({ runId, kind: 'content-validity', status: 'differs' });
    expect(value.rerun.breaks[0].differences[0]).toMatchObject({ field: 'items[0].iCvi', stored: 0.5 });
    expect(value.breaks.map((b: { check: string }) => b.check)).toEqual(['rerun']);
  }, 60_000);
});
