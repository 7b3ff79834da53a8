import { bounded, pValue, unbounded } from '../../api/format.ts';
import { type EfaResult, exploratoryFactorAnalysis } from '../../engine/factor/efa.ts';
import type { ExtractionMethod } from '../../engine/factor/extraction.ts';
import type { CorrelationInput } from '../../engine/factor/input.ts';
import {
  DEFAULT_OBLIMIN_GAMMA,
  DEFAULT_PROMAX_POWER,
  DEFAULT_RANDOM_STARTS,
  type RotationMethod,
} from '../../engine/factor/rotation.ts';
import { methodsField } from '../../engine/methods/index.ts';
import { formatTable } from '../table.ts';
import { type StatsAnalysis, UsageError } from '../types.ts';
import { integerOption, type LoadedItems, loadItemData, numberOption, seedOption } from './data.ts';
import {
  choiceOption,
  columnBlocks,
  correlationKindOption,
  correlationsOf,
  cut,
  engineStep,
  NAME_WIDTH,
  factorSpec,
  analysisHead,
} from './factor-common.ts';

const EXTRACTIONS = ['paf', 'minres', 'ml'] as const;
const ROTATIONS = ['none', 'varimax', 'quartimax', 'promax', 'oblimin', 'geomin'] as const;
/** Most random starts `--starts` accepts. */
const MAX_STARTS = 1000;

function methodIds(r: EfaResult, input: CorrelationInput): string[] {
  const ids: string[] = [`efa.${r.extraction}`, 'efa.smc'];
  if (r.fit) ids.push('efa.ml-chisquare', 'rmsea.steiger', 'fit.tli');
  if (r.rotation !== 'none' && r.factors > 1) {
    ids.push(`rotation.${r.rotation}`);
    if (r.normalized) ids.push('rotation.kaiser-normalization');
  }
  if (r.omega) ids.push('omega.schmid-leiman', 'omega.hierarchical', 'omega.total');
  if (input.kind === 'polychoric') ids.push('polychoric.two-step', 'polychoric.bivariate-normal');
  if (input.smoothed) ids.push('linalg.smoothing');
  ids.push('rule.primary-loading', 'rule.cross-loading');
  return ids;
}

function toJson(
  loaded: LoadedItems,
  input: CorrelationInput,
  r: EfaResult,
  seed: number,
  settings: Record<string, unknown>,
) {
  const byItem = <T>(values: T[]) => Object.fromEntries(loaded.names.map((name, i) => [name, values[i]]));
  return {
    ...analysisHead('efa', loaded, input, settings),
    n: input.n,
    p: loaded.names.length,
    factors: r.factors,
    extraction: r.extraction,
    rotation: r.rotation,
    oblique: r.oblique,
    normalized: r.normalized,
    loadings: byItem(r.loadings),
    structure: byItem(r.structure),
    communalities: byItem(r.communalities),
    uniquenesses: byItem(r.uniquenesses),
    factorCorrelations: r.factorCorrelations,
    variance: r.variance,
    converged: r.converged,
    iterations: r.iterations,
    rotationConverged: r.rotationConverged,
    rotationIterations: r.rotationIterations,
    starts: r.starts,
    heywood: r.heywood,
    fit: r.fit && {
      chiSquare: r.fit.chiSquare,
      df: r.fit.df,
      p: r.fit.p,
      rmsea: r.fit.rmsea,
      rmseaCI: r.fit.rmseaCI,
      tli: r.fit.tli,
    },
    flags: r.flags.filter((f) => f.notes.length > 0),
    omega: r.omega && {
      hierarchical: r.omega.omegaHierarchical,
      total: r.omega.omegaTotal,
      model: r.omega.model,
      facets: r.omega.facets.map((f) => ({
        factor: f.factor + 1,
        items: f.items.map((i) => loaded.names[i]),
        omegaTotal: f.omegaTotal,
        omegaHierarchical: f.omegaHierarchical,
        omegaGroup: f.omegaGroup,
      })),
    },
    seed,
    methods: methodsField(methodIds(r, input)),
  };
}

function toTable(loaded: LoadedItems, input: CorrelationInput, r: EfaResult): string {
  const rotationText =
    r.rotation === 'none' || r.factors === 1
      ? 'unrotated'
      : `${r.rotation}${r.normalized ? ', Kaiser-normalized' : ''}`;
  const lines = [
    `Exploratory factor analysis of ${loaded.names.length} items: n = ${input.n}, ${r.factors} factor${r.factors === 1 ? '' : 's'}, ${r.extraction}, ${rotationText}`,
    `  (${input.kind} correlations, ${loaded.missing} deletion; extraction ${r.converged ? 'converged' : 'did NOT converge'} in ${r.iterations} iterations)`,
    '',
  ];
  const nameWidth = Math.min(NAME_WIDTH, Math.max(4, ...loaded.names.map((s) => s.length)));
  for (const block of columnBlocks(r.factors, nameWidth + 2 + 7 + 2 + 12, 8)) {
    const last = block[block.length - 1] === r.factors - 1;
    const header = ['item', ...block.map((k) => `F${k + 1}`), ...(last ? ['h²', 'flags'] : [])];
    const rows = loaded.names.map((name, i) => [
      cut(name),
      ...block.map((k) => bounded(r.loadings[i][k], 2)),
      ...(last
        ? [
            bounded(r.communalities[i], 2),
            r.flags[i].notes.length > 0 ? '*'.repeat(r.flags[i].notes.length) : '',
          ]
        : []),
    ]);
    rows.push(['SS', ...block.map((k) => unbounded(r.variance[k].ss)), ...(last ? ['', ''] : [])]);
    rows.push([
      'share',
      ...block.map((k) => bounded(r.variance[k].proportion, 2)),
      ...(last ? ['', ''] : []),
    ]);
    lines.push(
      formatTable(
        header,
        rows,
        header.map((h) => (h === 'item' || h === 'flags' ? 'left' : 'right')),
      ),
      '',
    );
  }
  lines.push(
    `  ${r.oblique ? 'pattern loadings; SS of an oblique factor overlaps the others' : 'loadings'}; common variance ${bounded(r.totalProportion, 2)} of the total`,
  );
  if (r.oblique && r.factors > 1) {
    lines.push('', '  factor correlations');
    for (const block of columnBlocks(r.factors, 8, 8)) {
      lines.push(
        formatTable(
          ['', ...block.map((k) => `F${k + 1}`)],
          r.factorCorrelations.map((row, i) => [`F${i + 1}`, ...block.map((k) => bounded(row[k], 2))]),
          ['left', ...block.map(() => 'right' as const)],
        ),
      );
    }
  }
  if (r.fit) {
    const f = r.fit;
    lines.push(
      '',
      f.p === null
        ? `  fit: χ² = ${unbounded(f.chiSquare)}, df = 0 (just identified; nothing to test)`
        : `  fit: χ² = ${unbounded(f.chiSquare)}, df = ${f.df}, ${pValue(f.p)}; ` +
            `RMSEA ${bounded(f.rmsea)} (90% CI ${bounded(f.rmseaCI?.lower)} to ${bounded(f.rmseaCI?.upper)}); TLI ${bounded(f.tli)}`,
    );
  }
  if (r.omega) {
    lines.push(
      '',
      `  omega hierarchical ${bounded(r.omega.omegaHierarchical)}, omega total ${bounded(r.omega.omegaTotal)}`,
      `    from the ${r.omega.model}`,
    );
    for (const f of r.omega.facets) {
      lines.push(
        `    F${f.factor + 1} (${f.items.length} items): omega total ${bounded(f.omegaTotal)}, general share ${bounded(f.omegaHierarchical)}, own factor ${bounded(f.omegaGroup)}`,
      );
    }
  }
  const flagged = r.flags.filter((f) => f.notes.length > 0);
  if (flagged.length > 0) {
    lines.push(
      '',
      '  flags (common practice: primary loading ≥ .40, cross-loading ≥ .30; they advise, you decide):',
    );
    for (const f of flagged) lines.push(`    ${cut(f.item)}: ${f.notes.join('; ')}`);
  }
  return lines.join('\n');
}

/** `stats efa`: extraction, rotation, loadings, communalities, factor correlations, ML fit, omega. */
export const efa: StatsAnalysis = {
  name: 'efa',
  summary: 'exploratory factor analysis: extraction, rotation, loadings, fit, omega hierarchical',
  ...factorSpec(
    'Exploratory factor analysis: extraction, rotation, loadings, communalities, factor correlations,\nthe ML fit, Heywood and convergence warnings, and omega hierarchical from a Schmid–Leiman solution.',
    [
      ['--factors M', `number of factors (required)`],
      ['--extraction E', `paf, minres or ml (default ml)`],
      ['--rotation R', `none, varimax, quartimax, promax, oblimin (default) or geomin`],
      ['--no-normalize', `rotate without Kaiser row normalization`],
      ['--power K', `promax power (default ${DEFAULT_PROMAX_POWER})`],
      ['--gamma G', `oblimin γ (default ${DEFAULT_OBLIMIN_GAMMA}, quartimin)`],
      [
        '--starts S',
        `starts for oblimin and geomin: identity plus random (default ${DEFAULT_RANDOM_STARTS})`,
      ],
      ['--seed S', `seed of the random starts (reported as "seed")`],
      ['--correlation KIND', `pearson (default) or polychoric`],
    ],
  ),

  async run(values, ctx) {
    const factors = integerOption(values, 'factors', 1, 10_000);
    if (factors === undefined)
      throw new UsageError('--factors M is required (run stats dimensionality to weigh the choice)');
    const extraction: ExtractionMethod = choiceOption(values, 'extraction', EXTRACTIONS, 'ml');
    const rotation: RotationMethod = choiceOption(values, 'rotation', ROTATIONS, 'oblimin');
    const normalize = values['no-normalize'] !== true;
    const promaxPower = numberOption(values, 'power') ?? DEFAULT_PROMAX_POWER;
    if (!(promaxPower > 1)) throw new UsageError(`--power must be above 1 (got ${promaxPower})`);
    const obliminGamma = numberOption(values, 'gamma') ?? DEFAULT_OBLIMIN_GAMMA;
    const starts = integerOption(values, 'starts', 1, MAX_STARTS) ?? DEFAULT_RANDOM_STARTS;
    const seed = seedOption(values);
    const kind = correlationKindOption(values);
    const loaded = await loadItemData(values, ctx);
    const p = loaded.names.length;
    if (p < 3) throw new UsageError('factor analysis needs at least three items in --items');
    if (factors >= p) throw new UsageError(`--factors must be below the number of items (${p})`);
    const input = correlationsOf(loaded, kind);
    const result = engineStep(loaded.file, () =>
      exploratoryFactorAnalysis(loaded.names, input.matrix, {
        factors,
        extraction,
        rotation,
        normalize,
        promaxPower,
        obliminGamma,
        starts,
        seed,
        n: input.n,
      }),
    );
    const settings = { factors, extraction, rotation, normalize, promaxPower, obliminGamma, starts };
    return {
      json: toJson(loaded, input, result, seed, settings),
      table: toTable(loaded, input, result),
      warnings: [...loaded.warnings, ...input.warnings, ...result.warnings],
    };
  },
};
