import { bounded, count, percent, plural, unbounded } from '../../api/format.ts';
import { listRuns, type RunRecord } from '../../../db/repos/analysis-runs.ts';
import { getConstruct, listRelations, type RelationKind } from '../../../db/repos/construct.ts';
import { listDatasets } from '../../../db/repos/datasets.ts';
import type { Study } from '../../../db/study.ts';
import { type InstrumentForm, instrumentForm } from '../../phases/appendix/instrument-form.ts';
import { RuleError } from '../../phases/errors.ts';
import { roundDetail, roundSummaries } from '../../phases/purification/index.ts';
import { em } from './model.ts';
import { recognised, renderAnalyses } from './analyses.ts';
import { criteriaTable, groupsTable, hypothesesTable, latestRelations } from './relations.ts';
import type { Writer } from './writer.ts';

/** Run kinds whose results other sections already show. */
const SHOWN_ELSEWHERE = new Set(['screening', 'purification-round', 'content-validity']);

const RELATION_WORD: Record<RelationKind, string> = {
  convergent: 'convergent',
  discriminant: 'discriminant',
  criterion: 'criterion',
  'known-groups': 'known groups',
};

function validityRuns(study: Study): RunRecord[] {
  return listRuns(study).filter((r) => r.phase !== 'purification' && !SHOWN_ELSEWHERE.has(r.kind));
}

function plannedRelations(w: Writer, study: Study, kinds: RelationKind[], title: string): number {
  const relations = listRelations(study).filter((r) => kinds.includes(r.kind));
  w.table(
    title,
    [
      ['Other construct', 'left'],
      ['Kind', 'left'],
      ['Expected', 'left'],
      ['Measure', 'left'],
      ['Rationale', 'left'],
    ],
    relations.map((r) => [
      r.otherConstruct,
      RELATION_WORD[r.kind],
      r.expectedSign === 'none'
        ? r.expectedStrength.replace('-', ' ')
        : `${r.expectedStrength} ${r.expectedSign}`,
      r.measure || '–',
      r.rationale || '–',
    ]),
    {
      empty: `No ${kinds.map((k) => RELATION_WORD[k]).join(' or ')} relations were planned in the construct phase.`,
    },
  );
  return relations.length;
}

/** Section: validity evidence, by the sources of evidence the testing standards name. */
export function validitySection(w: Writer, study: Study): void {
  w.section('Validity evidence');
  w.para(
    'Validity evidence is organised by its sources: test content, internal structure, relations to other variables, and stability over time ',
    w.cite('validity.standards'),
    '. Evidence from test content is the expert review above (section 3).',
  );
  const runs = validityRuns(study);
  const validation = listDatasets(study, 'validation');

  w.heading(3, 'Internal structure');
  if (renderAnalyses(w, runs, ['cfa']) === 0)
    w.notYet(
      'confirmatory factor analysis',
      validation.length > 0
        ? `The study holds validation data (${validation.map((d) => `“${d.name}”`).join(', ')}) but no stored confirmatory analysis of it.`
        : 'The study holds no validation data and no stored confirmatory analysis.',
    );

  w.heading(3, 'Relations to other variables');
  const planned = plannedRelations(
    w,
    study,
    ['convergent', 'discriminant'],
    'Convergent and discriminant relations stated in advance',
  );
  const relations = latestRelations(runs);
  const tested =
    (relations !== null && hypothesesTable(w, relations.run, relations.results)) ||
    renderAnalyses(w, runs, ['hypotheses']) > 0;
  if (!tested && planned > 0)
    w.notYet('tests of these hypotheses', 'No stored analysis tests the relations stated above.');

  w.heading(3, 'Criterion relations');
  const criteria = plannedRelations(w, study, ['criterion'], 'Criteria stated in advance');
  if (!(relations !== null && criteriaTable(w, relations.run, relations.results)) && criteria > 0)
    w.notYet('criterion analyses', 'No stored analysis relates the scores to the criteria stated above.');

  w.heading(3, 'Known groups');
  const groups = plannedRelations(w, study, ['known-groups'], 'Known-groups comparisons stated in advance');
  if (!(relations !== null && groupsTable(w, relations.run, relations.results)) && groups > 0)
    w.notYet('known-groups comparisons', 'No stored comparison of the groups stated above.');

  w.heading(3, 'Stability over time (test–retest)');
  const retest = listDatasets(study, 'retest');
  if (renderAnalyses(w, runs, ['icc']) === 0)
    w.notYet(
      'test–retest reliability',
      retest.length > 0
        ? `Retest data are held (${retest.map((d) => `“${d.name}”, ${count(d.respondents)} respondents`).join('; ')}) but no intraclass correlation has been stored.`
        : 'No retest data are held.',
    );

  const other = runs.filter((r) => !recognised(r) && !(r.kind === 'relations' && relations?.run.id === r.id));
  if (other.length > 0) {
    w.heading(3, 'Other stored analyses');
    w.table(
      'Stored analyses not shown above',
      [
        ['Run', 'right'],
        ['Phase', 'left'],
        ['Kind', 'left'],
        ['Date', 'left'],
        ['Stored values', 'left'],
      ],
      other.map((r) => [String(r.id), r.phase, r.kind, r.createdAt.slice(0, 10), scalars(r.results)]),
      { empty: 'None.' },
    );
  }
}

/** The top-level numbers of a result, "alpha .842; n 468", for a run of a kind not recognised. */
function scalars(results: unknown): string {
  if (typeof results !== 'object' || results === null) return '–';
  const parts = Object.entries(results as Record<string, unknown>)
    .filter(([, v]) => typeof v === 'number' && Number.isFinite(v))
    .slice(0, 8)
    .map(([k, v]) => `${k} ${Math.abs(v as number) <= 1 ? bounded(v as number) : unbounded(v as number)}`);
  return parts.join('; ') || '–';
}

/** Section: the final instrument: items in order, response format, scoring key, measurement error. */
export function instrumentSection(w: Writer, study: Study): void {
  w.section('The final instrument');
  let form: InstrumentForm;
  try {
    form = instrumentForm(study);
  } catch (error) {
    if (!(error instanceof RuleError)) throw error;
    w.notYet('the final instrument', `The retained item set is not settled: ${error.message}.`);
    return;
  }
  const c = getConstruct(study);
  const max = c.responseMin + c.responsePoints - 1;
  w.para(
    `“${form.title}” asks ${plural(form.items.length, 'item')}, answered on a ${c.responsePoints}-point scale from ${c.responseMin} to ${max}`,
    c.anchors.length > 0 ? ` (${c.anchors.map((a, i) => `${c.responseMin + i} = ${a}`).join(', ')})` : '',
    `, in the order below (${form.chosen ? 'as set by a logged decision' : 'the default order: no order has been set yet'}). Instructions to respondents: `,
    em(form.instructions),
  );
  w.table(
    'Items of the final scale, in order, with the scoring key',
    [
      ['#', 'right'],
      ['Item', 'left'],
      ['Wording', 'left'],
      ['Facet', 'left'],
      ['Scoring', 'left'],
    ],
    form.items.map((it, i) => [
      String(i + 1),
      it.code,
      it.text,
      it.facetName ?? '–',
      it.keying === 'reverse' ? `reverse: ${c.responseMin + max} − answer` : 'as answered',
    ]),
    {
      empty: 'No items are retained.',
      note: [
        `Scale score: the ${form.rule} of the scored items `,
        w.cite('scoring.sum-and-mean'),
        `, computed when at least ${percent(form.minAnsweredShare, 0)} of the items are answered; reverse-keyed items are rescored as minimum + maximum − answer `,
        w.cite('scoring.reverse-keying'),
        '.',
        ...form.warnings.map((warning) => ` ${warning}.`),
      ],
    },
  );
  const last = roundSummaries(study).find((r) => r.id === form.round.id);
  if (!last) return;
  const error = roundDetail(study, last.id).scale.measurementError;
  const sem = error?.sem ?? null;
  w.para(
    `On the pilot data (round ${last.number}, n = ${count(last.n)}) the final ${count(last.k)} items reach Cronbach’s α = ${bounded(last.alpha)} [${bounded(last.ci.lower)}, ${bounded(last.ci.upper)}]`,
    last.omega !== null ? ` and ω = ${bounded(last.omega)}` : '',
    '.',
    sem !== null ? ` The standard error of measurement of the sum score is ${unbounded(sem)} ` : '',
    sem !== null ? w.cite('sem.classical') : '',
    sem !== null ? ` and the minimal detectable change (95%) ${unbounded(error?.mdc95)} ` : '',
    sem !== null ? w.cite('sem.mdc95') : '',
    sem !== null ? '.' : '',
  );
}
