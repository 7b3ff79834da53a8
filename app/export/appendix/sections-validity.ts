import { bounded, count, unbounded } from '../../api/format.ts';
import { listRuns, type RunRecord } from '../../../db/repos/analysis-runs.ts';
import { getConstruct, listFacets, listRelations, type RelationKind } from '../../../db/repos/construct.ts';
import { listDatasets } from '../../../db/repos/datasets.ts';
import { listItems } from '../../../db/repos/items.ts';
import { listDecisions } from '../../../db/repos/purification.ts';
import type { Study } from '../../../db/study.ts';
import { roundDetail, roundSummaries } from '../../phases/purification.ts';
import { recognised, renderAnalyses } from './analyses.ts';
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
  if (renderAnalyses(w, runs, ['hypotheses']) === 0 && planned > 0)
    w.notYet('tests of these hypotheses', 'No stored analysis tests the relations stated above.');

  w.heading(3, 'Criterion relations');
  const criteria = plannedRelations(w, study, ['criterion'], 'Criteria stated in advance');
  if (criteria > 0)
    w.notYet('criterion analyses', 'No stored analysis relates the scores to the criteria stated above.');

  w.heading(3, 'Known groups');
  const groups = plannedRelations(w, study, ['known-groups'], 'Known-groups comparisons stated in advance');
  if (groups > 0) w.notYet('known-groups comparisons', 'No stored comparison of the groups stated above.');

  w.heading(3, 'Stability over time (test–retest)');
  const retest = listDatasets(study, 'retest');
  if (renderAnalyses(w, runs, ['icc']) === 0)
    w.notYet(
      'test–retest reliability',
      retest.length > 0
        ? `Retest data are held (${retest.map((d) => `“${d.name}”, ${count(d.respondents)} respondents`).join('; ')}) but no intraclass correlation has been stored.`
        : 'No retest data are held.',
    );

  const other = runs.filter((r) => !recognised(r));
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
  const c = getConstruct(study);
  const dropped = new Set<number>();
  for (const d of listDecisions(study)) {
    if (d.action === 'drop') dropped.add(d.itemId);
    if (d.action === 'restore') dropped.delete(d.itemId);
  }
  const items = listItems(study).filter((it) => it.state !== 'retired' && !dropped.has(it.id));
  const rounds = roundSummaries(study);
  if (items.length === 0 || rounds.length === 0) {
    w.notYet(
      'the final instrument',
      'The scale is final once purification has run and decided which items stay.',
    );
    return;
  }
  const facets = new Map(listFacets(study, { includeRetired: true }).map((f) => [f.id, f.name]));
  const max = c.responseMin + c.responsePoints - 1;
  w.para(
    `Respondents answer each item on a ${c.responsePoints}-point scale from ${c.responseMin} to ${max}`,
    c.anchors.length > 0 ? ` (${c.anchors.map((a, i) => `${c.responseMin + i} = ${a}`).join(', ')})` : '',
    '. Items are presented in the order below.',
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
    items.map((it, i) => [
      String(i + 1),
      it.code,
      it.text,
      it.facetId === null ? '–' : (facets.get(it.facetId) ?? '–'),
      it.keying === 'reverse' ? `reverse: ${c.responseMin + max} − answer` : 'as answered',
    ]),
    {
      empty: 'No items.',
      note: [
        'Scale score: the sum (or mean) of the scored items ',
        w.cite('scoring.sum-and-mean'),
        '; reverse-keyed items are rescored as minimum + maximum − answer ',
        w.cite('scoring.reverse-keying'),
        '.',
      ],
    },
  );
  const last = rounds.at(-1);
  const codes = items.map((it) => it.code).sort();
  const matches = last !== undefined && [...last.items].sort().join('\u0000') === codes.join('\u0000');
  if (!last || !matches) {
    w.notYet(
      'reliability of the final item set',
      'No purification round has analysed exactly these items; run one to report their α, SEM and MDC95.',
    );
    return;
  }
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
