import { bounded, boundedSignificant, NO_VALUE, pValue, unbounded } from '../../api/format.ts';
import { sourceNoteLines } from '../../api/source-notes.ts';
import {
  analyzeDimensionality,
  DEFAULT_PA_ITERATIONS,
  DEFAULT_PA_PERCENTILE,
  type Dimensionality,
} from '../../engine/factor/dimensionality.ts';
import { kmoLabel } from '../../engine/factor/factorability.ts';
import type { CorrelationInput } from '../../engine/factor/input.ts';
import { methodsField } from '../../engine/methods/index.ts';
import { simulateEigenvaluesInPool } from '../../workers/parallel-analysis.ts';
import { TaskRunner } from '../../workers/tasks.ts';
import { formatTable } from '../table.ts';
import { type StatsAnalysis, UsageError } from '../types.ts';
import { integerOption, type LoadedItems, loadItemData, numberOption, seedOption } from './data.ts';
import {
  correlationKindOption,
  correlationsOf,
  cut,
  engineStep,
  factorSpec,
  analysisHead,
} from './factor-common.ts';

/** Most replications `--iterations` accepts. */
export const MAX_PA_ITERATIONS = 1_000_000;

function methodIds(d: Dimensionality, input: CorrelationInput): string[] {
  const ids = ['efa.kmo', 'efa.kmo-labels', 'efa.bartlett', 'efa.kaiser', 'linalg.symmetric-eigen'];
  if (d.map) ids.push('efa.map', 'efa.map-fourth');
  if (d.parallel) ids.push('efa.parallel', 'efa.parallel-factors', 'efa.smc', 'rng.wishart-bartlett');
  if (input.kind === 'polychoric') ids.push('polychoric.two-step', 'polychoric.bivariate-normal');
  if (input.smoothed || d.factorability.smoothed) ids.push('linalg.smoothing');
  ids.push('rule.efa-sample-size');
  return ids;
}

function toJson(
  loaded: LoadedItems,
  input: CorrelationInput,
  d: Dimensionality,
  iterations: number,
  percentile: number,
  seed: number,
) {
  const byItem = (values: number[]) => Object.fromEntries(loaded.names.map((name, i) => [name, values[i]]));
  return {
    ...analysisHead('dimensionality', loaded, input, { iterations, percentile }),
    n: d.n,
    p: d.p,
    kmo: d.factorability.kmo,
    kmoLabel: kmoLabel(d.factorability.kmo),
    msa: byItem(d.factorability.msa),
    bartlett: d.factorability.bartlett && {
      chiSquare: d.factorability.bartlett.chiSquare,
      df: d.factorability.bartlett.df,
      p: d.factorability.bartlett.p,
    },
    determinant: d.factorability.determinant,
    eigenvalues: d.eigenvalues,
    reducedEigenvalues: d.reducedEigenvalues,
    parallel: d.parallel && {
      iterations: d.parallel.iterations,
      percentile: d.parallel.percentile,
      components: { mean: d.parallel.components.mean, percentile: d.parallel.components.percentile },
      factors: { mean: d.parallel.factors.mean, percentile: d.parallel.factors.percentile },
    },
    map: d.map && { squared: d.map.squared, fourth: d.map.fourth },
    suggested: d.suggested,
    seed,
    methods: methodsField(methodIds(d, input)),
  };
}

function toTable(loaded: LoadedItems, input: CorrelationInput, d: Dimensionality): string {
  const f = d.factorability;
  const lines = [
    `Dimensionality of ${d.p} items: n = ${d.n} (${input.kind} correlations, ${loaded.missing} deletion)`,
    `  data: ${cut(loaded.file, 90)}`,
    '',
    `  KMO ${bounded(f.kmo)} (${kmoLabel(f.kmo)} [1])`,
    f.bartlett
      ? `  Bartlett's test of sphericity: χ² = ${unbounded(f.bartlett.chiSquare)}, df = ${f.bartlett.df}, ${pValue(f.bartlett.p)}`
      : "  Bartlett's test of sphericity: not defined (singular correlation matrix)",
    `  determinant of R: ${boundedSignificant(f.determinant)}`,
    '',
  ];
  const hasPa = d.parallel !== null;
  const header = [
    '#',
    'eigenvalue',
    ...(hasPa ? [`PA ${d.parallel?.percentile}th`] : []),
    'reduced',
    ...(hasPa ? [`PA ${d.parallel?.percentile}th`] : []),
    'MAP r²',
    'MAP r⁴',
  ];
  const rows = d.eigenvalues.map((value, k) => [
    String(k),
    unbounded(value, 3),
    ...(hasPa ? [unbounded(d.parallel?.components.percentile[k], 3)] : []),
    unbounded(d.reducedEigenvalues[k], 3),
    ...(hasPa ? [unbounded(d.parallel?.factors.percentile[k], 3)] : []),
    bounded(d.map?.squared[k], 4),
    bounded(d.map?.fourth[k], 4),
  ]);
  rows.forEach((row, k) => {
    row[0] = String(k + 1);
  });
  lines.push(
    '  Eigenvalues of R and of R with SMCs on the diagonal (reduced), each beside its parallel-analysis',
    `  percentile; MAP row m = averages after removing m − 1 components (row 1 = no component removed).`,
    '',
    formatTable(
      header,
      rows,
      header.map((_, i) => (i === 0 ? 'left' : 'right')),
    ),
    '',
    '  How many factors (shown side by side; the choice is yours):',
    `    Kaiser (eigenvalues > 1)             ${d.suggested.kaiser}`,
    `    parallel analysis, components        ${d.suggested.parallel ?? NO_VALUE}`,
    `    parallel analysis, common factors    ${d.suggested.parallelFactors ?? NO_VALUE}`,
    `    MAP, squared partials                ${d.suggested.map ?? NO_VALUE}`,
    `    MAP, 4th-power partials              ${d.suggested.mapFourth ?? NO_VALUE}`,
  );
  if (d.parallel)
    lines.push(
      '',
      `  parallel analysis: ${d.parallel.iterations} simulated data sets, seed ${d.parallel.seed}`,
    );
  const low = loaded.names.filter((_, i) => f.msa[i] < 0.5);
  if (low.length > 0) lines.push(`  MSA below .50 (unacceptable): ${low.map((s) => cut(s)).join(', ')}`);
  lines.push(
    '',
    'Rules of thumb shown (sources in the numbered notes)',
    ...sourceNoteLines(['efa.kmo-labels', 'rule.efa-sample-size']),
  );
  return lines.join('\n');
}

/** `stats dimensionality`: factorability, eigenvalues, Kaiser, parallel analysis and MAP side by side. */
export const dimensionality: StatsAnalysis = {
  name: 'dimensionality',
  summary: 'how many factors: KMO, Bartlett, eigenvalues, parallel analysis, MAP',
  ...factorSpec(
    "How many factors: KMO and MSA, Bartlett's test, eigenvalues (Kaiser), parallel analysis for\ncomponents and common factors, and the MAP test, side by side; none is chosen for you.",
    [
      ['--iterations N', `simulated data sets for parallel analysis (default 1000)`],
      ['--percentile P', `percentile of the simulated eigenvalues (default 95)`],
      ['--seed S', `seed of the simulation (reported as "seed")`],
      ['--correlation KIND', `pearson (default) or polychoric`],
    ],
  ),

  async run(values, ctx) {
    const iterations = integerOption(values, 'iterations', 1, MAX_PA_ITERATIONS) ?? DEFAULT_PA_ITERATIONS;
    const percentile = numberOption(values, 'percentile') ?? DEFAULT_PA_PERCENTILE;
    if (!(percentile > 0 && percentile < 100))
      throw new UsageError(`--percentile must lie between 0 and 100 (got ${percentile})`);
    const seed = seedOption(values);
    const kind = correlationKindOption(values);
    const loaded = await loadItemData(values, ctx);
    const input = correlationsOf(loaded, kind);
    const p = loaded.names.length;
    let blocks: Awaited<ReturnType<typeof simulateEigenvaluesInPool>> | undefined;
    if (input.n - 1 >= p) {
      const runner = new TaskRunner();
      try {
        blocks = await simulateEigenvaluesInPool(runner, { n: input.n, p, seed, iterations });
      } finally {
        await runner.shutdown();
      }
    }
    const d = engineStep(loaded.file, () =>
      analyzeDimensionality(input.matrix, input.n, { iterations, seed, percentile, blocks }),
    );
    return {
      json: toJson(loaded, input, d, iterations, percentile, seed),
      table: toTable(loaded, input, d),
      warnings: [...loaded.warnings, ...input.warnings, ...d.warnings],
    };
  },
};
