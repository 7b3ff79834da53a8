import { bounded, count, pCell, unbounded } from '../../api/format.ts';
import type { RunRecord } from '../../../db/repos/analysis-runs.ts';
import { METHODS } from '../../engine/methods/index.ts';
import { cfaDiagram, loadingsHeatmap, screePlot } from './figures.ts';
import type { Writer } from './writer.ts';

/**
 * Stored analysis runs rendered from their results alone, recognised by the shape of what they hold
 * rather than by the screen that made them: eigenvalues (with parallel analysis and MAP when
 * present), a loadings matrix, confirmatory fit indices with loadings and construct reliability,
 * intraclass correlations, and tested hypotheses. So a kind of run added later appears in the
 * appendix as soon as the study holds one, without a change here.
 */

export type AnalysisShape = 'dimensionality' | 'efa' | 'cfa' | 'icc' | 'hypotheses';

type Obj = Record<string, unknown>;

function isObj(x: unknown): x is Obj {
  return typeof x === 'object' && x !== null && !Array.isArray(x);
}
function numbers(x: unknown): x is number[] {
  return Array.isArray(x) && x.length > 0 && x.every((v) => typeof v === 'number');
}
function matrix(x: unknown): x is number[][] {
  return Array.isArray(x) && x.length > 0 && x.every(numbers);
}
function num(x: unknown): number | null {
  return typeof x === 'number' && Number.isFinite(x) ? x : null;
}

/** The results object and the objects nested in it (three levels), depth first. */
function objectsIn(root: unknown, depth = 3): Obj[] {
  if (!isObj(root)) return [];
  const out = [root];
  if (depth === 0) return out;
  for (const value of Object.values(root)) if (isObj(value)) out.push(...objectsIn(value, depth - 1));
  return out;
}

const DETECT: Record<AnalysisShape, (o: Obj) => boolean> = {
  dimensionality: (o) => numbers(o.eigenvalues),
  efa: (o) =>
    (matrix(o.loadings) && Array.isArray(o.items)) ||
    (isObj(o.loadings) && Object.values(o.loadings).every(numbers) && Object.keys(o.loadings).length > 0),
  cfa: (o) => num(o.chiSquare) !== null && 'cfi' in o && 'rmsea' in o && 'srmr' in o,
  icc: (o) =>
    Array.isArray(o.forms) &&
    o.forms.every((f) => isObj(f) && typeof f.form === 'string' && typeof f.value === 'number'),
  hypotheses: (o) =>
    Object.values(o).some(
      (v) => Array.isArray(v) && v.length > 0 && v.every((h) => isObj(h) && typeof h.supported === 'boolean'),
    ),
};

/** What a run ran on, in words: "analysis run 7, 2026-12-01, dataset “Pilot survey” (n = 468)". */
function provenance(run: RunRecord, o: Obj): string {
  const inputs = run.inputs as Obj;
  const dataset =
    isObj(inputs.dataset) && typeof inputs.dataset.name === 'string'
      ? `, dataset “${inputs.dataset.name}”`
      : '';
  const n = num(o.n);
  return `analysis run ${run.id} (${run.kind}, ${run.createdAt.slice(0, 10)}${dataset}${n !== null ? `, n = ${count(n)}` : ''}${run.seed !== null ? `, seed ${run.seed}` : ''})`;
}

/** Cites the registry ids that exist, for method names a run stores (`paf`, `promax`). */
function citeKnown(w: Writer, ids: string[]): string {
  const known = ids.filter((id) => METHODS.has(id));
  return known.length > 0 ? ` ${w.cite(...known).text}` : '';
}

function dimensionality(w: Writer, run: RunRecord, o: Obj): void {
  const eigen = o.eigenvalues as number[];
  const parallel = isObj(o.parallel) ? o.parallel : null;
  const comp = parallel && isObj(parallel.components) ? parallel.components : parallel;
  const random = comp && numbers(comp.percentile) ? comp.percentile : null;
  const percentile = parallel ? num(parallel.percentile) : null;
  const suggested = isObj(o.suggested) ? o.suggested : {};
  const factorability = isObj(o.factorability) ? o.factorability : o;
  const kmo = num(factorability.kmo);
  const bartlett = isObj(factorability.bartlett) ? factorability.bartlett : null;
  w.para(
    `Factor-count evidence from ${provenance(run, o)}: eigenvalues of the correlation matrix `,
    w.cite('efa.kaiser'),
    random ? ', Horn’s parallel analysis ' : '',
    random ? w.cite('efa.parallel') : '',
    num(suggested.map) !== null ? ' and Velicer’s MAP ' : '',
    num(suggested.map) !== null ? w.cite('efa.map') : '',
    kmo !== null ? `; KMO = ${bounded(kmo, 2)} ` : '',
    kmo !== null ? w.cite('efa.kmo', 'efa.kmo-labels') : '',
    bartlett && num(bartlett.chiSquare) !== null
      ? `; Bartlett’s test χ²(${count(num(bartlett.df))}) = ${unbounded(num(bartlett.chiSquare))}, p ${pCell(num(bartlett.p)).startsWith('<') ? '' : '= '}${pCell(num(bartlett.p))} `
      : '',
    bartlett ? w.cite('efa.bartlett') : '',
    '. The criteria are reported side by side; none is taken as the answer on its own.',
  );
  const names: [string, unknown][] = [
    ['Eigenvalues above 1', suggested.kaiser],
    ['Parallel analysis, components', suggested.parallel],
    ['Parallel analysis, common factors', suggested.parallelFactors],
    ['MAP, squared partial correlations', suggested.map],
    ['MAP, fourth-power partial correlations', suggested.mapFourth],
  ];
  const shown = eigen.slice(0, Math.min(eigen.length, 12));
  w.table(
    `Eigenvalues${random ? ' and parallel analysis' : ''} (analysis run ${run.id})`,
    [
      ['Component', 'right'],
      ['Eigenvalue', 'right'],
      ...(random ? [[`Random data, ${percentile ?? 95}th percentile`, 'right'] as [string, 'right']] : []),
    ],
    shown.map((v, i) => [String(i + 1), unbounded(v), ...(random ? [unbounded(random[i])] : [])]),
    {
      empty: 'No eigenvalues.',
      note: [
        'Suggested number of factors: ',
        names
          .filter(([, v]) => num(v) !== null)
          .map(([label, v]) => `${label}, ${v}`)
          .join('; ') || 'none stored',
        '.',
      ],
    },
  );
  w.figure(
    'Scree plot of the eigenvalues' + (random ? ' with parallel analysis' : ''),
    screePlot(shown, random ? random.slice(0, shown.length) : null, percentile),
    `Eigenvalues ${shown.map((v) => unbounded(v)).join(', ')}${
      random
        ? `; random-data eigenvalues ${random
            .slice(0, shown.length)
            .map((v) => unbounded(v))
            .join(', ')}`
        : ''
    }.`,
  );
}

function efa(w: Writer, run: RunRecord, o: Obj): void {
  let items: string[];
  let loadings: number[][];
  if (matrix(o.loadings)) {
    items = (o.items as unknown[]).map(String);
    loadings = o.loadings;
  } else {
    const byItem = o.loadings as Record<string, number[]>;
    items = Object.keys(byItem);
    loadings = items.map((it) => byItem[it]);
  }
  const m = loadings[0]?.length ?? 0;
  const factors = Array.isArray(o.factorNames)
    ? o.factorNames.map(String)
    : Array.from({ length: m }, (_, j) => `F${j + 1}`);
  const comm = numbers(o.communalities)
    ? o.communalities
    : isObj(o.communalities)
      ? items.map((it) => num((o.communalities as Obj)[it]) ?? Number.NaN)
      : null;
  const extraction = typeof o.extraction === 'string' ? o.extraction : null;
  const rotation = typeof o.rotation === 'string' ? o.rotation : null;
  w.para(
    `Exploratory factor analysis, ${provenance(run, o)}: ${m} factor${m === 1 ? '' : 's'}`,
    extraction ? `, ${extraction} extraction${citeKnown(w, [`efa.${extraction}`])}` : '',
    rotation && rotation !== 'none' ? `, ${rotation} rotation${citeKnown(w, [`rotation.${rotation}`])}` : '',
    '. Loadings of at least .40 are read as primary and cross-loadings of .30 or more are flagged ',
    w.cite('rule.primary-loading', 'rule.cross-loading'),
    '.',
  );
  w.table(
    `Factor loadings (analysis run ${run.id})`,
    [
      ['Item', 'left'],
      ...factors.map((f) => [f, 'right'] as [string, 'right']),
      ...(comm ? [['h²', 'right'] as [string, 'right']] : []),
    ],
    items.map((it, i) => [
      it,
      ...loadings[i].map((v) => bounded(v, 2)),
      ...(comm ? [bounded(comm[i], 2)] : []),
    ]),
    {
      empty: 'No loadings.',
      note: ['h² = communality. Loadings of |.40| or more are primary (common practice).'],
    },
  );
  w.figure(
    'Loadings heat map: darker cells are larger loadings',
    loadingsHeatmap(items, factors, loadings),
    `Loadings of ${items.length} items on ${m} factors, as in the table above.`,
  );
}

function cfa(w: Writer, run: RunRecord, o: Obj): void {
  const ci = Array.isArray(o.rmseaCI) ? (o.rmseaCI as number[]) : null;
  w.para(
    `Confirmatory factor analysis by maximum likelihood `,
    w.cite('cfa.ml'),
    `, ${provenance(run, o)}. Fit is judged against the usual cut-offs `,
    w.cite('cfa.cutoffs', 'rmsea.bands'),
    ', read as guides rather than verdicts.',
  );
  w.table(
    `Model fit of the confirmatory model (analysis run ${run.id})`,
    [
      ['χ²', 'right'],
      ['df', 'right'],
      ['p', 'right'],
      ['CFI', 'right'],
      ['TLI', 'right'],
      ['RMSEA', 'right'],
      ['90% CI', 'left'],
      ['SRMR', 'right'],
    ],
    [
      [
        unbounded(num(o.chiSquare)),
        count(num(o.df)),
        pCell(num(o.p)),
        bounded(num(o.cfi)),
        bounded(num(o.tli)),
        bounded(num(o.rmsea)),
        ci ? `[${bounded(ci[0])}, ${bounded(ci[1])}]` : '–',
        bounded(num(o.srmr)),
      ],
    ],
    {
      empty: 'No fit.',
      note: [
        'CFI ',
        w.cite('fit.cfi'),
        '; TLI ',
        w.cite('fit.tli'),
        '; RMSEA ',
        w.cite('rmsea.steiger'),
        '; SRMR ',
        w.cite('fit.srmr'),
        '.',
      ],
    },
  );
  const list = Array.isArray(o.loadings)
    ? (o.loadings as Obj[]).filter((l) => isObj(l) && (l.group === undefined || l.group === 0))
    : isObj(o.standardizedLoadings)
      ? Object.entries(o.standardizedLoadings).map(([item, v]) => ({
          item,
          factor: '',
          standardized: v,
          standardizedSE: null,
        }))
      : [];
  const factorNames = Array.isArray(o.factors)
    ? (o.factors as unknown[]).map(String)
    : [...new Set(list.map((l) => String(l.factor)))];
  w.table(
    `Standardized loadings (analysis run ${run.id})`,
    [
      ['Item', 'left'],
      ['Factor', 'left'],
      ['λ', 'right'],
      ['SE', 'right'],
    ],
    list.map((l) => [
      String(l.item),
      String(l.factor || '–'),
      bounded(num(l.standardized)),
      bounded(num(l.standardizedSE)),
    ]),
    { empty: 'The run stores no loadings.' },
  );
  const groups = Array.isArray(o.groups) && isObj(o.groups[0]) ? (o.groups[0] as Obj) : o;
  const phi = matrix(groups.factorCorrelations) ? groups.factorCorrelations : null;
  if (list.length > 0 && factorNames.length > 0) {
    w.figure(
      'The confirmatory model with its standardized loadings',
      cfaDiagram(
        factorNames.map((f) => ({
          name: f,
          items: list
            .filter((l) => String(l.factor) === f)
            .map((l) => ({ name: String(l.item), loading: num(l.standardized) })),
        })),
      ),
      `Factors ${factorNames.join(', ')}, each with its items and their standardized loadings.`,
    );
  }
  if (phi && phi.length > 1 && phi.length === factorNames.length) {
    w.table(
      'Factor correlations',
      [
        ['Factor', 'left'],
        ...factorNames.slice(0, -1).map((_, j) => [String(j + 1), 'right'] as [string, 'right']),
      ],
      factorNames.map((f, i) => [
        `${i + 1}. ${f}`,
        ...factorNames.slice(0, -1).map((_, j) => (j < i ? bounded(phi[i][j], 2) : '')),
      ]),
      { empty: 'None.' },
    );
  }
  const reliability = objectsIn(o)
    .flatMap((x) => Object.values(x))
    .find(
      (v) =>
        Array.isArray(v) &&
        v.length > 0 &&
        v.every((r) => isObj(r) && 'compositeReliability' in r && 'ave' in r),
    ) as Obj[] | undefined;
  if (reliability) {
    w.table(
      'Composite reliability, average variance extracted and the Fornell–Larcker criterion',
      [
        ['Factor', 'left'],
        ['CR', 'right'],
        ['AVE', 'right'],
        ['√AVE', 'right'],
        ['Largest |r|', 'right'],
        ['Criterion met', 'left'],
      ],
      reliability.map((r) => [
        String(r.factor),
        bounded(num(r.compositeReliability)),
        bounded(num(r.ave)),
        bounded(num(r.sqrtAve)),
        bounded(num(r.maxCorrelation)),
        r.fornellLarcker === true ? 'yes' : 'no',
      ]),
      {
        empty: 'None.',
        note: [
          'CR ',
          w.cite('cr.composite', 'cr.criterion'),
          '; AVE and its criterion ',
          w.cite('ave', 'fornell-larcker'),
          '.',
        ],
      },
    );
  }
  const htmt = objectsIn(o)
    .flatMap((x) => Object.values(x))
    .find(
      (v) =>
        Array.isArray(v) &&
        v.length > 0 &&
        v.every((h) => isObj(h) && 'a' in h && 'b' in h && 'value' in h && !('mi' in h)),
    ) as Obj[] | undefined;
  if (htmt) {
    w.table(
      'Heterotrait–monotrait ratios',
      [
        ['Factors', 'left'],
        ['HTMT', 'right'],
      ],
      htmt.map((h) => [`${h.a} – ${h.b}`, bounded(num(h.value))]),
      { empty: 'None.', note: ['Thresholds .85 and .90 ', w.cite('htmt'), '.'] },
    );
  }
}

function icc(w: Writer, run: RunRecord, o: Obj): void {
  const forms = o.forms as Obj[];
  const error = isObj(o.measurementError) ? o.measurementError : o;
  w.para(
    `Intraclass correlations `,
    w.cite('icc.shrout-fleiss'),
    ' with their confidence intervals ',
    w.cite('icc.mcgraw-wong-ci'),
    `, ${provenance(run, o)}.`,
  );
  w.table(
    `Intraclass correlations (analysis run ${run.id})`,
    [
      ['Form', 'left'],
      ['Model', 'left'],
      ['ICC', 'right'],
      ['CI', 'left'],
      ['F', 'right'],
      ['p', 'right'],
    ],
    forms.map((f) => [
      String(f.form),
      `${f.model ?? ''}, ${f.type ?? ''}`,
      bounded(num(f.value)),
      `[${bounded(num(f.lower))}, ${bounded(num(f.upper))}]`,
      unbounded(num(f.F)),
      pCell(num(f.p)),
    ]),
    {
      empty: 'None.',
      note:
        num(error.sem) !== null
          ? [
              `SEM = ${unbounded(num(error.sem))}, MDC95 = ${unbounded(num(error.mdc95))} `,
              w.cite('icc.sem', 'icc.mdc95'),
              '.',
            ]
          : undefined,
    },
  );
}

function hypotheses(w: Writer, run: RunRecord, o: Obj): void {
  for (const [key, value] of Object.entries(o)) {
    if (
      !Array.isArray(value) ||
      value.length === 0 ||
      !value.every((h) => isObj(h) && typeof h.supported === 'boolean')
    )
      continue;
    const rows = value as Obj[];
    const labelKey = Object.keys(rows[0]).find((k) => typeof rows[0][k] === 'string') ?? 'id';
    const statKey = ['r', 'estimate', 'value', 'd', 'g'].find((k) => num(rows[0][k]) !== null);
    w.para(
      `Hypotheses stated in advance and tested, ${provenance(run, o)} `,
      w.cite('validity.hypotheses'),
      '.',
    );
    w.table(
      `Tested hypotheses (${key})`,
      [
        ['Hypothesis', 'left'],
        ...(statKey ? [[statKey, 'right'] as [string, 'right']] : []),
        ['Supported', 'left'],
      ],
      rows.map((h) => [
        String(h[labelKey] ?? ''),
        ...(statKey ? [bounded(num(h[statKey]))] : []),
        h.supported ? 'yes' : 'no',
      ]),
      { empty: 'None.' },
    );
  }
}

const RENDER: Record<AnalysisShape, (w: Writer, run: RunRecord, o: Obj) => void> = {
  dimensionality,
  efa,
  cfa,
  icc,
  hypotheses,
};

/** Renders every part of the runs that has one of the shapes asked for; returns how many. */
export function renderAnalyses(w: Writer, runs: RunRecord[], shapes: AnalysisShape[]): number {
  let shown = 0;
  for (const run of runs) {
    const objects = objectsIn(run.results);
    for (const shape of shapes) {
      const found = objects.find(DETECT[shape]);
      if (!found) continue;
      RENDER[shape](w, run, found);
      shown++;
    }
  }
  return shown;
}

/** Whether a run holds any shape this module can render. */
export function recognised(run: RunRecord): boolean {
  const objects = objectsIn(run.results);
  return (Object.keys(DETECT) as AnalysisShape[]).some((s) => objects.some(DETECT[s]));
}
