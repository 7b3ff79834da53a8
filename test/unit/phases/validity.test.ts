import { createHash } from 'node:crypto';
import fs from 'node:fs';
import path from 'node:path';
import { afterAll, beforeAll, beforeEach, describe, expect, it } from 'vitest';
import { fillDemoStudy } from '../../../app/demo/index.ts';
import { DEMO_GROUP_MODEL, DEMO_ITEM_TRUTH } from '../../../app/demo/pilot.ts';
import { finishDemoPurification } from '../../../app/demo/purification-signoff.ts';
import {
  DEMO_PLANTED_RESIDUAL,
  DEMO_TRIPS_LATER,
  generateDemoValidation,
} from '../../../app/demo/validation-data.ts';
import { importDemoValidation } from '../../../app/demo/validity.ts';
import { editRelation } from '../../../app/phases/construct/index.ts';
import { phaseOverview, reopenPhase } from '../../../app/phases/index.ts';
import { lastChange, undoLastChange } from '../../../app/phases/undo.ts';
import {
  acknowledgeSource,
  describeMeasure,
  modelInForce,
  runCfa,
  setMeasurementModel,
  validityView,
} from '../../../app/phases/validity/index.ts';
import type { CfaJobOutput } from '../../../app/workers/validity.ts';
import { listRuns } from '../../../db/repos/analysis-runs.ts';
import { listRelations } from '../../../db/repos/construct.ts';
import { Study } from '../../../db/study.ts';
import { TEST_ACTOR, tempDir } from '../../helpers/tmp.ts';
import REFERENCE from '../../reference/fixtures/demo-validity.json' with { type: 'json' };

let tmp: ReturnType<typeof tempDir>;
let full: Study;
/** A demo built up to the validation wave's import: purification signed off, validity open. */
let openFile: string;

beforeAll(() => {
  tmp = tempDir('scalewright-validity-');
  full = Study.create(path.join(tmp.dir, 'full.scalewright'), { actor: TEST_ACTOR, app: 'test' });
  fillDemoStudy(full);
  openFile = path.join(tmp.dir, 'open.scalewright');
  const open = Study.create(openFile, { actor: TEST_ACTOR, app: 'test' });
  fillDemoStudy(open, 'purification');
  open.actor = { user: 'tester', name: 'Demo generator' };
  finishDemoPurification(open);
  open.close();
}, 120_000);

afterAll(() => {
  full.close();
  tmp.cleanup();
});

describe('the demo worked to sign-off', () => {
  it('the first CFA’s largest residual-covariance hint is the planted pair, and freeing it (with its reason) brings good fit', () => {
    const runs = listRuns(full, { phase: 'validity', kind: 'cfa' });
    expect(runs).toHaveLength(2);
    const first = runs[0].results as CfaJobOutput;
    const top = first.fit.hints.filter((h) => h.kind === 'residual covariance')[0];
    expect([top.a, top.b].sort()).toEqual([DEMO_PLANTED_RESIDUAL.a, DEMO_PLANTED_RESIDUAL.b].sort());
    // Generated: the two items' latent residuals correlate .5, so the freed covariance is positive.
    expect(top.standardizedEpc).toBeGreaterThan(0);
    const second = runs[1].results as CfaJobOutput;
    expect(second.fit.chiSquare).toBeLessThan(first.fit.chiSquare - top.mi / 2);
    // Cut-offs from the registry's `cfa.cutoffs` (Hu & Bentler 1999, from memory; common practice).
    expect(second.fit.cfi).toBeGreaterThanOrEqual(0.95);
    expect(second.fit.srmr).toBeLessThanOrEqual(0.08);
    const model = modelInForce(full).model;
    expect(model.residualCovariances).toEqual([
      expect.objectContaining({ a: DEMO_PLANTED_RESIDUAL.a, b: DEMO_PLANTED_RESIDUAL.b }),
    ]);
  });

  it('recovers the generated loadings on the five-point items (ordinal, so somewhat below the latent ones)', () => {
    const view = validityView(full);
    const fit = view.cfa?.results.fit;
    if (!fit) throw new Error('no CFA');
    const diffs = fit.loadings.map((l) => {
      const truth = DEMO_ITEM_TRUTH.find((t) => t.code === l.item);
      return l.standardized - (truth?.loading ?? 0);
    });
    const meanAbs = diffs.reduce((s, d) => s + Math.abs(d), 0) / diffs.length;
    expect(meanAbs).toBeLessThan(0.12);
  });

  it('tests the planned relations as generated: the later trip count is predictive, regular riders score higher', () => {
    const view = validityView(full);
    const rel = view.relationsRun?.results;
    if (!rel) throw new Error('no relations run');
    const trips = rel.measures.find((m) => m.column === DEMO_TRIPS_LATER.column);
    expect(trips?.timing).toBe('predictive');
    expect(trips?.correlation.r).toBeGreaterThan(0.3);
    expect(trips?.correlation.disattenuated).toBeGreaterThan(trips?.correlation.r ?? 1);
    const groups = rel.groups[0];
    expect(groups.comparison.a.name).toBe(DEMO_GROUP_MODEL.levels[2]);
    expect(groups.comparison.cohensD).toBeGreaterThan(0.8);
    expect(groups.anova?.groups).toHaveLength(3);
    const verdicts = Object.fromEntries(rel.hypotheses.map((h) => [h.otherConstruct, h.outcome?.verdict]));
    expect(verdicts['Traffic-related anxiety']).toBe('supported');
    expect(verdicts['Social desirability']).toBe('supported');
    expect(verdicts['Riding frequency (regular versus rare riders)']).toBe('supported');
    for (const r of view.relations) expect(r.timing?.before).toBe(true);
  });

  it('the relations run agrees with scipy on the same file (test/reference/demo_validity.py)', () => {
    const ref = REFERENCE;
    expect(createHash('sha256').update(generateDemoValidation().csv).digest('hex')).toBe(ref.sha256);
    const r = validityView(full).relationsRun?.results;
    if (!r) throw new Error('no relations run');
    expect(r.score.items).toEqual(ref.items);
    expect(r.score.reverse).toEqual(ref.reverse);
    expect(r.score.n).toBe(ref.scored);
    expect(r.score.alpha).toBeCloseTo(ref.alpha, 9);
    for (const m of r.measures) {
      const e = ref.measures[m.column as keyof typeof ref.measures];
      expect(m.correlation.n, m.column).toBe(e.n);
      expect(m.correlation.r, m.column).toBeCloseTo(e.r, 9);
      expect(m.correlation.lower, m.column).toBeCloseTo(e.lower, 9);
      expect(m.correlation.upper, m.column).toBeCloseTo(e.upper, 9);
    }
    const g = r.groups[0];
    expect(g.comparison.t).toBeCloseTo(ref.groups.t, 8);
    expect(g.comparison.df).toBeCloseTo(ref.groups.df, 8);
    expect(g.comparison.cohensD).toBeCloseTo(ref.groups.d, 9);
    expect(g.comparison.hedgesG).toBeCloseTo(ref.groups.g, 9);
    expect(g.anova?.F).toBeCloseTo(ref.groups.anovaF, 8);
  });

  it('retest: ICC near the generated stability, with SEM and MDC', () => {
    const retest = validityView(full).retestRun?.results;
    if (!retest) throw new Error('no retest run');
    const icc = retest.icc.forms.find((f) => f.form === 'ICC(2,1)');
    // Generated: facet factors correlate .85 between occasions; the total score adds a little error.
    expect(icc?.value).toBeGreaterThan(0.75);
    expect(icc?.value).toBeLessThan(0.95);
    expect(retest.mdc95).toBeCloseTo(1.96 * Math.SQRT2 * retest.sem, 10);
  });

  it('is signed off with every checklist item met', () => {
    const o = phaseOverview(full, 'validity');
    expect(o.status).toBe('signed-off');
    expect(o.checklist.every((c) => c.met)).toBe(true);
    expect(full.log.verify()).toEqual([]);
  });
});

describe('the phase rules', () => {
  let study: Study;
  let file: string;
  beforeEach(() => {
    file = path.join(tmp.dir, `rules-${Math.random().toString(36).slice(2)}.scalewright`);
    fs.copyFileSync(openFile, file);
    study = Study.open(file, { actor: TEST_ACTOR, app: 'test' });
    return () => study.close();
  });

  it('never runs on the pilot: without validation data the CFA is refused and nothing is written', () => {
    const rows = study.log.count();
    expect(() => runCfa(study)).toThrow(/no validation data is current.*pilot data is never used/);
    expect(study.log.count()).toBe(rows);
  });

  it('refuses a residual covariance without its reason, and an item purification dropped', () => {
    importDemoValidation(study);
    const rows = study.log.count();
    const model = modelInForce(study).model;
    expect(() =>
      setMeasurementModel(
        study,
        { ...model, residualCovariances: [{ a: 'RR01', b: 'RR05', rationale: ' ' }] },
        'Try it',
      ),
    ).toThrow(/residual covariance 1 \(RR01 with RR05\) needs a reason/);
    const withDropped = {
      ...model,
      factors: model.factors.map((f, i) => (i === 0 ? { ...f, items: [...f.items, 'TR09'] } : f)),
    };
    expect(() => setMeasurementModel(study, withDropped, 'Try it')).toThrow(
      /TR09 .* is not among the items purification kept/,
    );
    expect(study.log.count()).toBe(rows);
  });

  it('a CFA goes out of date when the model changes, and the checklist says so', () => {
    importDemoValidation(study);
    runCfa(study);
    expect(phaseOverview(study, 'validity').checklist.find((c) => c.id === 'cfa-on-current-data')?.met).toBe(
      true,
    );
    const model = modelInForce(study).model;
    setMeasurementModel(study, { ...model, orthogonal: true }, 'Check uncorrelated facets');
    const item = phaseOverview(study, 'validity').checklist.find((c) => c.id === 'cfa-on-current-data');
    expect(item?.met).toBe(false);
    expect(item?.detail).toMatch(/out of date: the measurement model changed since/);
  });

  it('an acknowledgement lapses when what a source shows changes', () => {
    importDemoValidation(study);
    acknowledgeSource(study, 'internal-structure', 'Nothing yet; noted.');
    expect(() => acknowledgeSource(study, 'internal-structure', 'Again')).toThrow(/already acknowledged/);
    runCfa(study);
    const ack = validityView(study).sources.find((s) => s.id === 'internal-structure')?.acknowledgement;
    expect(ack?.stale).toBe(true);
    expect(ack?.current).toBe(false);
  });

  it('says plainly when a relation was edited after the validation data were imported', () => {
    importDemoValidation(study);
    reopenPhase(study, 'construct', 'Sharpen one expectation');
    const r = listRelations(study)[0];
    editRelation(study, r.id, { ...r, expectedStrength: 'weak', rationale: 'Looked again' });
    const timing = validityView(study).relations.find((x) => x.id === r.id)?.timing;
    expect(timing?.before).toBe(false);
    expect(timing?.statement).toMatch(
      /after the validation data was imported.*not fixed before the data were seen/,
    );
  });

  it('a criterion column must exist and its reliability lie in (0, 1]', () => {
    importDemoValidation(study);
    expect(() =>
      describeMeasure(study, 'nope', { relationId: null, timing: 'concurrent', reliability: null }, 'x'),
    ).toThrow(/no criterion column "nope"; its criterion columns: gen_self_efficacy/);
    expect(() =>
      describeMeasure(
        study,
        DEMO_TRIPS_LATER.column,
        { relationId: null, timing: 'predictive', reliability: 1.2 },
        'x',
      ),
    ).toThrow(/reliability lies above 0 and at most 1/);
  });

  it('undo sets the measurement model back to the one before, with a row naming the row it reverses; that row is not undone again', () => {
    importDemoValidation(study);
    const before = modelInForce(study).model;
    setMeasurementModel(study, { ...before, orthogonal: true }, 'Check uncorrelated facets');
    const changed = study.log.list({ limit: 1 })[0];
    const last = lastChange(study);
    expect(last).toMatchObject({ seq: changed.seq, kind: 'model-set', undoable: true });
    expect(last?.effect).toMatch(/measurement model back/);
    undoLastChange(study, { seq: changed.seq, reason: 'Uncorrelated facets were a detour' });
    expect(modelInForce(study).model).toEqual(before);
    const undone = study.log.list({ limit: 1 })[0];
    expect(undone).toMatchObject({ kind: 'model-set', rationale: 'Undo: Uncorrelated facets were a detour' });
    expect(undone.detail.reverses).toBe(changed.seq);
    expect(lastChange(study)?.undoable).toBe(false);
    expect(() => undoLastChange(study, { seq: undone.seq, reason: 'again' })).toThrow(/already undid row/);
  });
});
