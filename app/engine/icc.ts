import { fQuantile, fSf } from './distributions.ts';
import { EngineError } from './errors.ts';
import { kahanSum } from './numeric.ts';
import { type MeasurementError, measurementError } from './reliability/sem.ts';

/** Confidence level of the ICC intervals unless the caller chooses another. */
export const DEFAULT_ICC_LEVEL = 0.95;

export type IccFormName = 'ICC(1,1)' | 'ICC(2,1)' | 'ICC(3,1)' | 'ICC(1,k)' | 'ICC(2,k)' | 'ICC(3,k)';

/** One of the six intraclass correlations with its interval and F test. */
export interface IccForm {
  form: IccFormName;
  /** Which analysis-of-variance model the form rests on. */
  model: 'one-way random' | 'two-way random' | 'two-way mixed';
  /** Absolute agreement (rater differences count as error) or consistency (they do not). */
  type: 'agreement' | 'consistency';
  /** The reliability of one rater's score or of the mean of the k raters. */
  unit: 'single' | 'average';
  value: number;
  lower: number;
  upper: number;
  /** F statistic for H0: ICC = 0, with its degrees of freedom and p value. */
  F: number;
  df1: number;
  df2: number;
  p: number;
}

/** The two-way analysis of variance of a targets × raters table. */
export interface IccAnova {
  /** Targets (rows) and raters or occasions (columns). */
  n: number;
  k: number;
  /** Mean squares: between targets, within targets, between raters, residual. */
  bms: number;
  wms: number;
  jms: number;
  ems: number;
}

export interface IccResult extends IccAnova {
  level: number;
  forms: IccForm[];
}

/**
 * The mean squares of a complete targets × raters table (rows are targets, columns raters or
 * occasions), as laid out by Shrout & Fleiss (1979, Table 1). Registry: `icc.shrout-fleiss`.
 *
 * Cost: O(n·k). Throws EngineError with fewer than two targets or two raters, on ragged rows or
 * missing or non-finite values (naming row and column), when every target has the same mean rating,
 * or when there is no residual variation (perfect agreement or consistency).
 */
export function iccAnova(data: (number | null)[][]): IccAnova {
  const n = data.length;
  if (n < 2) throw new EngineError(`intraclass correlations need at least two targets (rows); got ${n}`);
  const k = data[0].length;
  if (k < 2) throw new EngineError(`intraclass correlations need at least two raters (columns); got ${k}`);
  data.forEach((row, i) => {
    if (row.length !== k) throw new EngineError(`row ${i + 1} has ${row.length} values; expected ${k}`);
    row.forEach((v, j) => {
      if (v === null || !Number.isFinite(v)) {
        throw new EngineError(
          `row ${i + 1}, column ${j + 1} has no usable value; intraclass correlations need every target rated by every rater`,
        );
      }
    });
  });
  const values = data as number[][];
  const grand = kahanSum(values.map((row) => kahanSum(row))) / (n * k);
  const rowMeans = values.map((row) => kahanSum(row) / k);
  const colMeans = Array.from({ length: k }, (_, j) => kahanSum(values.map((row) => row[j])) / n);
  const ssRows = k * kahanSum(rowMeans.map((m) => (m - grand) ** 2));
  const ssCols = n * kahanSum(colMeans.map((m) => (m - grand) ** 2));
  const ssTotal = kahanSum(values.flatMap((row) => row.map((v) => (v - grand) ** 2)));
  const ssWithin = ssTotal - ssRows;
  const ssError = Math.max(0, ssTotal - ssRows - ssCols);
  const bms = ssRows / (n - 1);
  if (!(bms > 0)) throw new EngineError('every target has the same mean rating; the ICC is undefined');
  const ems = ssError / ((n - 1) * (k - 1));
  if (!(ems > 0)) {
    throw new EngineError(
      'the ratings have no residual variation (the raters agree exactly or differ by a constant); ' +
        'the two-way ICCs are 1 and have no interval',
    );
  }
  return {
    n,
    k,
    bms,
    wms: Math.max(0, ssWithin) / (n * (k - 1)),
    jms: ssCols / (k - 1),
    ems,
  };
}

/**
 * A single-measure and an average-measure ICC whose intervals follow from the F ratio alone, as for
 * the one-way random model and the two-way consistency forms (McGraw & Wong 1996, Table 7):
 * with F_L = F / F(q; df1, df2) and F_U = F · F(q; df2, df1), the single-measure limits are
 * (F_L − 1)/(F_L + k − 1) and (F_U − 1)/(F_U + k − 1), the average-measure limits 1 − 1/F_L and
 * 1 − 1/F_U. Registry: `icc.mcgraw-wong-ci`.
 */
function fIntervalPair(
  names: [IccFormName, IccFormName],
  model: IccForm['model'],
  type: IccForm['type'],
  test: { F: number; df1: number; df2: number; p: number },
  q: number,
  k: number,
  values: { single: number; average: number },
): IccForm[] {
  const fl = test.F / fQuantile(q, test.df1, test.df2);
  const fu = test.F * fQuantile(q, test.df2, test.df1);
  return [
    {
      form: names[0],
      model,
      type,
      unit: 'single',
      value: values.single,
      lower: (fl - 1) / (fl + k - 1),
      upper: (fu - 1) / (fu + k - 1),
      ...test,
    },
    {
      form: names[1],
      model,
      type,
      unit: 'average',
      value: values.average,
      lower: 1 - 1 / fl,
      upper: 1 - 1 / fu,
      ...test,
    },
  ];
}

/**
 * The six intraclass correlations of Shrout & Fleiss (1979), ICC(1,1) … ICC(3,k), with confidence
 * intervals and F tests from McGraw & Wong (1996, Tables 7 and 8; the agreement interval of the
 * two-way random model uses Satterthwaite's degrees of freedom, its average-measure limits follow by
 * the Spearman–Brown step). Registry: `icc.shrout-fleiss`, `icc.mcgraw-wong-ci`.
 *
 * Check: Shrout & Fleiss's Table 2 (6 targets × 4 judges) gives .17, .29, .71, .44, .62, .91.
 * Cost: O(n·k). Throws what iccAnova throws, and EngineError for a level outside (0, 1).
 *
 * @example intraclassCorrelations([[9, 2, 5, 8], [6, 1, 3, 2], …]).forms[1].value // ≈ 0.29
 */
export function intraclassCorrelations(data: (number | null)[][], level = DEFAULT_ICC_LEVEL): IccResult {
  if (!(level > 0 && level < 1))
    throw new EngineError(`a confidence level must lie strictly between 0 and 1 (got ${level})`);
  const a = iccAnova(data);
  const { n, k, bms, wms, jms, ems } = a;
  const q = 1 - (1 - level) / 2;
  const forms: IccForm[] = [];

  // One-way random model: F = BMS/WMS on (n − 1, n(k − 1)).
  {
    const df1 = n - 1;
    const df2 = n * (k - 1);
    const F = bms / wms;
    const test = { F, df1, df2, p: fSf(F, df1, df2) };
    forms.push(
      ...fIntervalPair(['ICC(1,1)', 'ICC(1,k)'], 'one-way random', 'agreement', test, q, k, {
        single: (bms - wms) / (bms + (k - 1) * wms),
        average: (bms - wms) / bms,
      }),
    );
  }

  const df1 = n - 1;
  const df2 = (n - 1) * (k - 1);
  const F = bms / ems;
  const p = fSf(F, df1, df2);

  // Two-way random model, absolute agreement (McGraw & Wong's ICC(A,1) and ICC(A,k)).
  {
    const value = (bms - ems) / (bms + (k - 1) * ems + (k * (jms - ems)) / n);
    const aa = (k * value) / (n * (1 - value));
    const bb = 1 + (k * value * (n - 1)) / (n * (1 - value));
    const v =
      (aa * jms + bb * ems) ** 2 / ((aa * jms) ** 2 / (k - 1) + (bb * ems) ** 2 / ((n - 1) * (k - 1)));
    const fStar = fQuantile(q, n - 1, v);
    const fStar2 = fQuantile(q, v, n - 1);
    const lower = (n * (bms - fStar * ems)) / (fStar * (k * jms + (k * n - k - n) * ems) + n * bms);
    const upper = (n * (fStar2 * bms - ems)) / (k * jms + (k * n - k - n) * ems + n * fStar2 * bms);
    forms.push({
      form: 'ICC(2,1)',
      model: 'two-way random',
      type: 'agreement',
      unit: 'single',
      value,
      lower,
      upper,
      F,
      df1,
      df2,
      p,
    });
    const up = (r: number) => (k * r) / (1 + (k - 1) * r);
    forms.push({
      form: 'ICC(2,k)',
      model: 'two-way random',
      type: 'agreement',
      unit: 'average',
      value: (bms - ems) / (bms + (jms - ems) / n),
      lower: up(lower),
      upper: up(upper),
      F,
      df1,
      df2,
      p,
    });
  }

  // Two-way mixed model, consistency (McGraw & Wong's ICC(C,1) and ICC(C,k)).
  forms.push(
    ...fIntervalPair(['ICC(3,1)', 'ICC(3,k)'], 'two-way mixed', 'consistency', { F, df1, df2, p }, q, k, {
      single: (bms - ems) / (bms + (k - 1) * ems),
      average: (bms - ems) / bms,
    }),
  );

  const order: IccFormName[] = ['ICC(1,1)', 'ICC(2,1)', 'ICC(3,1)', 'ICC(1,k)', 'ICC(2,k)', 'ICC(3,k)'];
  forms.sort((x, y) => order.indexOf(x.form) - order.indexOf(y.form));
  return { ...a, level, forms };
}

/**
 * Standard error of measurement and minimal detectable change from an intraclass correlation, for
 * test–retest data: SD is pooled over the occasions (the root mean of the column variances, divisor
 * n − 1), SEM = SD·√(1 − ICC), MDC95 = 1.96·√2·SEM. Registry: `icc.sem`, `icc.mdc95`.
 *
 * Cost: O(n·k). Throws EngineError as iccAnova does, and when the ICC is above 1.
 */
export function iccMeasurementError(data: (number | null)[][], icc: number): MeasurementError {
  const { n, k } = iccAnova(data);
  const values = data as number[][];
  const variances = Array.from({ length: k }, (_, j) => {
    const column = values.map((row) => row[j]);
    const m = kahanSum(column) / n;
    return kahanSum(column.map((v) => (v - m) ** 2)) / (n - 1);
  });
  const sd = Math.sqrt(kahanSum(variances) / k);
  return measurementError(sd, icc, 'icc');
}
