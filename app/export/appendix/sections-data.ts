import { bounded, count, plural, unbounded } from '../../api/format.ts';
import { listRuns } from '../../../db/repos/analysis-runs.ts';
import { currentExclusions, listDatasets } from '../../../db/repos/datasets.ts';
import type { Study } from '../../../db/study.ts';
import { currentPilotDataset } from '../../phases/analysis-data.ts';
import { ROLE_LABEL, screeningView } from '../../phases/pilot/index.ts';
import {
  decisionViews,
  RULES_OF_THUMB,
  roundDetail,
  roundSummaries,
} from '../../phases/purification/index.ts';
import { renderAnalyses } from './analyses.ts';
import { alphaAcrossRounds } from './figures.ts';
import { em, type Inline } from './model.ts';
import type { Writer } from './writer.ts';

/** Registry ids of the screening checks, by the check's name in a screening run. */
const CHECK_METHOD: Record<string, string> = {
  longstring: 'screening.longstring',
  irv: 'screening.irv',
  mahalanobis: 'screening.mahalanobis',
  attention: 'screening.attention-checks',
  duplicateId: 'screening.duplicate-ids',
  speeder: 'screening.speeder',
  missing: 'screening.missing-share',
};

/** Section: the datasets, and the pilot sample's screening with every exclusion and its reason. */
export function pilotSection(w: Writer, study: Study): void {
  w.section('Pilot sample and screening');
  const datasets = listDatasets(study);
  if (datasets.length === 0) {
    w.notYet('the pilot data', 'No response data have been imported.');
    return;
  }
  w.table(
    'Datasets held in the study file',
    [
      ['Dataset', 'left'],
      ['Role', 'left'],
      ['File', 'left'],
      ['Respondents', 'right'],
      ['Imported', 'left'],
    ],
    datasets.map((d) => [
      d.name,
      ROLE_LABEL[d.role],
      d.fileName,
      count(d.respondents),
      d.importedAt.slice(0, 10),
    ]),
    { empty: 'No datasets.', note: ['Each file’s SHA-256 is listed under Reproducibility.'] },
  );
  const pilot = currentPilotDataset(study);
  if (!pilot) {
    w.notYet('a current pilot dataset', 'No pilot dataset is current, so no sample is described.');
    return;
  }
  const view = screeningView(study, pilot.id);
  const c = view.counts;
  w.para(
    `The pilot dataset “${pilot.name}” holds ${plural(c.respondents, 'respondent')}; ${count(c.excluded)} ${c.excluded === 1 ? 'was' : 'were'} excluded, leaving ${count(c.analysed)} for analysis.`,
  );
  if (!view.run) {
    w.notYet('respondent screening', 'The pilot data have not been screened.');
  } else {
    w.para(
      'Each respondent was screened for careless or invalid responding ',
      w.cite('screening.longstring', 'screening.irv', 'screening.mahalanobis'),
      '. Screening only proposes: each exclusion is the researcher’s decision, logged with its reason.',
    );
    w.table(
      'Screening checks: respondents flagged and excluded',
      [
        ['Check', 'left'],
        ['Flagged', 'right'],
        ['Excluded', 'right'],
        ['Source', 'left'],
      ],
      c.byCheck.map((b) => [
        b.label,
        count(b.flagged),
        count(b.excluded),
        CHECK_METHOD[b.check] ? w.cite(CHECK_METHOD[b.check]).text.slice(1, -1) : '–',
      ]),
      {
        empty: 'The screening run reports no checks.',
        note: [`A respondent may be flagged by several checks. Screening run ${view.run.id}.`],
      },
    );
  }
  const reasons = new Map<string, { rule: string | null; n: number }>();
  for (const e of currentExclusions(study, pilot.id).values()) {
    const key = `${e.reason}\u0000${e.rule ?? ''}`;
    const entry = reasons.get(key) ?? { rule: e.rule, n: 0 };
    entry.n++;
    reasons.set(key, entry);
  }
  w.table(
    'Exclusions in force, by the reason recorded',
    [
      ['Reason', 'left'],
      ['Basis', 'left'],
      ['Respondents', 'right'],
    ],
    [...reasons.entries()].map(([key, v]) => [
      key.split('\u0000')[0],
      v.rule ?? 'researcher’s judgement',
      count(v.n),
    ]),
    { empty: 'No respondent was excluded.' },
  );
}

/** Section: the purification rounds, their statistics, and every decision with its rationale. */
export function purificationSection(w: Writer, study: Study): void {
  w.section('Purification rounds');
  const rounds = roundSummaries(study);
  if (rounds.length === 0) {
    w.notYet('purification', 'No round of item analysis has been run.');
    return;
  }
  const first = roundDetail(study, rounds[0].id);
  const criterion = first.criterion;
  const level = Math.round(first.summary.ci.level * 100);
  w.para(
    'Each round analysed the items still in the scale on the current pilot data, reverse-keyed items rescored as minimum + maximum − answer ',
    w.cite('scoring.reverse-keying'),
    '. Item means and standard deviations ',
    w.cite('items.descriptives'),
    ', corrected item–total correlations ',
    w.cite('items.corrected-item-total'),
    ', Cronbach’s α ',
    w.cite('alpha.cronbach'),
    ` with Feldt’s ${level}% confidence interval `,
    w.cite('alpha.feldt-ci'),
    rounds.some((r) => r.bootstrapCI) ? ' and a seeded percentile bootstrap interval ' : '',
    rounds.some((r) => r.bootstrapCI) ? w.cite('alpha.bootstrap-ci') : '',
    ', α if item deleted ',
    w.cite('alpha.if-item-deleted'),
    ' and McDonald’s ω total ',
    w.cite('omega.total'),
    ` are reported. The study’s criterion is α ≥ ${bounded(criterion.minimum, 2)} `,
    w.cite(criterion.ruleId),
    '.',
  );
  const summaryLabel = w.table(
    'Reliability across purification rounds',
    [
      ['Round', 'right'],
      ['k', 'right'],
      ['n', 'right'],
      ['α', 'right'],
      [`${level}% CI (Feldt)`, 'left'],
      ['Bootstrap CI', 'left'],
      ['ω', 'right'],
      ['Items that left', 'left'],
    ],
    rounds.map((r) => [
      String(r.number),
      count(r.k),
      count(r.n),
      bounded(r.alpha),
      `[${bounded(r.ci.lower)}, ${bounded(r.ci.upper)}]`,
      r.bootstrapCI ? `[${bounded(r.bootstrapCI.lower)}, ${bounded(r.bootstrapCI.upper)}]` : '–',
      bounded(r.omega),
      r.left.length > 0 ? r.left.join(', ') : '–',
    ]),
    {
      empty: 'No rounds.',
      note: [
        'k = items; n = respondents analysed; ω = McDonald’s ω total. ',
        ...rounds
          .filter((r) => r.bootstrapCI)
          .slice(0, 1)
          .map(
            (r) =>
              `Bootstrap intervals from ${count(r.bootstrapCI?.resamples)} resamples, seeded (seeds under Reproducibility). `,
          ),
        ...rounds.filter((r) => r.outOfDate).map((r) => `Round ${r.number} is out of date: ${r.outOfDate}. `),
      ],
    },
  );
  w.figure(
    'Cronbach’s α with its confidence interval in each purification round',
    alphaAcrossRounds(
      rounds.map((r) => ({ number: r.number, alpha: r.alpha, lower: r.ci.lower, upper: r.ci.upper })),
      criterion.minimum,
    ),
    `Alpha per round: ${rounds.map((r) => `round ${r.number} ${bounded(r.alpha)}`).join(', ')}; dashed line at the criterion ${bounded(criterion.minimum, 2)}.`,
    [`Bars show Feldt’s ${level}% interval; values as in ${summaryLabel}.`],
  );
  for (const summary of rounds) {
    const detail = roundDetail(study, summary.id);
    w.heading(3, `Round ${summary.number}: item statistics`);
    w.table(
      `Item statistics, purification round ${summary.number} (n = ${count(summary.n)}, analysis run ${summary.runId})`,
      [
        ['Item', 'left'],
        ['Facet', 'left'],
        ['M', 'right'],
        ['SD', 'right'],
        ['Skew', 'right'],
        ['r(it)', 'right'],
        ['α if deleted', 'right'],
        ['Flags', 'left'],
      ],
      detail.rows.map((r) => [
        `${r.code}${r.keying === 'reverse' ? ' (R)' : ''}`,
        r.facetName ?? '–',
        unbounded(r.stats.mean),
        unbounded(r.stats.sd),
        unbounded(r.stats.skewness),
        bounded(r.stats.correctedItemTotal),
        bounded(r.stats.alphaIfDeleted),
        r.flags.map((f) => RULES_OF_THUMB.find((t) => t.rule === f.rule)?.label ?? f.rule).join(', ') || '–',
      ]),
      {
        empty: `Round ${summary.number} holds no item statistics.`,
        note: flagNote(
          w,
          detail.rows.flatMap((r) => r.flags.map((f) => f.rule)),
          detail.rows.some((r) => r.keying === 'reverse'),
        ),
      },
    );
  }
  factorEvidence(w, study);
  decisionsPart(w, study);
}

function factorEvidence(w: Writer, study: Study): void {
  w.heading(3, 'Factor-count evidence and exploratory factor analysis');
  const runs = listRuns(study, { phase: 'purification' });
  if (renderAnalyses(w, runs, ['dimensionality', 'efa']) === 0) {
    w.notYet(
      'factor-count evidence',
      'The study holds no stored dimensionality or exploratory factor analysis (eigenvalues, parallel analysis, MAP, loadings).',
    );
  }
}

function decisionsPart(w: Writer, study: Study): void {
  w.heading(3, 'Decisions on items');
  const decisions = decisionViews(study);
  const statsOnly = decisions.filter((d) => d.statisticsOnly);
  w.para(
    'Every decision names the round it was made on and gives two rationales: how the item relates to the construct’s domain, and what the statistics show. A rise in α alone is not a reason to drop an item; a drop without a domain rationale is marked as statistics-only.',
  );
  w.table(
    'Decisions on items during purification, in the order made',
    [
      ['Round', 'right'],
      ['Item', 'left'],
      ['Decision', 'left'],
      ['Domain rationale', 'left'],
      ['Statistical rationale', 'left'],
    ],
    decisions.map((d) => [
      String(d.roundNumber),
      d.itemCode,
      `${d.action}${d.action === 'move' ? ` to ${d.toFacet ?? '?'}` : ''}${d.statisticsOnly ? ' †' : ''}${d.reversedBy !== null ? ' (later reversed)' : ''}`,
      d.domainRationale || '–',
      d.statisticalRationale || '–',
    ]),
    {
      empty: 'No item was dropped, kept, moved or restored by a recorded decision.',
      note:
        statsOnly.length > 0
          ? [
              em('†'),
              ` Statistics-only drop (no domain rationale recorded): ${statsOnly.map((d) => d.itemCode).join(', ')}.`,
            ]
          : ['No drop rests on statistics alone.'],
    },
  );
}

/** The note under an item table: abbreviations, and the rules of thumb behind the flags it shows. */
function flagNote(w: Writer, used: string[], reversed: boolean): (Inline | string)[] {
  const rules = RULES_OF_THUMB.filter((t) => used.includes(t.rule));
  const parts: (Inline | string)[] = [
    `${reversed ? '(R) = reverse-keyed, rescored; M and SD of the scored answers; ' : ''}r(it) = corrected item–total correlation.`,
  ];
  if (rules.length === 0) return [...parts, ' No item was flagged.'];
  parts.push(' Flags are rules of thumb asking for a look, not verdicts: ');
  rules.forEach((t, i) => {
    parts.push({ text: t.label, em: true }, `: ${t.statement.replace(/\.$/, '')}`);
    if (t.source) parts.push(' ', w.cite(t.source));
    parts.push(i === rules.length - 1 ? '.' : '; ');
  });
  return parts;
}
