import { bounded, count, percentOf, plural } from '../../api/format.ts';
import { getConstruct, listFacets } from '../../../db/repos/construct.ts';
import { listItems } from '../../../db/repos/items.ts';
import type { Study } from '../../../db/study.ts';
import { reliabilityCriterion, SCORE_USE_LABEL } from '../../engine/reliability/criterion.ts';
import { SOURCE_LABEL } from '../../phases/items/index.ts';
import { reviewView } from '../../phases/review/index.ts';
import { em } from './model.ts';
import type { Writer } from './writer.ts';

/** Section: the construct, its facets and the use its scores are meant for. */
export function constructSection(w: Writer, study: Study): void {
  const c = getConstruct(study);
  w.section('Construct definition and facets');
  if (c.definition.trim() === '') {
    w.notYet('the construct definition', 'The construct phase holds no definition yet.');
    return;
  }
  w.para(em(c.name || 'The construct'), ` is defined as follows: ${c.definition}`);
  const parts: [string, string][] = [
    ['It includes', c.includes],
    ['It excludes', c.excludes],
    ['Target population', c.population],
    ['Intended uses', c.intendedUses],
  ];
  w.list(parts.filter(([, v]) => v.trim() !== '').map(([k, v]) => [{ text: `${k}: `, strong: true }, v]));
  const criterion = reliabilityCriterion(c.scoreUse);
  w.para(
    c.scoreUse === null
      ? 'No use of scores was stated, so the early-research reliability criterion applies by default: '
      : `Scores are meant for ${SCORE_USE_LABEL[c.scoreUse]}; the reliability criterion for that use is `,
    `Cronbach’s α ≥ ${bounded(criterion.minimum, 2)} `,
    w.cite(criterion.ruleId),
    '. It is shown beside every α below as a guide, not as a verdict.',
  );
  const facets = listFacets(study, { includeRetired: true });
  w.table(
    'Facets of the construct',
    [
      ['Facet', 'left'],
      ['Definition', 'left'],
      ['Status', 'left'],
    ],
    facets.map((f) => [
      f.name,
      f.definition || '–',
      f.retiredAt ? `retired ${f.retiredAt.slice(0, 10)}` : 'in use',
    ]),
    { empty: 'No facets are defined: the construct is treated as one dimension.' },
  );
}

/** Section: how the item pool was written, from which sources, mapped to which facets. */
export function itemsSection(w: Writer, study: Study): void {
  w.section('Item pool development');
  const items = listItems(study);
  if (items.length === 0) {
    w.notYet('the item pool', 'No items have been written.');
    return;
  }
  const facets = listFacets(study, { includeRetired: true });
  const reverse = items.filter((it) => it.keying === 'reverse').length;
  const retired = items.filter((it) => it.state === 'retired').length;
  w.para(
    `The pool held ${plural(items.length, 'item')} (${count(reverse)} reverse-keyed), each mapped to a facet and checked for readability `,
    w.cite('wording.flesch-reading-ease', 'wording.flesch-kincaid-grade'),
    ' and for common flaws of item wording: double-barrelled items, double negatives, absolutes, jargon and near-duplicate wording ',
    w.cite('wording.double-barrelled', 'wording.near-duplicate'),
    `. Of these, ${count(retired)} ${retired === 1 ? 'was' : 'were'} retired before the pilot.`,
  );
  const sources = Object.entries(SOURCE_LABEL)
    .map(([key, label]) => [label, items.filter((it) => it.sourceType === key).length] as const)
    .filter(([, n]) => n > 0);
  w.table(
    'Sources of the items in the pool',
    [
      ['Source', 'left'],
      ['Items', 'right'],
      ['Share', 'right'],
    ],
    sources.map(([label, n]) => [label, count(n), percentOf(n, items.length)]),
    { empty: 'No item records a source.' },
  );
  w.table(
    'Items per facet',
    [
      ['Facet', 'left'],
      ['Drafted', 'right'],
      ['Reverse-keyed', 'right'],
      ['Retired', 'right'],
    ],
    facets.map((f) => {
      const mine = items.filter((it) => it.facetId === f.id);
      return [
        f.name,
        count(mine.length),
        count(mine.filter((it) => it.keying === 'reverse').length),
        count(mine.filter((it) => it.state === 'retired').length),
      ];
    }),
    {
      empty: 'No facets are defined.',
      note: [
        'Several times the number of items the final scale keeps are drafted per facet ',
        w.cite('pool.items-per-facet'),
        '.',
      ],
    },
  );
}

const DECISION_WORD = { keep: 'kept', revise: 'revised', retire: 'retired' } as const;

/** Section: the expert panel, its ratings and the content-validity statistics, round by round. */
export function reviewSection(w: Writer, study: Study): void {
  w.section('Expert review of content');
  const view = reviewView(study);
  const rated = view.rounds.filter((r) => r.report !== null);
  if (rated.length === 0) {
    w.notYet('the expert review', 'No ratings from an expert panel have been imported.');
    return;
  }
  for (const round of rated) {
    const report = round.report;
    if (!report) continue;
    w.heading(3, `Review round ${round.number}${round.label ? `: ${round.label}` : ''}`);
    const roles = round.experts.map((e) => `${e.code}${e.role ? ` (${e.role})` : ''}`).join(', ');
    const scale = `${round.form.relevanceMin}–${round.form.relevanceMax}`;
    w.para(
      `${plural(round.experts.length, 'expert')} rated the relevance of ${plural(round.items.length, 'item')} on a ${scale} scale`,
      round.form.asksEssential ? ' and whether each item is essential' : '',
      `: ${roles}. Ratings of 3 or 4 count as relevant `,
      w.cite('content.relevant-ratings'),
      '. For each item the table gives the item-level content validity index (I-CVI) ',
      w.cite('content.i-cvi'),
      ', the modified kappa that adjusts it for chance agreement ',
      w.cite('content.modified-kappa'),
      round.form.asksEssential ? ', the content validity ratio (CVR) ' : '',
      round.form.asksEssential ? w.cite('content.cvr') : '',
      ' and Aiken’s V ',
      w.cite('content.aiken-v'),
      '.',
    );
    const rows = round.items
      .filter((it) => it.stats !== null)
      .map((it) => {
        const s = it.stats;
        return [
          it.code,
          it.facetName ?? '–',
          bounded(s?.iCvi, 2),
          bounded(s?.modifiedKappa, 2),
          s?.kappaBand ?? '–',
          bounded(s?.cvr, 2),
          bounded(s?.aikenV, 2),
          it.decision ? DECISION_WORD[it.decision.decision] : '–',
        ];
      });
    w.table(
      `Content validity of the items, review round ${round.number}`,
      [
        ['Item', 'left'],
        ['Facet', 'left'],
        ['I-CVI', 'right'],
        ['κ*', 'right'],
        ['κ* band', 'left'],
        ['CVR', 'right'],
        ['V', 'right'],
        ['Decision', 'left'],
      ],
      rows,
      {
        empty: `Round ${round.number} holds no item statistics.`,
        note: [
          `S-CVI/Ave = ${bounded(report.sCviAve, 2)}, S-CVI/UA = ${bounded(report.sCviUa, 2)} `,
          w.cite('content.s-cvi'),
          report.cvrCritical !== null
            ? `; critical CVR for ${round.experts.length} experts = ${bounded(report.cvrCritical, 3)} `
            : '',
          report.cvrCritical !== null ? w.cite('content.cvr-critical') : '',
          '. Benchmarks: I-CVI of 1.00 with up to five experts and at least .78 with six or more ',
          w.cite('content.i-cvi-benchmark'),
          '; S-CVI/Ave of at least .90 ',
          w.cite('content.s-cvi-ave-benchmark'),
          '; κ* bands ',
          w.cite('content.modified-kappa-bands'),
          '. κ* = modified kappa; V = Aiken’s V.',
        ],
      },
    );
    const decided = round.items.filter((it) => it.decision !== null && it.decision.decision !== 'keep');
    if (decided.length > 0) {
      w.para('Items revised or retired after this round, with the panel’s reasons as recorded:');
      w.list(
        decided.map((it) => {
          const d = it.decision;
          const parts: (string | ReturnType<typeof em>)[] = [
            { text: `${it.code} ${DECISION_WORD[d?.decision ?? 'keep']}: `, strong: true },
            d?.rationale ?? '',
          ];
          if (d?.newText) parts.push(' New wording: ', em(`“${d.newText}”`));
          return parts;
        }),
      );
    }
  }
}
