import { bounded, NO_VALUE, pCell, pValue, unbounded } from '../../api/format.ts';
import { sourceNoteLines } from '../../api/source-notes.ts';
import {
  constructReliability,
  covarianceToCorrelation,
  type FactorReliability,
  type HtmtPair,
  HTMT_THRESHOLDS,
  htmt,
} from '../../engine/cfa/construct-reliability.ts';
import { type CfaResult, fitCfa } from '../../engine/cfa/fit.ts';
import { FIT_CUTOFFS, RMSEA_BANDS } from '../../engine/cfa/fit-indices.ts';
import { type InvarianceResult, measurementInvariance } from '../../engine/cfa/invariance.ts';
import {
  type CfaModel,
  completeCases,
  type GroupMoments,
  modelItems,
  sampleMoments,
} from '../../engine/cfa/model.ts';
import { EngineError } from '../../engine/errors.ts';
import { methodsField } from '../../engine/methods/index.ts';
import { parseTable } from '../../import/parse-table.ts';
import { readUserFile } from '../files.ts';
import { formatTable } from '../table.ts';
import { type CliContext, DataError, type OptionValues, type StatsAnalysis, UsageError } from '../types.ts';
import { commonStatsOptionsExcept, type LoadedItems, loadItemData, statsHead } from './data.ts';

/** Widest line of the readable output. */
const WIDTH = 100;

/** Common stats options that do not apply here; naming them is a usage error, not a silent no-op. */
const NOT_FOR_CFA: Record<string, string> = {
  items: 'the items come from the model file (--model)',
  seed: 'confirmatory factor analysis has no random step',
};

/** What `stats cfa --help` says after the options. */
const NOTES = `Maximum-likelihood confirmatory factor analysis of a measurement model: chi-square, CFI, TLI, RMSEA
with 90% CI, SRMR, standardized loadings with standard errors, factor correlations, composite
reliability, AVE, the Fornell-Larcker comparison, HTMT, residual correlations and modification hints.

Cut-offs shown: CFI and TLI >= .95, RMSEA <= .06, SRMR <= .08; the table's numbered notes give the sources.
Fit supports, but does not establish, validity; a new scale is not validated for diagnosis, hiring,
admission or other high-stakes decisions about people.`;

function text(values: OptionValues, name: string): string | undefined {
  const value = values[name];
  if (value === undefined || value === false) return undefined;
  if (value === true) throw new UsageError(`--${name} needs a value`);
  return value;
}

/** Line and column (1-based) of a character offset. */
function lineColumn(source: string, offset: number): string {
  const before = source.slice(0, offset);
  const line = before.split('\n').length;
  return `line ${line}, column ${offset - before.lastIndexOf('\n')}`;
}

/**
 * Where JSON text first goes wrong: the shortest prefix that fails for a reason other than ending too
 * soon ends at the offending character (a prefix that parses is also just "not finished yet"). Null when
 * only the end is missing. Binary search: O(n log n) for n characters.
 */
function syntaxErrorOffset(source: string): number | null {
  const unfinished = (prefix: string) => {
    try {
      JSON.parse(prefix);
      return true;
    } catch (error) {
      return /end of (JSON )?input/i.test((error as Error).message);
    }
  };
  if (unfinished(source)) return null;
  let lo = 0;
  let hi = source.length - 1;
  while (lo < hi) {
    const mid = (lo + hi) >> 1;
    if (unfinished(source.slice(0, mid + 1))) lo = mid + 1;
    else hi = mid;
  }
  return lo;
}

/**
 * Reads and checks a model file: valid JSON holding `factors` (an object of factor name → non-empty
 * array of column names), optionally `residualCovariances` (an array of {a, b, rationale?}) and
 * `orthogonal` (boolean). Every problem names the file and where in it.
 */
export function parseModelFile(file: string, source: string): CfaModel {
  let raw: unknown;
  try {
    raw = JSON.parse(source);
  } catch {
    const offset = syntaxErrorOffset(source);
    if (offset === null)
      throw new DataError(`${file} is not valid JSON: it ends before the model is complete`);
    throw new DataError(
      `${file} is not valid JSON at ${lineColumn(source, offset)}: unexpected ${JSON.stringify(source[offset])}`,
    );
  }
  const shape = `expected {"factors": {"F1": ["c1", "c2", "c3"], ...}}`;
  if (raw === null || typeof raw !== 'object' || Array.isArray(raw)) {
    throw new DataError(`${file}: the model must be a JSON object; ${shape}`);
  }
  const obj = raw as Record<string, unknown>;
  for (const key of Object.keys(obj)) {
    if (!['factors', 'residualCovariances', 'orthogonal'].includes(key)) {
      throw new DataError(
        `${file}: unknown key "${key}"; the keys are factors, residualCovariances, orthogonal`,
      );
    }
  }
  const factors = obj.factors;
  if (factors === null || typeof factors !== 'object' || Array.isArray(factors)) {
    throw new DataError(`${file}: "factors" is missing or not an object; ${shape}`);
  }
  const entries = Object.entries(factors as Record<string, unknown>);
  if (entries.length === 0) throw new DataError(`${file}: "factors" names no factor; ${shape}`);
  const model: CfaModel = { factors: [] };
  for (const [name, items] of entries) {
    if (name.trim() === '') throw new DataError(`${file}: factors has a factor with an empty name`);
    if (!Array.isArray(items) || items.length === 0) {
      throw new DataError(`${file}: factors.${name} must be a non-empty array of column names`);
    }
    items.forEach((item, i) => {
      if (typeof item !== 'string' || item.trim() === '') {
        throw new DataError(`${file}: factors.${name}[${i}] must be a column name (a non-empty string)`);
      }
    });
    model.factors.push({ name, items: items as string[] });
  }
  if (obj.orthogonal !== undefined) {
    if (typeof obj.orthogonal !== 'boolean')
      throw new DataError(`${file}: "orthogonal" must be true or false`);
    model.orthogonal = obj.orthogonal;
  }
  if (obj.residualCovariances !== undefined) {
    if (!Array.isArray(obj.residualCovariances)) {
      throw new DataError(
        `${file}: "residualCovariances" must be an array of {"a": item, "b": item, "rationale": text}`,
      );
    }
    model.residualCovariances = obj.residualCovariances.map((rc, i) => {
      const where = `${file}: residualCovariances[${i}]`;
      if (rc === null || typeof rc !== 'object' || Array.isArray(rc)) {
        throw new DataError(`${where} must be an object {"a": item, "b": item, "rationale": text}`);
      }
      const { a, b, rationale } = rc as Record<string, unknown>;
      if (typeof a !== 'string' || typeof b !== 'string')
        throw new DataError(`${where} needs "a" and "b" as item names`);
      if (rationale !== undefined && typeof rationale !== 'string') {
        throw new DataError(`${where}.rationale must be text`);
      }
      return { a, b, rationale: rationale as string | undefined };
    });
  }
  try {
    modelItems(model);
  } catch (error) {
    if (error instanceof EngineError) throw new DataError(`${file}: ${error.message}`);
    throw error;
  }
  return model;
}

function fitLine(label: string, value: number | null, rule: string, ok: boolean | null): string {
  return `  ${label.padEnd(8)} ${bounded(value).padStart(7)}   ${rule}${ok === null ? '' : ok ? '  met' : '  not met'}`;
}

function cut(line: string): string {
  return line.length > WIDTH ? `${line.slice(0, WIDTH - 1)}…` : line;
}

function short(name: string, width = 12): string {
  return name.length > width ? `${name.slice(0, width - 1)}…` : name;
}

/** Invariance groups: the --group column's value for each complete respondent. */
async function groupLabels(loaded: LoadedItems, column: string, ctx: CliContext): Promise<(string | null)[]> {
  const bytes = await readUserFile(loaded.file, 'data file', ctx);
  const table = parseTable(bytes, { fileName: loaded.file });
  const at = table.header.indexOf(column);
  if (at < 0) {
    throw new DataError(
      `${loaded.file}: no column named "${column}" (--group); the columns are ${table.header.join(', ')}`,
    );
  }
  const byRow = new Map<number, string>();
  const rowNumbers = table.rowNumbers ?? table.rows.map((_, i) => i + 2);
  table.rows.forEach((row, i) => {
    byRow.set(rowNumbers[i], (row[at] ?? '').trim());
  });
  return loaded.rowNumbers.map((r) => {
    const v = byRow.get(r) ?? '';
    return v === '' || loaded.missingCodes.includes(v) ? null : v;
  });
}

interface CfaOutput {
  fit: CfaResult;
  reliability: FactorReliability[];
  htmt: HtmtPair[];
  invariance: InvarianceResult | null;
  dropped: number;
  respondents: number;
  groupColumn: string | null;
}

function methodIds(out: CfaOutput): string[] {
  const ids = [
    'cfa.ml',
    'cfa.chi-square',
    'fit.cfi',
    'fit.tli',
    'rmsea.steiger',
    'fit.srmr',
    'cfa.cutoffs',
    'rmsea.bands',
    'cfa.modification-indices',
    'cr.composite',
    'ave',
    'fornell-larcker',
    'cr.criterion',
    'htmt',
  ];
  if (out.invariance) ids.push('cfa.invariance', 'invariance.delta-cfi');
  return ids;
}

/** The JSON object of `stats cfa --json` (warnings are added by the dispatcher). */
export function cfaJson(
  loaded: LoadedItems,
  modelFile: string,
  model: CfaModel,
  out: CfaOutput,
): Record<string, unknown> {
  const { fit } = out;
  const g = fit.groups[0];
  const first = new Map<string, number>();
  for (const l of fit.loadings) if (!first.has(l.item)) first.set(l.item, l.standardized);
  return {
    ...statsHead('cfa', loaded, {
      model: modelFile,
      factors: Object.fromEntries(model.factors.map((f) => [f.name, f.items])),
      residualCovariances: model.residualCovariances ?? [],
      orthogonal: model.orthogonal ?? false,
      reverse: loaded.reverse,
      bounds: loaded.bounds,
      missing: 'listwise',
      missingCodes: loaded.missingCodes,
      group: out.groupColumn,
    }),
    n: fit.n,
    missing: { method: 'listwise', respondents: out.respondents, dropped: out.dropped },
    chiSquare: fit.chiSquare,
    df: fit.df,
    p: fit.p,
    baseline: fit.baseline,
    cfi: fit.cfi,
    tli: fit.tli,
    rmsea: fit.rmsea,
    rmseaCI: fit.rmseaCI,
    srmr: fit.srmr,
    cutoffs: { ...FIT_CUTOFFS, rmseaClose: RMSEA_BANDS.close, rmseaReasonable: RMSEA_BANDS.reasonable },
    converged: fit.converged,
    iterations: fit.iterations,
    improper: fit.improper,
    unidentified: fit.unidentified,
    factors: fit.factors,
    standardizedLoadings: Object.fromEntries(first),
    loadings: fit.loadings.map((l) => ({
      item: l.item,
      factor: l.factor,
      estimate: l.estimate,
      se: l.se,
      standardized: l.standardized,
      standardizedSE: l.standardizedSE,
    })),
    factorCorrelations: g.factorCorrelations,
    residualVariances: Object.fromEntries(fit.items.map((item, i) => [item, g.residualVariances[i]])),
    compositeReliability: Object.fromEntries(out.reliability.map((r) => [r.factor, r.compositeReliability])),
    ave: Object.fromEntries(out.reliability.map((r) => [r.factor, r.ave])),
    fornellLarcker: out.reliability.map((r) => ({
      factor: r.factor,
      sqrtAve: r.sqrtAve,
      maxCorrelation: r.maxCorrelation,
      met: r.fornellLarcker,
    })),
    htmt: out.htmt,
    htmtThresholds: HTMT_THRESHOLDS,
    residualCorrelations: { items: fit.items, matrix: g.residualCorrelations },
    modificationHints: fit.hints,
    parameters: fit.parameters,
    invariance: out.invariance
      ? {
          groups: out.invariance.groups,
          level: out.invariance.level,
          statement: out.invariance.statement,
          steps: out.invariance.steps.map((s) => ({
            step: s.step,
            chiSquare: s.fit.chiSquare,
            df: s.fit.df,
            cfi: s.fit.cfi,
            rmsea: s.fit.rmsea,
            srmr: s.fit.srmr,
            deltaChiSquare: s.deltaChiSquare,
            deltaDf: s.deltaDf,
            deltaP: s.deltaP,
            deltaCfi: s.deltaCfi,
            deltaRmsea: s.deltaRmsea,
            holds: s.holds,
          })),
        }
      : null,
    methods: methodsField(methodIds(out)),
  };
}

/** The readable, rounded tables of `stats cfa`, each line at most 100 columns. */
export function cfaTable(loaded: LoadedItems, out: CfaOutput): string {
  const { fit } = out;
  const g = fit.groups[0];
  const lines: string[] = [
    `Confirmatory factor analysis (ML) of ${fit.items.length} items, ${fit.factors.length} factor(s), from ${loaded.file}`,
    `n = ${fit.n} (listwise: ${out.dropped} of ${out.respondents} respondents left out)` +
      `${fit.converged ? `, converged in ${fit.iterations} steps` : ', DID NOT CONVERGE'}`,
    '',
    `  chi-square ${unbounded(fit.chiSquare)} on ${fit.df} df, ${pValue(fit.p)}`,
    fitLine('CFI', fit.cfi, '≥ .95', fit.cfi === null ? null : fit.cfi >= FIT_CUTOFFS.cfi),
    fitLine('TLI', fit.tli, '≥ .95', fit.tli === null ? null : fit.tli >= FIT_CUTOFFS.tli),
    `${fitLine('RMSEA', fit.rmsea, '≤ .06', fit.rmsea === null ? null : fit.rmsea <= FIT_CUTOFFS.rmsea)}` +
      `   90% CI ${bounded(fit.rmseaCI?.[0])} to ${bounded(fit.rmseaCI?.[1])}`,
    fitLine('SRMR', fit.srmr, '≤ .08', fit.srmr <= FIT_CUTOFFS.srmr),
    '',
    formatTable(
      ['item', 'factor', 'loading', 'SE', 'std. loading', 'SE', 'residual var.'],
      fit.loadings.map((l) => [
        short(l.item, 20),
        short(l.factor, 20),
        unbounded(l.estimate, 3),
        unbounded(l.se, 3),
        bounded(l.standardized),
        bounded(l.standardizedSE),
        bounded(g.standardizedResidualVariances[fit.items.indexOf(l.item)]),
      ]),
      ['left', 'left', 'right', 'right', 'right', 'right', 'right'],
    ),
    '',
  ];
  if (fit.factors.length > 1) {
    const shown = fit.factors.slice(0, 7);
    lines.push(
      'Factor correlations',
      formatTable(
        ['', ...shown.map((f) => short(f))],
        shown.map((f, j) => [short(f), ...shown.map((_, k) => bounded(g.factorCorrelations[j][k], 2))]),
        ['left', ...shown.map(() => 'right' as const)],
      ),
    );
    if (fit.factors.length > shown.length)
      lines.push(`  (first ${shown.length} factors shown; all are in --json)`);
    lines.push('');
  }
  lines.push(
    formatTable(
      ['factor', 'CR', 'AVE', '√AVE', 'max |r|', 'Fornell–Larcker'],
      out.reliability.map((r) => [
        short(r.factor, 20),
        bounded(r.compositeReliability),
        bounded(r.ave),
        bounded(r.sqrtAve),
        bounded(r.maxCorrelation),
        r.fornellLarcker ? 'met' : 'not met',
      ]),
      ['left', 'right', 'right', 'right', 'right', 'left'],
    ),
    '',
  );
  if (out.htmt.length > 0) {
    lines.push(
      formatTable(
        ['factor', 'factor', 'HTMT', 'verdict'],
        out.htmt.map((h) => [
          short(h.a, 20),
          short(h.b, 20),
          bounded(h.value),
          h.verdict ?? 'needs 2+ items each',
        ]),
        ['left', 'left', 'right', 'left'],
      ),
      '',
    );
  }
  if (fit.hints.length > 0) {
    lines.push(
      formatTable(
        ['modification hint', 'between', 'and', 'MI', 'std. change'],
        fit.hints.map((h) => [
          h.kind,
          short(h.a, 20),
          short(h.b, 20),
          unbounded(h.mi),
          unbounded(h.standardizedEpc, 3),
        ]),
        ['left', 'left', 'left', 'right', 'right'],
      ),
      '  (free a parameter only with a substantive rationale, never for fit alone: hints are data-driven)',
      '',
    );
  }
  if (out.invariance) {
    const inv = out.invariance;
    lines.push(
      formatTable(
        ['invariance step', 'chi-square', 'df', 'CFI', 'RMSEA', 'Δχ²', 'Δdf', 'p', 'ΔCFI', 'holds'],
        inv.steps.map((s) => [
          s.step,
          unbounded(s.fit.chiSquare),
          String(s.fit.df),
          bounded(s.fit.cfi),
          bounded(s.fit.rmsea),
          unbounded(s.deltaChiSquare),
          s.deltaDf === null ? NO_VALUE : String(s.deltaDf),
          pCell(s.deltaP),
          bounded(s.deltaCfi),
          s.holds ? 'yes' : 'no',
        ]),
        ['left', 'right', 'right', 'right', 'right', 'right', 'right', 'right', 'right', 'left'],
      ),
      ...wrap(inv.statement),
      '',
    );
  }
  const rules = ['cfa.cutoffs', 'rmsea.bands', 'cr.criterion', 'fornell-larcker'];
  if (out.htmt.length > 0) rules.push('htmt');
  lines.push(
    'Rules of thumb shown (sources in the numbered notes)',
    ...sourceNoteLines(rules, WIDTH),
    '',
    'A new scale is not validated for diagnosis, hiring, admission or other high-stakes decisions.',
  );
  return lines.join('\n').split('\n').map(cut).join('\n');
}

function wrap(textIn: string): string[] {
  const words = textIn.split(' ');
  const out: string[] = [];
  let line = '';
  for (const w of words) {
    if (line.length + w.length + 1 > WIDTH - 2) {
      out.push(`  ${line}`);
      line = w;
    } else line = line ? `${line} ${w}` : w;
  }
  if (line) out.push(`  ${line}`);
  return out;
}

/** `stats cfa`: ML CFA of a model file's measurement model, with reliability from loadings and HTMT. */
export const cfa: StatsAnalysis = {
  name: 'cfa',
  summary: 'confirmatory factor analysis: fit, standardized loadings, CR, AVE, HTMT, invariance',
  notes: NOTES,
  options: {
    ...commonStatsOptionsExcept(...Object.keys(NOT_FOR_CFA)),
    missing: {
      type: 'string',
      value: 'listwise',
      description: 'respondents missing any model item are left out (the only method here)',
    },
    model: {
      type: 'string',
      value: 'FILE.json',
      required: true,
      description:
        '{"factors": {"F1": ["c1", "c2", "c3"], ...}}; optional keys: "residualCovariances": [{"a": "c1", "b": "c2", "rationale": "why"}], "orthogonal": true (factors uncorrelated)',
    },
    group: {
      type: 'string',
      value: 'COLUMN',
      description:
        'also test measurement invariance (configural, metric, scalar) across the groups named in this column',
    },
  },
  refused: NOT_FOR_CFA,
  async run(values, ctx) {
    if (text(values, 'missing') === 'pairwise') {
      throw new UsageError(
        'stats cfa uses complete cases only (--missing listwise): ML estimation needs one sample',
      );
    }
    const modelFile = text(values, 'model');
    if (modelFile === undefined) {
      throw new UsageError(
        '--model FILE.json is required, holding {"factors": {"F1": ["c1", "c2", "c3"], ...}}',
      );
    }
    if (text(values, 'data') === undefined) {
      throw new UsageError('--data FILE is required (a CSV or TSV file with a header row)');
    }
    const groupColumn = text(values, 'group') ?? null;
    const source = new TextDecoder('utf-8').decode(await readUserFile(modelFile, 'model file', ctx));
    const model = parseModelFile(modelFile, source.replace(/^\uFEFF/, ''));
    const items = modelItems(model);
    if (groupColumn !== null && items.includes(groupColumn)) {
      throw new UsageError(
        `--group "${groupColumn}" is an item of the model; name the column that holds the groups`,
      );
    }
    let loaded: LoadedItems;
    try {
      loaded = await loadItemData(values, ctx, { names: { list: items, from: `the model (${modelFile})` } });
    } catch (error) {
      if (error instanceof DataError && error.message.includes('no column named')) {
        throw new DataError(`the model in ${modelFile} names a column the data lack: ${error.message}`);
      }
      throw error;
    }
    const { rows, kept } = completeCases(loaded.data);
    const warnings = [...loaded.warnings];
    const dropped = loaded.data.length - rows.length;
    if (dropped > 0) warnings.push(`${dropped} respondent(s) with a missing answer were left out (listwise)`);
    if (rows.length < 2 * items.length) {
      warnings.push(
        `only ${rows.length} complete respondents for ${items.length} items; ML estimates need far more`,
      );
    }
    let out: CfaOutput;
    try {
      const moments = sampleMoments('all respondents', items, rows);
      const fit = fitCfa(model, [moments]);
      const pattern = fit.items.map((item) => model.factors.map((f) => f.items.includes(item)));
      const g = fit.groups[0];
      const reliability = constructReliability(
        fit.factors,
        fit.items,
        pattern,
        g.standardizedLoadings,
        g.standardizedResidualVariances,
        g.factorCorrelations,
      );
      const pairs = htmt(fit.factors, fit.items, pattern, covarianceToCorrelation(moments.cov));
      warnings.push(...fit.warnings);
      let invariance: InvarianceResult | null = null;
      if (groupColumn !== null) {
        const labels = await groupLabels(loaded, groupColumn, ctx);
        const byGroup = new Map<string, number[][]>();
        let unlabelled = 0;
        kept.forEach((rowIndex, i) => {
          const label = labels[rowIndex];
          if (label === null) {
            unlabelled++;
            return;
          }
          if (!byGroup.has(label)) byGroup.set(label, []);
          byGroup.get(label)?.push(rows[i]);
        });
        if (unlabelled > 0)
          warnings.push(
            `${unlabelled} respondent(s) without a value in "${groupColumn}" were left out of the invariance test`,
          );
        if (byGroup.size < 2) {
          throw new DataError(
            `${loaded.file}: column "${groupColumn}" holds ${byGroup.size} group(s); invariance needs at least two`,
          );
        }
        const groups: GroupMoments[] = [...byGroup.entries()]
          .sort(([a], [b]) => a.localeCompare(b))
          .map(([name, groupRows]) => sampleMoments(name, items, groupRows));
        invariance = measurementInvariance(model, groups);
        warnings.push(...invariance.warnings);
      }
      out = {
        fit,
        reliability,
        htmt: pairs,
        invariance,
        dropped,
        respondents: loaded.data.length,
        groupColumn,
      };
    } catch (error) {
      if (error instanceof EngineError) throw new DataError(`${loaded.file}: ${error.message}`);
      throw error;
    }
    return { json: cfaJson(loaded, modelFile, model, out), table: cfaTable(loaded, out), warnings };
  },
};
