import path from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { bounded, unbounded } from '../../../app/api/format.ts';
import { fillDemoStudy } from '../../../app/demo/index.ts';
import { fitCfa } from '../../../app/engine/cfa/fit.ts';
import { analyzeDimensionality } from '../../../app/engine/factor/dimensionality.ts';
import { exploratoryFactorAnalysis } from '../../../app/engine/factor/efa.ts';
import { correlationInput } from '../../../app/engine/factor/input.ts';
import { buildAppendix } from '../../../app/export/appendix/index.ts';
import type { Figure, Table } from '../../../app/export/appendix/model.ts';
import { analysisData, currentPilotDataset } from '../../../app/phases/analysis-data.ts';
import { recordRun } from '../../../app/phases/change.ts';
import { roundSummaries } from '../../../app/phases/purification/index.ts';
import { listFacets } from '../../../db/repos/construct.ts';
import { listItems } from '../../../db/repos/items.ts';
import { Study } from '../../../db/study.ts';
import { verifyStudy } from '../../../db/verify.ts';
import { TEST_ACTOR, tempDir } from '../../helpers/tmp.ts';

/**
 * Analyses that other screens store (dimensionality, exploratory and confirmatory factor analysis)
 * appear in the appendix from their stored results alone. The runs here are computed by the engine on
 * the demo's pilot data and stored the way every analysis is (recordRun), so the appendix is checked
 * against what the study holds.
 */
let tmp: ReturnType<typeof tempDir>;
let file: string;
let stored: {
  eigenvalues: number[];
  loadings: number[][];
  items: string[];
  cfi: number;
  rmsea: number;
};

beforeAll(() => {
  tmp = tempDir('scalewright-appendix-runs-');
  file = path.join(tmp.dir, 'demo.scalewright');
  const study = Study.create(
    file,
    { actor: TEST_ACTOR, app: 'test' },
    { title: 'Demo', init: (study) => fillDemoStudy(study, 'purification') },
  );
  try {
    const pilot = currentPilotDataset(study);
    const items = roundSummaries(study).at(-1)?.items ?? [];
    if (!pilot || items.length === 0) throw new Error('the demo has pilot data and rounds');
    const data = analysisData(study, pilot.id, items);
    const r = correlationInput(items, data.data, { kind: 'pearson', missing: 'listwise' });
    const inputs = { dataset: { id: pilot.id, name: pilot.name }, items };
    const dimensionality = analyzeDimensionality(r.matrix, r.n, {
      iterations: 100,
      seed: 11,
      percentile: 95,
    });
    recordRun(study, {
      phase: 'purification',
      kind: 'dimensionality',
      label: 'Factor count',
      inputs,
      options: { iterations: 100, percentile: 95 },
      seed: 11,
      results: dimensionality,
    });
    const efa = exploratoryFactorAnalysis(items, r.matrix, {
      factors: 4,
      extraction: 'paf',
      rotation: 'oblimin',
      n: r.n,
    });
    recordRun(study, {
      phase: 'purification',
      kind: 'efa',
      label: 'Four factors',
      inputs,
      options: { factors: 4 },
      results: efa,
    });
    const byCode = new Map(listItems(study).map((it) => [it.code, it.facetId]));
    const model = {
      factors: listFacets(study).map((f) => ({
        name: f.name,
        items: items.filter((code) => byCode.get(code) === f.id),
      })),
    };
    const complete = data.data.filter((row) => row.every((x) => x !== null)) as number[][];
    const n = complete.length;
    const means = items.map((_, j) => complete.reduce((s, row) => s + row[j], 0) / n);
    const cov = items.map((_, a) =>
      items.map((_, b) => complete.reduce((s, row) => s + (row[a] - means[a]) * (row[b] - means[b]), 0) / n),
    );
    const cfa = fitCfa(model, [{ name: 'pilot', n, cov }]);
    recordRun(study, {
      phase: 'validity',
      kind: 'cfa',
      label: 'Four-facet model',
      inputs,
      options: { model },
      results: cfa,
    });
    stored = {
      eigenvalues: dimensionality.eigenvalues,
      loadings: efa.loadings,
      items,
      cfi: cfa.cfi ?? Number.NaN,
      rmsea: cfa.rmsea ?? Number.NaN,
    };
    expect(verifyStudy(study).intact).toBe(true);
  } finally {
    study.close();
  }
}, 120_000);
afterAll(() => tmp.cleanup());

describe('stored analysis runs in the appendix', () => {
  it('shows eigenvalues with parallel analysis, loadings, and CFA fit from the stored results, each with its figure', () => {
    const study = Study.open(file, { actor: TEST_ACTOR, app: 'test', mode: 'read' });
    const doc = buildAppendix(study);
    study.close();
    const tables = doc.blocks.filter((b): b is Table => b.kind === 'table');
    const figures = doc.blocks.filter((b): b is Figure => b.kind === 'figure');

    // The rounds' own factor analyses come first (earlier runs); the runs stored above come last.
    const eigenTables = tables.filter((t) => t.caption.startsWith('Eigenvalues and parallel analysis'));
    expect(eigenTables.length).toBeGreaterThan(1);
    const eigen = eigenTables.at(-1);
    expect(eigen?.rows.map((r) => r[1])).toEqual(stored.eigenvalues.slice(0, 12).map((v) => unbounded(v)));
    expect(figures.some((f) => f.caption.startsWith('Scree plot'))).toBe(true);

    const loadings = tables.filter((t) => t.caption.startsWith('Factor loadings')).at(-1);
    expect(loadings?.rows.map((r) => r[0])).toEqual(stored.items);
    expect(loadings?.rows[0].slice(1, 5)).toEqual(stored.loadings[0].map((v) => bounded(v, 2)));
    expect(figures.some((f) => f.caption.startsWith('Loadings heat map'))).toBe(true);

    const fit = tables.find((t) => t.caption.startsWith('Model fit'));
    expect(fit?.rows[0][3]).toBe(bounded(stored.cfi));
    expect(fit?.rows[0][5]).toBe(bounded(stored.rmsea));
    expect(figures.some((f) => f.caption.startsWith('The confirmatory model'))).toBe(true);

    const notYet = doc.blocks
      .filter((b) => b.kind === 'notice' && b.tone === 'not-yet')
      .map((b) => JSON.stringify(b));
    expect(notYet.some((n) => n.includes('Confirmatory factor analysis'))).toBe(false);
    expect(notYet.some((n) => n.includes('Factor-count evidence'))).toBe(false);
  }, 60_000);
});
