import { bounded, count, pCell, unbounded } from '../../api/format.ts';
import type { RunRecord } from '../../../db/repos/analysis-runs.ts';
import type { RelationsResults } from '../../phases/validity/relations.ts';
import type { Writer } from './writer.ts';

/**
 * The validity phase's stored relations run (hypotheses, criteria, known groups) rendered from its
 * results. Each part returns whether it drew anything, so that the section says "not yet done" only
 * when the run holds nothing for it.
 */

/** The newest stored relations run, or null. */
export function latestRelations(runs: RunRecord[]): { run: RunRecord; results: RelationsResults } | null {
  const run = runs.filter((r) => r.kind === 'relations').at(-1);
  if (!run || typeof run.results !== 'object' || run.results === null) return null;
  const results = run.results as RelationsResults;
  if (
    !Array.isArray(results.hypotheses) ||
    !Array.isArray(results.measures) ||
    !Array.isArray(results.groups)
  )
    return null;
  return { run, results };
}

function source(run: RunRecord, results: RelationsResults): string {
  return `analysis run ${run.id} (${run.createdAt.slice(0, 10)}; ${results.score.name}: sum of ${count(results.score.items.length)} items, α = ${bounded(results.score.alpha)}, n = ${count(results.score.n)})`;
}

function interval(lower: number, upper: number, format: (x: number) => string): string {
  return `[${format(lower)}, ${format(upper)}]`;
}

/** The planned relations tested against what was observed, with the stated rule. */
export function hypothesesTable(w: Writer, run: RunRecord, results: RelationsResults): boolean {
  if (results.hypotheses.length === 0) return false;
  w.para(
    `The relations stated in advance, tested on the validation data in ${source(run, results)} `,
    w.cite('validity.hypotheses', 'correlation.fisher-z', 'effect.bands'),
    '.',
  );
  w.table(
    `Hypotheses tested against the observed relations (analysis run ${run.id})`,
    [
      ['Other construct', 'left'],
      ['Expected', 'left'],
      ['Observed', 'left'],
      ['95% CI', 'left'],
      ['Verdict', 'left'],
    ],
    results.hypotheses.map((h) => [
      h.otherConstruct,
      h.expectedSign === 'none'
        ? h.expectedStrength.replace('-', ' ')
        : `${h.expectedStrength} ${h.expectedSign}`,
      h.observed && h.metric ? `${h.metric} = ${format(h.metric, h.observed.estimate)}` : '–',
      h.observed && h.metric
        ? interval(h.observed.lower, h.observed.upper, (x) => format(h.metric ?? 'r', x))
        : '–',
      h.outcome ? h.outcome.verdict : `not tested: ${h.untested ?? 'no data'}`,
    ]),
    { empty: 'No hypotheses were tested.', note: [`Rule: ${results.rule}`] },
  );
  return true;
}

function format(metric: 'r' | 'd', x: number): string {
  return metric === 'r' ? bounded(x, 2) : unbounded(x, 2);
}

/** Correlations of the score with criteria, concurrent or measured later, with their regressions. */
export function criteriaTable(w: Writer, run: RunRecord, results: RelationsResults): boolean {
  if (results.measures.length === 0) return false;
  w.table(
    `Relations of the scale score with other measures (analysis run ${run.id})`,
    [
      ['Measure', 'left'],
      ['Timing', 'left'],
      ['n', 'right'],
      ['r', 'right'],
      ['95% CI', 'left'],
      ['p', 'right'],
      ['r corrected', 'right'],
      ['β', 'right'],
      ['R²', 'right'],
    ],
    results.measures.map((m) => [
      m.column,
      m.timing === 'predictive' ? 'measured later' : 'same time',
      count(m.correlation.n),
      bounded(m.correlation.r, 2),
      interval(m.correlation.lower, m.correlation.upper, (x) => bounded(x, 2)),
      pCell(m.correlation.p),
      m.correlation.disattenuated === null ? '–' : bounded(m.correlation.disattenuated, 2),
      bounded(m.regression.standardizedSlope, 2),
      bounded(m.regression.rSquared, 2),
    ]),
    {
      empty: 'No other measures were related to the score.',
      note: [
        'Pearson correlations with Fisher-z intervals ',
        w.cite('correlation.pearson', 'correlation.fisher-z'),
        '; corrected for attenuation with the stored reliabilities where both are known ',
        w.cite('validity.disattenuation'),
        '; β and R² from the regression of the measure on the scale score ',
        w.cite('regression.ols'),
        '.',
      ],
    },
  );
  return true;
}

/** Known-groups comparisons: Welch's t, Cohen's d with its interval, Hedges' g, and ANOVA. */
export function groupsTable(w: Writer, run: RunRecord, results: RelationsResults): boolean {
  if (results.groups.length === 0) return false;
  w.table(
    `Known-groups comparisons of the scale score (analysis run ${run.id})`,
    [
      ['Grouping', 'left'],
      ['Groups (n, mean, SD)', 'left'],
      ['t', 'right'],
      ['df', 'right'],
      ['p', 'right'],
      ['d', 'right'],
      ['95% CI of d', 'left'],
      ['g', 'right'],
    ],
    results.groups.map((g) => {
      const c = g.comparison;
      const side = (s: typeof c.a) => `${s.name} (${count(s.n)}, ${unbounded(s.mean)}, ${unbounded(s.sd)})`;
      return [
        g.column,
        `${side(c.a)} vs ${side(c.b)}`,
        unbounded(c.t),
        unbounded(c.df, 1),
        pCell(c.p),
        unbounded(c.cohensD),
        interval(g.dLower, g.dUpper, (x) => unbounded(x)),
        unbounded(c.hedgesG),
      ];
    }),
    {
      empty: 'No known groups were compared.',
      note: [
        "Welch's t ",
        w.cite('t.welch'),
        "; Cohen's d with the pooled SD ",
        w.cite('d.cohen'),
        "; Hedges' g ",
        w.cite('g.hedges'),
        '.',
        ...results.groups
          .filter((g) => g.anova !== null)
          .map((g) =>
            g.anova
              ? ` ${g.column}: one-way ANOVA over ${g.anova.groups.length} groups, F(${g.anova.df1}, ${g.anova.df2}) = ${unbounded(g.anova.F)}, p ${pCell(g.anova.p).startsWith('<') ? pCell(g.anova.p) : `= ${pCell(g.anova.p)}`}, η² = ${bounded(g.anova.etaSquared)}.`
              : '',
          ),
      ],
    },
  );
  return true;
}
