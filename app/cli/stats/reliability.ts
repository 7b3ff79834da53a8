import { EngineError } from '../../engine/errors.ts';
import { methodsField } from '../../engine/methods/index.ts';
import {
  analyseItems,
  DEFAULT_CI_LEVEL,
  type ItemAnalysis,
  itemAnalysisMethods,
} from '../../engine/reliability.ts';
import { MIN_BOOTSTRAP_RESAMPLES } from '../../engine/reliability/bootstrap.ts';
import { formatTable } from '../table.ts';
import { DataError, type StatsAnalysis, type StatsResult, UsageError } from '../types.ts';
import { integerOption, type LoadedItems, loadItemData, numberOption, seedOption } from './data.ts';

/** Most resamples `--bootstrap` accepts (about a minute on 500 × 30 with pairwise deletion). */
export const MAX_BOOTSTRAP_RESAMPLES = 100_000;

function round(x: number | null | undefined, digits = 3): string {
  if (x === null || x === undefined) return '—';
  const text = x.toFixed(digits);
  // A value that rounds to zero prints as 0.00, not -0.00.
  return Number(text) === 0 ? text.replace('-', '') : text;
}

function percent(x: number | null): string {
  return x === null ? '—' : `${(100 * x).toFixed(1)}%`;
}

/** The JSON object of `stats reliability --json` (warnings are added by the dispatcher). */
export function reliabilityJson(loaded: LoadedItems, a: ItemAnalysis, seed: number): Record<string, unknown> {
  return {
    analysis: 'reliability',
    engineVersion: a.engineVersion,
    data: { file: loaded.file, sha256: loaded.sha256, rows: loaded.rows },
    inputs: {
      items: loaded.names,
      reverse: loaded.reverse,
      bounds: loaded.bounds,
      missing: loaded.missing,
      missingCodes: loaded.missingCodes,
      ciLevel: a.inputs.ciLevel,
      bootstrap: a.inputs.bootstrap?.resamples ?? null,
    },
    n: a.n,
    k: a.k,
    missing: a.missingData,
    alpha: a.alpha.value,
    alphaBand: a.alpha.band,
    alphaStandardized: a.alphaStandardized?.value ?? null,
    alphaStandardizedBand: a.alphaStandardized?.band ?? null,
    meanInterItemR: a.meanInterItemR,
    alphaCI: a.alphaCI,
    bootstrapCI: a.bootstrapCI,
    omegaTotal: a.omegaTotal?.value ?? null,
    omegaBand: a.omegaTotal?.band ?? null,
    omegaModel: a.omegaTotal
      ? {
          method: a.omegaTotal.fit.method,
          loadings: Object.fromEntries(
            a.omegaTotal.items.map((name, i) => [name, a.omegaTotal?.fit.loadings[i]]),
          ),
          iterations: a.omegaTotal.fit.iterations,
          converged: a.omegaTotal.fit.converged,
          heywood: a.omegaTotal.fit.heywood,
        }
      : null,
    splitHalf: a.splitHalf,
    sdTotal: a.measurementError?.sdTotal ?? null,
    sem: a.measurementError?.sem ?? null,
    mdc95: a.measurementError?.mdc95 ?? null,
    items: a.items.map((item) => ({
      name: item.name,
      reversed: loaded.reverse.includes(item.name),
      n: item.n,
      missing: item.missing,
      mean: item.mean,
      sd: item.sd,
      skewness: item.skewness,
      kurtosis: item.kurtosis,
      floorShare: item.floorShare,
      ceilingShare: item.ceilingShare,
      correctedItemTotal: item.correctedItemTotal,
      alphaIfDeleted: item.alphaIfDeleted,
    })),
    correlations: { items: loaded.names, matrix: a.correlations },
    seed,
    methods: methodsField(itemAnalysisMethods(a)),
  };
}

/** The readable, rounded table of `stats reliability`. */
export function reliabilityTable(loaded: LoadedItems, a: ItemAnalysis): string {
  const pct = `${Math.round(a.alphaCI.level * 100)}%`;
  const lines = [
    `Reliability of ${a.k} items from ${loaded.file}: n = ${a.n} (${a.missingData.method} deletion, ` +
      `${a.missingData.dropped} of ${a.missingData.respondents} respondents left out)`,
    '',
    `  alpha                 ${round(a.alpha.value)}  ${a.alpha.band}`,
    `    ${pct} CI            ${round(a.alphaCI.lower)} to ${round(a.alphaCI.upper)} (Feldt)`,
  ];
  if (a.bootstrapCI) {
    lines.push(
      `    ${pct} CI            ${round(a.bootstrapCI.lower)} to ${round(a.bootstrapCI.upper)} ` +
        `(percentile bootstrap, ${a.bootstrapCI.resamples} resamples, seed ${a.bootstrapCI.seed})`,
    );
  }
  lines.push(
    `  standardized alpha    ${round(a.alphaStandardized?.value)}  ${a.alphaStandardized?.band ?? ''}`,
    `  omega total           ${round(a.omegaTotal?.value)}  ${a.omegaTotal?.band ?? ''}`,
    `  mean inter-item r     ${round(a.meanInterItemR)}`,
  );
  if (a.splitHalf) {
    lines.push(
      `  split-half (odd–even) r = ${round(a.splitHalf.correlation)}, Spearman–Brown ${round(a.splitHalf.spearmanBrown)}`,
    );
  }
  if (a.measurementError) {
    lines.push(
      `  sum score SD ${round(a.measurementError.sdTotal, 2)}, SEM ${round(a.measurementError.sem, 2)}, ` +
        `MDC95 ${round(a.measurementError.mdc95, 2)}`,
    );
  }
  lines.push(
    '  (bands are common practice: ≥ .80 good, .70 acceptable, .60 questionable, below unacceptable)',
    '',
  );
  const rows = a.items.map((item) => [
    loaded.reverse.includes(item.name) ? `${item.name} (R)` : item.name,
    String(item.n),
    String(item.missing),
    round(item.mean, 2),
    round(item.sd, 2),
    round(item.skewness, 2),
    round(item.kurtosis, 2),
    percent(item.floorShare),
    percent(item.ceilingShare),
    round(item.correctedItemTotal),
    round(item.alphaIfDeleted),
  ]);
  lines.push(
    formatTable(
      [
        'item',
        'n',
        'missing',
        'mean',
        'sd',
        'skew',
        'kurtosis',
        'floor',
        'ceiling',
        'item-rest r',
        'alpha if dropped',
      ],
      rows,
      ['left', 'right', 'right', 'right', 'right', 'right', 'right', 'right', 'right', 'right', 'right'],
    ),
  );
  return lines.join('\n');
}

/** `stats reliability`: item analysis, alpha with Feldt (and optional bootstrap) CI, omega, split-half, SEM. */
export const reliability: StatsAnalysis = {
  name: 'reliability',
  summary: 'item analysis, alpha with CI, omega total, split-half, SEM',
  options: {
    'ci-level': { type: 'string' },
    bootstrap: { type: 'string' },
  },
  async run(values, ctx): Promise<StatsResult> {
    const ciLevel = numberOption(values, 'ci-level') ?? DEFAULT_CI_LEVEL;
    if (!(ciLevel > 0 && ciLevel < 1)) {
      throw new UsageError(`--ci-level must lie strictly between 0 and 1, e.g. 0.95 (got ${ciLevel})`);
    }
    const resamples = integerOption(values, 'bootstrap', MIN_BOOTSTRAP_RESAMPLES, MAX_BOOTSTRAP_RESAMPLES);
    const seed = seedOption(values);
    const loaded = await loadItemData(values, ctx);
    if (loaded.names.length < 2) {
      throw new UsageError(
        'reliability needs at least two items in --items (alpha requires at least two items)',
      );
    }
    let analysis: ItemAnalysis;
    try {
      analysis = analyseItems({
        names: loaded.names,
        data: loaded.data,
        missing: loaded.missing,
        ciLevel,
        bootstrap: resamples === undefined ? undefined : { resamples, seed },
        bounds: loaded.bounds ?? undefined,
      });
    } catch (error) {
      if (error instanceof EngineError) throw new DataError(`${loaded.file}: ${error.message}`);
      throw error;
    }
    const warnings = [...loaded.warnings, ...analysis.warnings];
    return {
      json: reliabilityJson(loaded, analysis, seed),
      table: reliabilityTable(loaded, analysis),
      warnings,
    };
  },
};
