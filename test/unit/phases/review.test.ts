import path from 'node:path';
import { afterEach, beforeEach, describe, expect, it } from 'vitest';
import { getItemByCode, listRevisions } from '../../../db/repos/items.ts';
import { setPhaseStatus } from '../../../db/repos/phase-state.ts';
import { Study } from '../../../db/study.ts';
import { fillDemoStudy } from '../../../app/demo/index.ts';
import { DEMO_OFF_DOMAIN_ITEM, DEMO_RETIRED_ITEM, DEMO_REVISED_ITEM } from '../../../app/demo/items.ts';
import { demoRoundOneFile, demoRoundTwoFile } from '../../../app/demo/review.ts';
import { addFacet } from '../../../app/phases/construct/index.ts';
import { RuleError } from '../../../app/phases/errors.ts';
import { phaseOverview, signOffPhase } from '../../../app/phases/index.ts';
import { addItem, changeItemState } from '../../../app/phases/items/index.ts';
import {
  addExpert,
  addRound,
  decideItem,
  importRatings,
  previewRatings,
  reviewPacket,
  reviewView,
  updateForm,
  withdrawRatings,
} from '../../../app/phases/review/index.ts';
import { TEST_ACTOR, tempDir } from '../../helpers/tmp.ts';

let tmp: ReturnType<typeof tempDir>;
let study: Study;
const encode = (text: string) => new TextEncoder().encode(text);
const CODES = ['TR01', 'TR02', 'TR03', 'RP01', 'RP02', 'RP03'];

function expectRule(fn: () => unknown, message: RegExp): void {
  let caught: unknown;
  try {
    fn();
  } catch (error) {
    caught = error;
  }
  expect(caught).toBeInstanceOf(RuleError);
  expect((caught as Error).message).toMatch(message);
}

/** A long-form file: one row per expert and item, `relevance[item]` listing each expert's rating in order. */
function longFile(
  relevance: Record<string, number[]>,
  extra: (item: string, e: number) => string[] = () => [],
) {
  const lines: string[] = [];
  for (const [item, ratings] of Object.entries(relevance)) {
    ratings.forEach((r, e) => {
      lines.push([item, `E${e + 1}`, String(r), ...extra(item, e)].join(','));
    });
  }
  return lines.join('\n');
}

/** All six items rated 4 by every expert, except where `overrides` says otherwise. */
function ratingsFor(experts: number, overrides: Record<string, number[]> = {}): Record<string, number[]> {
  return Object.fromEntries(CODES.map((c) => [c, overrides[c] ?? new Array(experts).fill(4)]));
}

/** Every row of every table the review phase writes, plus the log length. */
function snapshot() {
  const tables = [
    'item',
    'item_revision',
    'review_round',
    'review_form',
    'review_round_item',
    'review_expert',
    'review_import',
    'review_rating',
    'item_decision',
    'analysis_run',
    'phase_state',
  ];
  return {
    log: study.log.count(),
    ...Object.fromEntries(
      tables.map((t) => [t, study.db.prepare(`SELECT * FROM ${t} ORDER BY rowid`).all()]),
    ),
  };
}

function itemId(code: string): number {
  const item = getItemByCode(study, code);
  if (!item) throw new Error(`no item ${code}`);
  return item.id;
}

function round(id: number) {
  const view = reviewView(study).rounds.find((r) => r.id === id);
  if (!view) throw new Error(`no round ${id}`);
  return view;
}

function stats(roundId: number, code: string) {
  return round(roundId).items.find((it) => it.code === code)?.stats;
}

beforeEach(() => {
  tmp = tempDir();
  study = Study.create(path.join(tmp.dir, 'review.scalewright'), { actor: TEST_ACTOR, app: 'test' });
  const traffic = addFacet(study, 'Confidence in traffic', 'Riding among motor vehicles.');
  const routes = addFacet(study, 'Route planning', 'Choosing and adapting a route.');
  for (const code of CODES) {
    const id = addItem(study, {
      code,
      text: `Item ${code}: I can do something on my bike.`,
      facetId: code.startsWith('TR') ? traffic : routes,
      keying: 'forward',
      sourceType: 'own-drafting',
      sourceNote: '',
    });
    changeItemState(study, id, 'kept');
  }
});
afterEach(() => {
  study.close();
  tmp.cleanup();
});

/**
 * Imports a ratings file with every expert code it holds confirmed for the panel (most tests start
 * from an empty panel); the confirmation itself is tested below.
 */
function importConfirmed(study: Study, roundId: number, bytes: Uint8Array, fileName: string) {
  const unknown = previewRatings(study, roundId, bytes, fileName).unknownExperts.map((e) => e.code);
  return importRatings(study, roundId, bytes, fileName, { addExperts: unknown });
}

describe('content-validity statistics of an imported round', () => {
  it('reproduces the worked example of Polit, Beck & Owen (2007): N = 6, A = 5 gives I-CVI .83, Pc .094, k* .82', () => {
    const id = addRound(study, { label: 'R1', scope: 'kept' });
    const file = longFile(ratingsFor(6, { TR01: [4, 4, 3, 4, 3, 2], TR02: [4, 3, 2, 2, 4, 4] }));
    importConfirmed(study, id, encode(`item,expert,relevance\n${file}`), 'r.csv');
    const tr01 = stats(id, 'TR01');
    // Polit, Beck & Owen (2007), worked example in the text: I-CVI .83, Pc .094, k* .82 (excellent).
    expect(tr01?.iCvi).toBeCloseTo(0.83, 2);
    expect(tr01?.pc).toBeCloseTo(0.094, 3);
    expect(tr01?.modifiedKappa).toBeCloseTo(0.82, 2);
    expect(tr01?.kappaBand).toBe('excellent');
    expect(tr01?.flags).toEqual([]);
    // Polit & Beck (2006): with six or more experts an I-CVI of .78 or more is acceptable; 4/6 = .67 is not.
    expect(stats(id, 'TR02')?.flags[0]).toBe('I-CVI .67 below .78 (6+ experts; Polit & Beck 2006)');
    const r = round(id);
    expect(r.report?.sCviAve).toBeCloseTo((5 / 6 + 4 / 6 + 4) / 6, 12);
    expect(r.report?.sCviUa).toBeCloseTo(4 / 6, 12);
    expect(r.flagged).toBe(1);
  });

  it('applies Lynn’s (1986) benchmark of 1.00 for panels of three to five experts', () => {
    const id = addRound(study, { label: 'R1', scope: 'kept' });
    importConfirmed(
      study,
      id,
      encode(`item,expert,relevance\n${longFile(ratingsFor(5, { RP01: [4, 4, 4, 4, 2] }))}`),
      'r.csv',
    );
    expect(stats(id, 'RP01')?.flags).toContain('I-CVI .80 below 1.00 (3–5 experts; Lynn 1986)');
  });

  it('gives the exact critical CVR for the panel size when the form asks the essential question', () => {
    const id = addRound(study, { label: 'R1', scope: 'kept' });
    updateForm(study, id, { asksEssential: true, asksFacet: false, asksComment: false, instructions: '' });
    // Wilson, Pan & Schumsky (2012); Ayre & Scally (2014): critical CVR for N = 8 is .750 (6 of 8 essential).
    const essential = (item: string, e: number) => [item === 'TR03' && e >= 5 ? 'useful' : 'essential'];
    importConfirmed(
      study,
      id,
      encode(`item,expert,relevance,essential\n${longFile(ratingsFor(8), essential)}`),
      'r.csv',
    );
    const r = round(id);
    expect(r.report?.cvrCritical).toBeCloseTo(0.75, 12);
    expect(stats(id, 'TR01')?.cvr).toBe(1);
    expect(stats(id, 'TR03')?.cvr).toBeCloseTo((5 - 4) / 4, 12);
    expect(stats(id, 'TR03')?.flags[0]).toMatch(/^CVR \.25 below critical \.750 for 8 experts/);
  });

  it('stores the statistics as an analysis run named by the log row, and fixes the rated wording', () => {
    const id = addRound(study, { label: 'R1', scope: 'kept' });
    importConfirmed(study, id, encode(`item,expert,relevance\n${longFile(ratingsFor(4))}`), 'r.csv');
    const entry = study.log.list({ limit: 1 })[0];
    expect(entry).toMatchObject({
      phase: 'review',
      kind: 'ratings-imported',
      target: 'round 1: file "r.csv"',
    });
    expect(entry.runId).not.toBeNull();
    const run = study.db.prepare('SELECT * FROM analysis_run WHERE id = ?').get(entry.runId) as Record<
      string,
      string
    >;
    expect(run.kind).toBe('content-validity');
    expect(JSON.parse(run.results).sCviAve).toBe(1);
    expect(JSON.parse(run.inputs).files[0].sha256).toBe(entry.detail.sha256);
    const frozen = study.db
      .prepare('SELECT count(*) AS n FROM review_round_item WHERE revision_id IS NULL')
      .get() as {
      n: number;
    };
    expect(frozen.n).toBe(0);
  });
});

describe('bad rating files are refused with the row and column, and the study stays unchanged', () => {
  const header = 'item,expert,relevance';
  it.each([
    [
      'wrong columns',
      'code,expert,relevance\nTR01,E1,4\n',
      /^row 1, column 1 \('code'\): unexpected column 'code'; the long form accepts item, expert, relevance/,
    ],
    [
      'columns that are neither layout',
      'item,rater,score\nTR01,E1,4\n',
      /^row 2, column 2 \('rater'\): 'E1' is not a number; relevance is a whole number from 1 to 4 \(read as the wide form/,
    ],
    [
      'an out-of-range rating',
      `${header}\nTR01,E1,4\nTR02,E1,5\n`,
      /^row 3, column 3 \('relevance'\): rating 5 is outside the relevance scale 1–4/,
    ],
    [
      'an out-of-range rating in the wide form',
      'item,E1,E2\nTR01,4,3\nTR02,0,4\n',
      /^row 3, column 2 \('E1'\): rating 0 is outside the relevance scale 1–4/,
    ],
    [
      'a non-numeric rating',
      `${header}\nTR01,E1,high\n`,
      /^row 2, column 3 \('relevance'\): 'high' is not a number/,
    ],
    [
      'an unknown item',
      `${header}\nTR01,E1,4\nXX99,E1,4\n`,
      /^row 3, column 1 \('item'\): item 'XX99' is not in the item pool/,
    ],
    [
      'a duplicate expert-item pair',
      `${header}\nTR01,E1,4\nTR02,E1,3\nTR01,E1,2\n`,
      /^row 4, column 2 \('expert'\): expert 'E1' already rated item 'TR01' on row 2/,
    ],
    [
      'a duplicate pair that differs only in letter case',
      `${header}\nTR01,E1,4\ntr01,e1,2\n`,
      /^row 3, column 2 \('expert'\): expert 'e1' already rated item 'tr01' on row 2/,
    ],
    ['an empty file', '', /^row 1: file "ratings.csv" is empty \(0 bytes\)/],
    ['a header without data', `${header}\n`, /^row 1: file "ratings.csv" has a header row but no data rows/],
    [
      'a delimiter that is not recognised',
      'item:expert:relevance\nTR01:E1:4\n',
      /^row 1: the header must be item,expert,relevance.*found item:expert:relevance/,
    ],
    ['a ragged row', `${header}\nTR01,E1\n`, /row 2/],
    [
      'a facet placement the study does not have',
      'item,expert,relevance,facet\nTR01,E1,4,Bike handling\n',
      /^row 2, column 4 \('facet'\): 'Bike handling' is not a facet of this study; use one of Confidence in traffic, Route planning/,
    ],
    [
      'an essential column the form did not ask for',
      'item,expert,relevance,essential\nTR01,E1,4,yes\n',
      /^row 1, column 4 \('essential'\): the rating form of round 1 did not ask the essential question/,
    ],
  ])('%s', (_label, content, message) => {
    const id = addRound(study, { label: 'R1', scope: 'kept' });
    const before = snapshot();
    const preview = previewRatings(study, id, encode(content), 'ratings.csv');
    expect(preview.problems.length).toBeGreaterThan(0);
    expect(preview.problems[0].text).toMatch(message);
    expect(snapshot()).toEqual(before);
    expectRule(
      () => importConfirmed(study, id, encode(content), 'ratings.csv'),
      /^ratings\.csv was not imported: row \d/,
    );
    expect(snapshot()).toEqual(before);
  });

  it('names an item of the pool that the round does not cover', () => {
    const first = addRound(study, { label: 'R1', scope: 'kept' });
    importConfirmed(study, first, encode(`item,expert,relevance\n${longFile(ratingsFor(3))}`), 'r1.csv');
    decideItem(study, {
      roundId: first,
      itemId: itemId('TR01'),
      decision: 'revise',
      rationale: 'Clearer.',
      newText: 'I can ride in a bus lane.',
    });
    const second = addRound(study, { label: 'R2', scope: 'revised' });
    const preview = previewRatings(study, second, encode('item,expert,relevance\nTR02,E1,4\n'), 'r2.csv');
    expect(preview.problems[0].text).toBe(
      "row 2, column 1 ('item'): item 'TR02' is in the pool but not in round 2 (the round covers 1 item)",
    );
  });

  it('reads a semicolon-separated file like a comma-separated one', () => {
    const id = addRound(study, { label: 'R1', scope: 'kept' });
    const preview = previewRatings(
      study,
      id,
      encode('item;expert;relevance\nTR01;E1;4\nTR01;E2;3\n'),
      'r.csv',
    );
    expect(preview.problems).toEqual([]);
    expect(preview.delimiter).toBe('semicolon');
    expect(preview.ratingCount).toBe(2);
  });

  it('refuses a second rating of a pair already stored, naming the earlier file', () => {
    const id = addRound(study, { label: 'R1', scope: 'kept' });
    importConfirmed(study, id, encode('item,expert,relevance\nTR01,E1,4\n'), 'first.csv');
    const before = snapshot();
    expectRule(
      () => importConfirmed(study, id, encode('item,expert,relevance\nTR02,E1,4\nTR01,E1,3\n'), 'second.csv'),
      /row 3, column 2 \('expert'\): expert E1 already has a rating for TR01 in round 1 \(from "first\.csv"\)/,
    );
    expect(snapshot()).toEqual(before);
  });
});

describe('the panel and the rating form', () => {
  it('treats an expert code not on the panel as a problem to confirm: refused, the study is unchanged; confirmed, added', () => {
    const id = addRound(study, { label: 'R1', scope: 'kept' });
    addExpert(study, id, { code: 'E1', role: 'traffic engineer', name: '', nameWithheld: false });
    const content = encode('item,expert,relevance\nTR01,e1,4\nTR01,E2,3\nTR02,E2,4\n');
    const preview = previewRatings(study, id, content, 'r.csv');
    expect(preview.experts).toEqual([
      { code: 'E1', onPanel: true, ratings: 1 },
      { code: 'E2', onPanel: false, ratings: 2 },
    ]);
    expect(preview.unknownExperts).toEqual([
      expect.objectContaining({ code: 'E2', ratings: 2, row: 3, column: 'expert', closest: 'E1' }),
    ]);
    expect(preview.unknownExperts[0].text).toBe(
      "row 3, column 2 ('expert'): expert code 'E2' (2 ratings) is not on the panel of round 1 (did you mean E1?); correct the file, or confirm adding the expert to the panel",
    );
    const before = { log: study.log.count(), experts: round(id).experts.length };
    expect(() => importRatings(study, id, content, 'r.csv')).toThrow(
      /^r\.csv was not imported: row 3, column 2 \('expert'\): expert code 'E2'/,
    );
    expect(() => importRatings(study, id, content, 'r.csv', { addExperts: ['E3'] })).toThrow(RuleError);
    expect({ log: study.log.count(), experts: round(id).experts.length }).toEqual(before);
    importRatings(study, id, content, 'r.csv', { addExperts: ['e2'] });
    expect(round(id).experts.map((e) => [e.code, e.role, e.ratings])).toEqual([
      ['E1', 'traffic engineer', 1],
      ['E2', '', 2],
    ]);
    expect(study.log.list({ limit: 1 })[0].detail).toMatchObject({ addedToPanel: ['E2'] });
  });

  it('never writes an expert’s name into the append-only log', () => {
    const id = addRound(study, { label: 'R1', scope: 'kept' });
    addExpert(study, id, {
      code: 'E1',
      role: 'cycling instructor',
      name: 'Invented Person',
      nameWithheld: true,
    });
    const entry = study.log.list({ limit: 1 })[0];
    expect(entry.detail).toEqual({ code: 'E1', role: 'cycling instructor', named: true, nameWithheld: true });
    expect(JSON.stringify(study.log.list())).not.toContain('Invented Person');
    expect(round(id).experts[0]).toMatchObject({ name: 'Invented Person', nameWithheld: true });
  });

  it('keeps the form the experts answered: it cannot change once ratings exist', () => {
    const id = addRound(study, { label: 'R1', scope: 'kept' });
    updateForm(study, id, {
      asksEssential: true,
      asksFacet: true,
      asksComment: true,
      instructions: 'Rate each.',
    });
    expect(round(id).form).toMatchObject({ asksEssential: true, relevanceMin: 1, relevanceMax: 4 });
    importConfirmed(study, id, encode('item,expert,relevance\nTR01,E1,4\n'), 'r.csv');
    expectRule(
      () =>
        updateForm(study, id, { asksEssential: false, asksFacet: true, asksComment: true, instructions: '' }),
      /round 1 already has ratings, so the rating form cannot change now/,
    );
  });

  it('withdraws an import with a reason, keeping its record', () => {
    const id = addRound(study, { label: 'R1', scope: 'kept' });
    importConfirmed(study, id, encode(`item,expert,relevance\n${longFile(ratingsFor(3))}`), 'r.csv');
    const importId = round(id).imports[0].id;
    expectRule(
      () => withdrawRatings(study, importId, ' '),
      /say why the ratings from "r\.csv" are withdrawn/,
    );
    withdrawRatings(study, importId, 'Wrong round.');
    const r = round(id);
    expect(r.ratingCount).toBe(0);
    expect(r.report).toBeNull();
    expect(r.imports[0].withdrawnAt).not.toBeNull();
    expect(study.log.list({ limit: 1 })[0]).toMatchObject({
      kind: 'ratings-withdrawn',
      rationale: 'Wrong round.',
    });
  });

  it('prints a packet that hides the intended facet when experts are asked to place items', () => {
    const id = addRound(study, { label: 'R1', scope: 'kept' });
    const packet = reviewPacket(study, id);
    expect(packet.anchors.map((a) => `${a.value} ${a.label}`)).toEqual([
      '1 not relevant',
      '2 somewhat relevant',
      '3 quite relevant',
      '4 highly relevant',
    ]);
    expect(packet.sections).toHaveLength(1);
    expect(packet.sections[0].items.map((it) => it.code)).toEqual([
      'TR01',
      'RP01',
      'TR02',
      'RP02',
      'TR03',
      'RP03',
    ]);
    expect(packet.facets.map((f) => f.definition)).toEqual([
      'Riding among motor vehicles.',
      'Choosing and adapting a route.',
    ]);
    updateForm(study, id, { asksEssential: false, asksFacet: false, asksComment: true, instructions: '' });
    const grouped = reviewPacket(study, id);
    expect(grouped.sections.map((s) => [s.facet, s.items.map((it) => it.number)])).toEqual([
      ['Confidence in traffic', [1, 2, 3]],
      ['Route planning', [4, 5, 6]],
    ]);
  });
});

describe('decisions and later rounds', () => {
  it('revises with new wording, retires and keeps, each logged with its rationale and statistics', () => {
    const id = addRound(study, { label: 'R1', scope: 'kept' });
    expectRule(
      () => decideItem(study, { roundId: id, itemId: itemId('TR01'), decision: 'keep', rationale: 'Fine.' }),
      /round 1 has no ratings yet/,
    );
    importConfirmed(
      study,
      id,
      encode(
        `item,expert,relevance\n${longFile(ratingsFor(6, { TR02: [4, 3, 2, 2, 1, 4], RP03: [2, 2, 1, 4, 3, 2] }))}`,
      ),
      'r.csv',
    );
    const runId = study.log.list({ limit: 1 })[0].runId;
    expectRule(
      () =>
        decideItem(study, { roundId: id, itemId: itemId('TR02'), decision: 'revise', rationale: 'Clearer.' }),
      /needs the new wording/,
    );
    decideItem(study, {
      roundId: id,
      itemId: itemId('TR02'),
      decision: 'revise',
      rationale: 'Two experts found it vague.',
      newText: 'I can ride past a line of parked cars.',
    });
    const entry = study.log.list({ limit: 1 })[0];
    expect(entry).toMatchObject({
      phase: 'review',
      kind: 'revised-after-review',
      target: 'item TR02',
      rationale: 'Two experts found it vague.',
      runId,
      detail: { round: 1, decision: 'revise', after: 'I can ride past a line of parked cars.' },
    });
    expect((entry.detail.stats as { iCvi: number }).iCvi).toBeCloseTo(3 / 6, 12);
    const revisions = listRevisions(study, itemId('TR02'));
    expect(revisions.at(-1)).toMatchObject({ number: 2, reason: 'revised-after-review', roundId: id });
    decideItem(study, {
      roundId: id,
      itemId: itemId('RP03'),
      decision: 'retire',
      rationale: 'Off the construct.',
    });
    expect(getItemByCode(study, 'RP03')?.state).toBe('retired');
    const r = round(id);
    expect(r.flagged).toBe(2);
    expect(r.decided).toBe(2);
    const tr02 = r.items.find((it) => it.code === 'TR02');
    expect(tr02?.text).toBe('Item TR02: I can do something on my bike.');
    expect(tr02?.rewordedSince).toBe(true);
    expect(tr02?.decision?.newText).toBe('I can ride past a line of parked cars.');
  });

  it('re-rates revised items in a second round and shows both rounds side by side', () => {
    const first = addRound(study, { label: 'R1', scope: 'kept' });
    importConfirmed(
      study,
      first,
      encode(`item,expert,relevance\n${longFile(ratingsFor(6, { TR02: [4, 3, 2, 2, 1, 4] }))}`),
      'r1.csv',
    );
    decideItem(study, {
      roundId: first,
      itemId: itemId('TR02'),
      decision: 'revise',
      rationale: 'Vague.',
      newText: 'I can ride past a line of parked cars.',
    });
    const second = addRound(study, { label: 'R2', scope: 'revised' });
    expect(round(second).items.map((it) => it.code)).toEqual(['TR02']);
    expect(round(second).experts.map((e) => e.code)).toEqual(['E1', 'E2', 'E3', 'E4', 'E5', 'E6']);
    importConfirmed(
      study,
      second,
      encode(`item,expert,relevance\n${longFile({ TR02: [4, 4, 3, 4, 4, 4] })}`),
      'r2.csv',
    );
    expect(round(second).items[0].text).toBe('I can ride past a line of parked cars.');
    const { comparison } = reviewView(study);
    expect(comparison.rounds).toEqual([1, 2]);
    const row = comparison.rows.find((r) => r.code === 'TR02');
    expect(row?.cells[1]?.iCvi).toBeCloseTo(0.5, 12);
    expect(row?.cells[2]?.iCvi).toBe(1);
  });

  it('signs off once three or more experts rated every item and every flagged item is decided', () => {
    setPhaseStatus(study, 'items', 'signed-off');
    const unmet = () =>
      phaseOverview(study, 'review')
        .checklist.filter((c) => !c.met)
        .map((c) => `${c.id}: ${c.detail}`);
    expect(unmet()).toEqual([
      'panel: no review round yet',
      'rated: no ratings yet',
      'decided: no ratings yet',
    ]);
    const id = addRound(study, { label: 'R1', scope: 'kept' });
    const some = Object.fromEntries(
      Object.entries(ratingsFor(3, { RP01: [4, 2, 4] })).filter(([c]) => c !== 'RP03'),
    );
    importConfirmed(study, id, encode(`item,expert,relevance\n${longFile(some)}`), 'r.csv');
    expect(unmet()).toEqual(['rated: round 1, not rated: RP03', 'decided: undecided: RP01 (round 1)']);
    importConfirmed(
      study,
      id,
      encode('item,expert,relevance\nRP03,E1,4\nRP03,E2,4\nRP03,E3,4\n'),
      'rp03.csv',
    );
    decideItem(study, {
      roundId: id,
      itemId: itemId('RP01'),
      decision: 'keep',
      rationale: 'Core content; one expert misread it.',
    });
    expect(unmet()).toEqual([]);
    signOffPhase(study, 'review', 'Panel agreed.');
    expectRule(
      () => decideItem(study, { roundId: id, itemId: itemId('RP01'), decision: 'retire', rationale: 'x' }),
      /Expert review phase is signed off/,
    );
  });
});

describe('the demo review', () => {
  it('is generated the same way every time', () => {
    expect(demoRoundOneFile()).toBe(demoRoundOneFile());
    expect(demoRoundTwoFile()).toBe(demoRoundTwoFile());
  });

  it('has exactly two items below the benchmarks, both decided, and keeps the off-domain item', () => {
    const demo = Study.create(
      path.join(tmp.dir, 'demo.scalewright'),
      { actor: TEST_ACTOR, app: 'test' },
      { init: fillDemoStudy },
    );
    try {
      const [first, second] = reviewView(demo).rounds;
      expect(first.report?.experts).toHaveLength(7);
      const flagged = first.items.filter((it) => (it.stats?.flags.length ?? 0) > 0);
      expect(flagged.map((it) => [it.code, it.decision?.decision])).toEqual([
        [DEMO_REVISED_ITEM, 'revise'],
        [DEMO_RETIRED_ITEM, 'retire'],
      ]);
      expect(second.items.map((it) => [it.code, it.stats?.iCvi])).toEqual([[DEMO_REVISED_ITEM, 1]]);
      expect(getItemByCode(demo, DEMO_OFF_DOMAIN_ITEM)?.state).toBe('kept');
      expect(phaseOverview(demo, 'items').status).toBe('signed-off');
      expect(phaseOverview(demo, 'review').status).toBe('signed-off');
      expect(demo.log.verify()).toEqual([]);
    } finally {
      demo.close();
    }
  });
});
