import { mkdtempSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, describe, expect, it } from 'vitest';
import { analyzeDimensionality } from '../../../../app/engine/factor/dimensionality.ts';
import { correlationMatrix } from '../../../../app/engine/linalg.ts';
import { createRng } from '../../../../app/engine/rng.ts';
import { runCli } from '../../../helpers/cli.ts';

const dir = mkdtempSync(join(tmpdir(), 'scalewright-factor-'));
afterAll(() => rmSync(dir, { recursive: true, force: true }));

// Invented pilot of an invented cycling-confidence scale: two facets (traffic, route planning), three
// items each, answered 1–5; "route3" is stored reverse-keyed.
const NAMES = ['traffic1', 'traffic2', 'traffic3', 'route1', 'route2', 'route3'];
const CUTS = [-1.5, -0.5, 0.5, 1.5];
const rng = createRng(2026);
const rows: number[][] = [];
for (let i = 0; i < 300; i++) {
  const f1 = rng.normal();
  const f2 = 0.3 * f1 + Math.sqrt(0.91) * rng.normal();
  const z = [f1, f1, f1, f2, f2, f2].map((f) => 0.75 * f + Math.sqrt(1 - 0.5625) * rng.normal());
  const answers = z.map((v) => 1 + CUTS.filter((c) => v > c).length);
  answers[5] = 6 - answers[5];
  rows.push(answers);
}
const good = join(dir, 'pilot.csv');
writeFileSync(good, `id,${NAMES.join(',')}\n${rows.map((r, i) => `p${i + 1},${r.join(',')}`).join('\n')}\n`);
const flat = join(dir, 'flat.csv');
writeFileSync(
  flat,
  `id,${NAMES.join(',')}\n${rows.map((r, i) => `p${i + 1},${[...r.slice(0, 2), 3, ...r.slice(3)].join(',')}`).join('\n')}\n`,
);
/** Each spawned command starts a Node process; on a busy machine a test of several takes a while. */
const SPAWNS = { timeout: 180_000 };
const items = ['--items', NAMES.join(','), '--reverse', 'route3', '--min', '1', '--max', '5'];

describe('stats dimensionality (spawned CLI)', () => {
  it('prints one JSON object with the contract fields, methods and the seed', SPAWNS, () => {
    const run = runCli([
      'stats',
      'dimensionality',
      '--data',
      good,
      ...items,
      '--iterations',
      '200',
      '--seed',
      '9',
      '--json',
    ]);
    expect(run.stderr).toBe('');
    expect(run.code).toBe(0);
    const out = JSON.parse(run.stdout);
    expect(out.n).toBe(300);
    expect(out.p).toBe(6);
    expect(Object.keys(out.msa)).toEqual(NAMES);
    expect(out.bartlett.df).toBe(15);
    expect(out.eigenvalues).toHaveLength(6);
    expect(out.suggested).toMatchObject({ kaiser: 2, parallel: 2, parallelFactors: 2 });
    expect(typeof out.suggested.map).toBe('number');
    expect(out.seed).toBe(9);
    expect(out.methods.map((m: { id: string }) => m.id)).toContain('efa.parallel');
    expect(out.warnings).toEqual([]);
    // The command's numbers are the engine's on the same (reverse-keyed) responses.
    const keyed = rows.map((r) => [...r.slice(0, 5), 6 - r[5]]);
    const engine = analyzeDimensionality(correlationMatrix(keyed), 300, {
      iterations: 200,
      seed: 9,
      percentile: 95,
    });
    expect(out.kmo).toBeCloseTo(engine.factorability.kmo, 12);
    expect(out.parallel.components.percentile).toEqual(engine.parallel?.components.percentile);
  });

  it('prints a table within 100 columns and answers --help', SPAWNS, () => {
    const run = runCli(['stats', 'dimensionality', '--data', good, ...items, '--iterations', '50']);
    expect(run.code).toBe(0);
    for (const line of run.stdout.split('\n')) expect(line.length).toBeLessThanOrEqual(100);
    expect(run.stdout).toMatch(/the choice is yours/);
    const help = runCli(['stats', 'dimensionality', '--help']);
    expect(help.code).toBe(0);
    expect(help.stdout).toMatch(/--iterations N/);
  });

  it('exit 1 naming a zero-variance item; exit 2 for a bad option', SPAWNS, () => {
    const run = runCli(['stats', 'dimensionality', '--data', flat, '--items', NAMES.join(','), '--json']);
    expect(run.code).toBe(1);
    expect(run.stderr).toMatch(/^error: .*"traffic3" has the same answer from every respondent/);
    expect(run.stdout).toBe('');
    const bad = runCli([
      'stats',
      'dimensionality',
      '--data',
      good,
      '--items',
      NAMES.join(','),
      '--percentile',
      '100',
    ]);
    expect(bad.code).toBe(2);
    expect(bad.stderr).toMatch(/^error: --percentile/);
  });
});

describe('stats efa (spawned CLI)', () => {
  it('ML + oblimin: loadings by item, communalities, factor correlations, fit and omega', SPAWNS, () => {
    const run = runCli([
      'stats',
      'efa',
      '--data',
      good,
      ...items,
      '--factors',
      '2',
      '--extraction',
      'ml',
      '--json',
    ]);
    expect(run.stderr).toBe('');
    expect(run.code).toBe(0);
    const out = JSON.parse(run.stdout);
    expect(Object.keys(out.loadings)).toEqual(NAMES);
    expect(out.loadings.traffic1).toHaveLength(2);
    expect(out.factorCorrelations).toHaveLength(2);
    expect(out.converged).toBe(true);
    expect(out.fit.df).toBe(4);
    expect(out.fit).toHaveProperty('rmsea');
    expect(out.fit).toHaveProperty('tli');
    expect(out.omega.model).toMatch(/Schmid–Leiman/);
    expect(out.methods.map((m: { id: string }) => m.id)).toEqual(
      expect.arrayContaining(['efa.ml', 'rotation.oblimin']),
    );
    // Each facet's items share a factor.
    const primary = NAMES.map((n) =>
      out.loadings[n].map(Math.abs).indexOf(Math.max(...out.loadings[n].map(Math.abs))),
    );
    expect(new Set(primary.slice(0, 3)).size).toBe(1);
    expect(new Set(primary.slice(3)).size).toBe(1);
    expect(primary[0]).not.toBe(primary[3]);
  });

  it('varimax without normalization on polychoric correlations; table within 100 columns', SPAWNS, () => {
    const run = runCli([
      'stats',
      'efa',
      '--data',
      good,
      ...items,
      '--factors',
      '2',
      '--extraction',
      'paf',
      '--rotation',
      'varimax',
      '--no-normalize',
      '--correlation',
      'polychoric',
    ]);
    expect(run.code).toBe(0);
    for (const line of run.stdout.split('\n')) expect(line.length).toBeLessThanOrEqual(100);
    expect(run.stdout).toMatch(/paf, varimax/);
  });

  it('usage errors exit 2: no --factors, too many factors, unknown rotation', SPAWNS, () => {
    expect(runCli(['stats', 'efa', '--data', good, '--items', NAMES.join(',')]).code).toBe(2);
    expect(
      runCli(['stats', 'efa', '--data', good, '--items', NAMES.join(','), '--factors', '6']).stderr,
    ).toMatch(/below the number of items/);
    const r = runCli([
      'stats',
      'efa',
      '--data',
      good,
      '--items',
      NAMES.join(','),
      '--factors',
      '2',
      '--rotation',
      'spin',
    ]);
    expect(r.code).toBe(2);
    expect(r.stderr).toMatch(/^error: --rotation must be one of/);
    const ml = runCli([
      'stats',
      'efa',
      '--data',
      good,
      '--items',
      NAMES.join(','),
      '--factors',
      '4',
      '--extraction',
      'ml',
    ]);
    expect(ml.code).toBe(1);
    expect(ml.stderr).toMatch(/maximum likelihood can fit at most 3/);
  });
});

describe('stats polychoric (spawned CLI)', () => {
  it('prints items, the matrix and thresholds by item', SPAWNS, () => {
    const run = runCli(['stats', 'polychoric', '--data', good, ...items, '--json']);
    expect(run.code).toBe(0);
    const out = JSON.parse(run.stdout);
    expect(out.items).toEqual(NAMES);
    expect(out.matrix).toHaveLength(6);
    expect(out.matrix[0][0]).toBe(1);
    expect(out.thresholds.traffic1).toHaveLength(4);
    expect(out.methods[0].id).toBe('polychoric.two-step');
  });
});
