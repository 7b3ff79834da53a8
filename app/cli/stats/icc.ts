import { EngineError } from '../../engine/errors.ts';
import { bounded, pCell, unbounded } from '../../api/format.ts';
import { sourceNoteLines } from '../../api/source-notes.ts';
import {
  DEFAULT_ICC_LEVEL,
  type IccResult,
  iccMeasurementError,
  intraclassCorrelations,
} from '../../engine/icc.ts';
import { methodsField } from '../../engine/methods/index.ts';
import type { MeasurementError } from '../../engine/reliability/sem.ts';
import { formatTable } from '../table.ts';
import { DataError, type StatsAnalysis, UsageError } from '../types.ts';
import { commonStatsOptionsExcept, type LoadedItems, loadItemData, numberOption, statsHead } from './data.ts';

/** The form whose SEM and MDC are reported: two-way random, absolute agreement, single measure. */
const SEM_FORM = 'ICC(2,1)';

/** Common stats options that do not apply here; naming them is a usage error, not a silent no-op. */
const NOT_FOR_ICC: Record<string, string> = {
  items: 'name the raters or occasions with --columns',
  reverse: 'ratings of the same targets are not reverse-keyed',
  seed: 'intraclass correlations have no random step',
};

/** What `stats icc --help` says after the options. */
const NOTES = `The six intraclass correlations of Shrout & Fleiss (1979), ICC(1,1) ... ICC(3,k), with confidence
intervals and F tests (McGraw & Wong 1996), and the standard error of measurement and minimal
detectable change from ICC(2,1). One row per target (respondent, item or case); one column per
rater or occasion (test and retest).

SEM = SD·√(1 − ICC) with the SD pooled over occasions; MDC95 = 1.96·√2·SEM (common practice).
Reliability supports, but does not establish, fitness for a use; a new scale is not validated for
diagnosis, hiring, admission or other high-stakes decisions about people.`;

interface IccOutput {
  result: IccResult;
  measurement: MeasurementError;
  dropped: number;
}

/** The JSON object of `stats icc --json` (warnings are added by the dispatcher). */
export function iccJson(loaded: LoadedItems, out: IccOutput): Record<string, unknown> {
  const { result } = out;
  return {
    ...statsHead('icc', loaded, {
      columns: loaded.names,
      bounds: loaded.bounds,
      missing: 'listwise',
      missingCodes: loaded.missingCodes,
      ciLevel: result.level,
    }),
    n: result.n,
    k: result.k,
    missing: { method: 'listwise', targets: loaded.data.length, dropped: out.dropped },
    meanSquares: {
      betweenTargets: result.bms,
      withinTargets: result.wms,
      betweenRaters: result.jms,
      residual: result.ems,
    },
    forms: result.forms,
    measurementError: {
      basis: SEM_FORM,
      reliability: out.measurement.reliability,
      sdPooled: out.measurement.sdTotal,
      sem: out.measurement.sem,
      mdc95: out.measurement.mdc95,
    },
    methods: methodsField(['icc.shrout-fleiss', 'icc.mcgraw-wong-ci', 'icc.sem', 'icc.mdc95']),
  };
}

/** The readable, rounded table of `stats icc`. */
export function iccTable(loaded: LoadedItems, out: IccOutput): string {
  const { result } = out;
  const pct = `${Math.round(result.level * 100)}%`;
  return [
    `Intraclass correlations of ${result.k} columns (${loaded.names.join(', ')}) from ${loaded.file}`.slice(
      0,
      100,
    ),
    `n = ${result.n} targets (listwise: ${out.dropped} of ${loaded.data.length} left out)`,
    '',
    formatTable(
      ['form', 'model', 'type', 'unit', 'ICC', `${pct} CI`, 'F', 'df1', 'df2', 'p'],
      result.forms.map((f) => [
        f.form,
        f.model,
        f.type,
        f.unit,
        bounded(f.value),
        `${bounded(f.lower)} to ${bounded(f.upper)}`,
        unbounded(f.F),
        String(f.df1),
        String(f.df2),
        pCell(f.p),
      ]),
      ['left', 'left', 'left', 'left', 'right', 'right', 'right', 'right', 'right', 'right'],
    ),
    '',
    `  from ${SEM_FORM}: pooled SD ${unbounded(out.measurement.sdTotal)}, SEM ${unbounded(out.measurement.sem)}, ` +
      `MDC95 ${unbounded(out.measurement.mdc95)}`,
    '',
    'Methods and rules of thumb shown (sources in the numbered notes)',
    ...sourceNoteLines(['icc.shrout-fleiss', 'icc.mcgraw-wong-ci', 'icc.sem', 'icc.mdc95']),
    '',
    'A new scale is not validated for diagnosis, hiring, admission or other high-stakes decisions.',
  ].join('\n');
}

/** `stats icc`: the six intraclass correlations with intervals, F tests, SEM and MDC95. */
export const icc: StatsAnalysis = {
  name: 'icc',
  summary: 'intraclass correlations (six forms) with intervals, SEM and MDC95',
  notes: NOTES,
  options: {
    ...commonStatsOptionsExcept(...Object.keys(NOT_FOR_ICC)),
    data: {
      type: 'string',
      value: 'FILE',
      required: true,
      description: 'a CSV or TSV file with a header row, one row per target (respondent, item or case)',
    },
    missing: {
      type: 'string',
      value: 'listwise',
      description: 'targets missing any rating are left out (the only method here)',
    },
    columns: {
      type: 'string',
      value: 'a,b,c',
      required: true,
      description: 'the rater or occasion columns (at least two)',
    },
    'ci-level': {
      type: 'string',
      value: 'L',
      description: `confidence level of the intervals (default ${DEFAULT_ICC_LEVEL})`,
    },
  },
  refused: NOT_FOR_ICC,
  async run(values, ctx) {
    if (values.missing === 'pairwise') {
      throw new UsageError(
        'stats icc uses complete targets only (--missing listwise): every target needs every rating',
      );
    }
    const level = numberOption(values, 'ci-level') ?? DEFAULT_ICC_LEVEL;
    if (!(level > 0 && level < 1)) {
      throw new UsageError(`--ci-level must lie strictly between 0 and 1, e.g. 0.95 (got ${level})`);
    }
    const loaded = await loadItemData(values, ctx, { itemsOption: 'columns' });
    if (loaded.names.length < 2)
      throw new UsageError('--columns needs at least two rater or occasion columns');
    const complete = loaded.data.filter((row) => row.every((v) => v !== null)) as number[][];
    const dropped = loaded.data.length - complete.length;
    const warnings = [...loaded.warnings];
    if (dropped > 0) warnings.push(`${dropped} target(s) with a missing rating were left out (listwise)`);
    let out: IccOutput;
    try {
      const result = intraclassCorrelations(complete, level);
      const basis = result.forms.find((f) => f.form === SEM_FORM);
      if (!basis) throw new EngineError(`${SEM_FORM} is missing from the results`);
      if (basis.value < 0)
        warnings.push(`${SEM_FORM} is negative (${bounded(basis.value)}); the SEM then exceeds the SD`);
      out = { result, measurement: iccMeasurementError(complete, Math.min(basis.value, 1)), dropped };
    } catch (error) {
      if (error instanceof EngineError) throw new DataError(`${loaded.file}: ${error.message}`);
      throw error;
    }
    if (out.result.n < 10) warnings.push(`only ${out.result.n} targets; the intervals are wide`);
    return { json: iccJson(loaded, out), table: iccTable(loaded, out), warnings };
  },
};
