import { EngineError } from '../../engine/errors.ts';
import { methodsField } from '../../engine/methods/index.ts';
import {
  analyseItems,
  DEFAULT_CI_LEVEL,
  type ItemAnalysis,
  itemAnalysisMethods,
} from '../../engine/reliability.ts';
import { MIN_BOOTSTRAP_RESAMPLES } from '../../engine/reliability/bootstrap.ts';
import { STAT_LABELS, bounded, count, percent, unbounded } from '../../api/format.ts';
import { meetsCriterion, reliabilityCriterion } from '../../engine/reliability/criterion.ts';
import { formatTable, wrap } from '../table.ts';
import { DataError, type StatsAnalysis, type StatsResult, UsageError } from '../types.ts';
import {
  COMMON_STATS_OPTIONS,
  integerOption,
  itemInputs,
  type LoadedItems,
  loadItemData,
  numberOption,
  seedOption,
  statsHead,
} from './data.ts';

/** Most resamples `--bootstrap` accepts (about a minute on 500 × 30 with pairwise deletion). */
export const MAX_BOOTSTRAP_RESAMPLES = 100_000;

/** The criterion a bare data file is read against: no use of scores can be stated for it. */
const CRITERION = reliabilityCriterion(null);

function versus(x: number | null | undefined): string {
  if (x === null || x === undefined || !Number.isFinite(x)) return '';
  return `${meetsCriterion(x, CRITERION) ? 'meets' : 'below'} ${bounded(CRITERION.minimum, 2)}*`;
}

/** The JSON object of `stats reliability --json` (warnings are added by the dispatcher). */
export function reliabilityJson(loaded: LoadedItems, a: ItemAnalysis, seed: number): Record<string, unknown> {
  return {
    ...statsHead('reliability', loaded, {
      ...itemInputs(loaded),
      ciLevel: a.inputs.ciLevel,
      bootstrap: a.inputs.bootstrap?.resamples ?? null,
    }),
    n: a.n,
    k: a.k,
    missing: a.missingData,
    alpha: a.alpha.value,
    alphaStandardized: a.alphaStandardized?.value ?? null,
    meanInterItemR: a.meanInterItemR,
    alphaCI: a.alphaCI,
    bootstrapCI: a.bootstrapCI,
    omegaTotal: a.omegaTotal?.value ?? null,
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
    lambda2: a.lambda2?.value ?? null,
    lambda6: a.lambda6?.value ?? null,
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
    criterion: {
      id: CRITERION.ruleId,
      use: CRITERION.use,
      stated: CRITERION.stated,
      minimum: CRITERION.minimum,
      reason: CRITERION.reason,
      alphaMeets: meetsCriterion(a.alpha.value, CRITERION),
    },
    seed,
    methods: methodsField([...itemAnalysisMethods(a), CRITERION.ruleId]),
  };
}

/** The readable, rounded table of `stats reliability`: coefficients, then two item tables. */
export function reliabilityTable(loaded: LoadedItems, a: ItemAnalysis): string {
  const L = STAT_LABELS;
  const pct = `${Math.round(a.alphaCI.level * 100)}% CI`;
  const row = (label: string, value: string, note = '') =>
    `  ${label.padEnd(24)}${value.padStart(6)}  ${note}`.trimEnd();
  const lines = [
    ...wrap(
      `Reliability of ${a.k} items from ${loaded.file}: n = ${count(a.n)} (${a.missingData.method} deletion, ` +
        `${count(a.missingData.dropped)} of ${count(a.missingData.respondents)} respondents left out)`,
      100,
    ),
    '',
    row(L.alpha, bounded(a.alpha.value), versus(a.alpha.value)),
    row(`  ${pct} (Feldt)`, '', `${bounded(a.alphaCI.lower)} to ${bounded(a.alphaCI.upper)}`),
  ];
  if (a.bootstrapCI) {
    lines.push(
      row(
        `  ${pct}`,
        '',
        `${bounded(a.bootstrapCI.lower)} to ${bounded(a.bootstrapCI.upper)} ` +
          `(percentile bootstrap, ${count(a.bootstrapCI.resamples)} resamples, seed ${a.bootstrapCI.seed})`,
      ),
    );
  }
  lines.push(
    row(L.alphaStandardized, bounded(a.alphaStandardized?.value), versus(a.alphaStandardized?.value)),
    row(L.omegaTotal, bounded(a.omegaTotal?.value), versus(a.omegaTotal?.value)),
    row(L.meanInterItemR, bounded(a.meanInterItemR)),
  );
  if (a.splitHalf) {
    lines.push(
      row(
        'Split-half (odd–even) r',
        bounded(a.splitHalf.correlation),
        `Spearman–Brown ${bounded(a.splitHalf.spearmanBrown)}`,
      ),
    );
  }
  lines.push(
    row('Guttman’s λ₂', bounded(a.lambda2?.value), versus(a.lambda2?.value)),
    row('Guttman’s λ₆', bounded(a.lambda6?.value), versus(a.lambda6?.value)),
  );
  if (a.measurementError) {
    lines.push(
      row(
        `${L.sem} (sum score)`,
        unbounded(a.measurementError.sem),
        `SD ${unbounded(a.measurementError.sdTotal)}, ${L.mdc95} ${unbounded(a.measurementError.mdc95)}`,
      ),
    );
  }
  lines.push(
    '',
    ...wrap(
      `* Criterion ${bounded(CRITERION.minimum, 2)} for ${CRITERION.useName}. ${CRITERION.wording} ${CRITERION.reason} Source: ${CRITERION.reference}`,
      100,
    ),
    '',
  );
  const name = (item: string) => (loaded.reverse.includes(item) ? `${item} (R)` : item);
  lines.push(
    formatTable(
      ['Item', L.n, L.missing, L.mean, L.sd, L.skewness, L.kurtosis, L.floor, L.ceiling],
      a.items.map((item) => [
        name(item.name),
        count(item.n),
        count(item.missing),
        unbounded(item.mean),
        unbounded(item.sd),
        unbounded(item.skewness),
        unbounded(item.kurtosis),
        percent(item.floorShare),
        percent(item.ceilingShare),
      ]),
      ['left', 'right', 'right', 'right', 'right', 'right', 'right', 'right', 'right'],
    ),
    '',
    formatTable(
      ['Item', L.correctedItemTotal, L.alphaIfDeleted],
      a.items.map((item) => [
        name(item.name),
        bounded(item.correctedItemTotal),
        bounded(item.alphaIfDeleted),
      ]),
      ['left', 'right', 'right'],
    ),
  );
  return lines.join('\n');
}

/** `stats reliability`: item analysis, alpha with Feldt (and optional bootstrap) CI, omega, split-half, SEM. */
export const reliability: StatsAnalysis = {
  name: 'reliability',
  summary: 'item analysis, alpha with CI, omega total, split-half, SEM',
  options: {
    ...COMMON_STATS_OPTIONS,
    'ci-level': {
      type: 'string',
      value: 'L',
      description: `level of the alpha confidence intervals, between 0 and 1 (default ${DEFAULT_CI_LEVEL})`,
    },
    bootstrap: {
      type: 'string',
      value: 'B',
      description: `also a percentile bootstrap interval for alpha from B resamples (${MIN_BOOTSTRAP_RESAMPLES} to ${MAX_BOOTSTRAP_RESAMPLES}), seeded by --seed`,
    },
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
        data: loaded.answers,
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
