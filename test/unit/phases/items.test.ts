import path from 'node:path';
import { afterEach, beforeEach, describe, expect, it } from 'vitest';
import { listRevisions } from '../../../db/repos/items.ts';
import { setPhaseStatus } from '../../../db/repos/phase-state.ts';
import { Study } from '../../../db/study.ts';
import { addFacet } from '../../../app/phases/construct/index.ts';
import { RuleError } from '../../../app/phases/errors.ts';
import { phaseOverview, signOffPhase } from '../../../app/phases/index.ts';
import {
  addItem,
  changeItemState,
  checkWording,
  editItem,
  exportItemsCsv,
  importItems,
  type ItemInput,
  itemsView,
  MIN_ITEMS_PER_FACET,
  previewItemImport,
  rewordItem,
} from '../../../app/phases/items/index.ts';
import { TEST_ACTOR, tempDir } from '../../helpers/tmp.ts';

let tmp: ReturnType<typeof tempDir>;
let study: Study;
let traffic: number;
let routes: number;
const encode = (text: string) => new TextEncoder().encode(text);

function item(code: string, text: string, facetId: number | null, extra: Partial<ItemInput> = {}): number {
  return addItem(study, {
    code,
    text,
    facetId,
    keying: 'forward',
    sourceType: 'own-drafting',
    sourceNote: '',
    ...extra,
  });
}

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

/** Every row of every table the item pool writes, plus the log length: "the study is unchanged" means this is equal. */
function snapshot() {
  const tables = ['item', 'item_revision', 'phase_state'];
  return {
    log: study.log.count(),
    ...Object.fromEntries(
      tables.map((t) => [t, study.db.prepare(`SELECT * FROM ${t} ORDER BY rowid`).all()]),
    ),
  };
}

beforeEach(() => {
  tmp = tempDir();
  study = Study.create(path.join(tmp.dir, 'items.scalewright'), { actor: TEST_ACTOR, app: 'test' });
  traffic = addFacet(study, 'Confidence in traffic', 'Riding among motor vehicles.');
  routes = addFacet(study, 'Route planning', 'Choosing and adapting a route.');
});
afterEach(() => {
  study.close();
  tmp.cleanup();
});

describe('items and their revisions', () => {
  it('adds a draft item, logs it, and keeps every rewording as a revision', () => {
    const before = study.log.count();
    const id = item('TR01', 'I can ride in a bus lane.', traffic);
    expect(study.log.count()).toBe(before + 1);
    expect(study.log.list({ limit: 1 })[0]).toMatchObject({
      phase: 'items',
      kind: 'item-added',
      target: 'item TR01',
    });
    expect(phaseOverview(study, 'items').status).toBe('in-progress');
    rewordItem(study, id, 'I can ride in a bus lane while buses pass me.');
    rewordItem(study, id, 'I can ride in a bus lane while buses pass me.');
    const revisions = listRevisions(study, id);
    expect(revisions.map((r) => [r.number, r.reason, r.text])).toEqual([
      [1, 'drafted', 'I can ride in a bus lane.'],
      [2, 'edited', 'I can ride in a bus lane while buses pass me.'],
    ]);
    const log = study.log.list({ limit: 1 })[0];
    expect(log.kind).toBe('item-reworded');
    expect(log.detail).toMatchObject({ revision: 2, before: 'I can ride in a bus lane.' });
    expect(study.log.count()).toBe(before + 2);
  });

  it('refuses codes that clash (ignoring case) or break the pattern, blank wording and unknown facets', () => {
    item('TR01', 'I can ride in a bus lane.', traffic);
    expectRule(() => item('tr01', 'Another item.', traffic), /already exists/);
    expectRule(() => item('T R', 'Another item.', traffic), /cannot be used/);
    expectRule(() => item('TR02', '   ', traffic), /needs its wording/);
    expectRule(() => item('TR02', 'Another item.', 99), /not an active facet/);
  });

  it('logs facet mapping with before and after, and retires and restores only with a reason', () => {
    const id = item('TR01', 'I can ride in a bus lane.', null);
    editItem(study, id, { facetId: routes });
    expect(study.log.list({ limit: 1 })[0]).toMatchObject({
      kind: 'item-mapped',
      detail: { facet: { before: null, after: 'Route planning' } },
    });
    expectRule(() => changeItemState(study, id, 'retired'), /say why item TR01 is retired/);
    changeItemState(study, id, 'retired', 'Off the construct.');
    expect(study.log.list({ limit: 1 })[0]).toMatchObject({
      kind: 'item-retired',
      rationale: 'Off the construct.',
    });
    expectRule(() => rewordItem(study, id, 'New words.'), /retired; restore it/);
    expectRule(() => changeItemState(study, id, 'draft'), /say why item TR01 is restored/);
    changeItemState(study, id, 'draft', 'Back after discussion.');
    expect(study.log.list({ limit: 1 })[0].kind).toBe('item-restored');
  });
});

describe('facet coverage and wording checks', () => {
  it('counts items and the reverse-keyed share per facet and warns below three items (common practice)', () => {
    item('TR01', 'I can ride in a bus lane.', traffic);
    item('TR02', 'I can pass a parked van.', traffic, { keying: 'reverse' });
    item('TR03', 'I can turn at a junction.', traffic);
    item('TR04', 'I can ride in rush hour.', traffic, { keying: 'reverse' });
    item('RP01', 'I can plan a route.', routes);
    const retired = item('RP02', 'I can read a map.', routes);
    changeItemState(study, retired, 'retired', 'duplicate');
    const view = itemsView(study);
    const [t, r] = view.coverage;
    expect([t.items, t.reverse, t.reverseShare, t.warning]).toEqual([4, 2, 0.5, null]);
    expect([r.items, r.reverse, r.codes]).toEqual([1, 0, ['RP01']]);
    expect(r.warning).toMatch(
      new RegExp(`only 1 item: fewer than ${MIN_ITEMS_PER_FACET} \\(common practice`),
    );
  });

  it('shows the wording flags of each item and the near-duplicate pairs of the pool', () => {
    item('TR05', 'I can ride in heavy traffic and on unlit roads at night.', traffic);
    item('RP02', 'I can find a quieter street when my usual route is busy.', routes);
    item('RP06', 'I can find a quiet street when my usual route is too busy.', routes);
    const view = itemsView(study);
    const byCode = new Map(view.items.map((it) => [it.code, it]));
    expect(byCode.get('TR05')?.wording.flags.map((f) => f.check)).toEqual(['double-barrelled']);
    expect(byCode.get('RP02')?.nearDuplicates).toEqual(['RP06']);
    expect(view.nearDuplicates).toHaveLength(1);
    expect(view.nearDuplicates[0].similarity).toBeGreaterThanOrEqual(view.nearDuplicateThreshold);
  });

  it('checks a text as it is typed against the rest of the pool, not against the item itself', () => {
    const id = item('RP02', 'I can find a quieter street when my usual route is busy.', routes);
    const own = checkWording(study, 'I can find a quieter street when my usual route is busy.', id);
    expect(own.duplicates).toEqual([]);
    const typed = checkWording(study, 'I can always find a quieter street when my usual route is busy.');
    expect(typed.duplicates.map((d) => d.code)).toEqual(['RP02']);
    expect(typed.wording.flags.map((f) => f.check)).toContain('absolute');
  });
});

describe('the item pool checklist', () => {
  it('asks for mapped, triaged items and three per facet before sign-off, then locks the pool', () => {
    const ids = [
      item('TR01', 'I can ride in a bus lane.', traffic),
      item('TR02', 'I can pass a parked van.', traffic),
      item('TR03', 'I can turn at a junction.', traffic),
      item('RP01', 'I can plan a route.', routes),
      item('RP02', 'I can find a quiet street.', routes),
      item('RP03', 'I can judge a street.', null),
    ];
    const unmet = () =>
      phaseOverview(study, 'items')
        .checklist.filter((c) => !c.met)
        .map((c) => c.id);
    expect(unmet()).toEqual(['previous-signed-off', 'mapped', 'coverage', 'triaged']);
    editItem(study, ids[5], { facetId: routes });
    for (const id of ids) changeItemState(study, id, 'kept');
    expect(unmet()).toEqual(['previous-signed-off']);
  });

  it('refuses changes once the phase is signed off', () => {
    setPhaseStatus(study, 'items', 'signed-off');
    expectRule(() => item('TR01', 'I can ride in a bus lane.', traffic), /Item pool phase is signed off/);
  });

  it('signs off a complete pool', () => {
    setPhaseStatus(study, 'construct', 'signed-off');
    for (const [code, facet] of [
      ['TR01', traffic],
      ['TR02', traffic],
      ['TR03', traffic],
      ['RP01', routes],
      ['RP02', routes],
      ['RP03', routes],
    ] as const) {
      changeItemState(study, item(code, `Item ${code} wording here.`, facet), 'kept');
    }
    signOffPhase(study, 'items', 'Pool agreed.');
    expect(phaseOverview(study, 'items').status).toBe('signed-off');
  });
});

describe('importing an item pool from CSV', () => {
  const good = [
    'code,text,facet,keying',
    'TR01,I can ride in a bus lane.,Confidence in traffic,forward',
    'TR02,"I can turn across traffic, even at a busy junction.",confidence in traffic,reverse',
    'RP01,I can plan a route.,Route planning,',
  ].join('\n');

  it('previews the rows without writing anything, then imports them in one logged transaction', () => {
    const before = snapshot();
    const preview = previewItemImport(study, encode(good), 'pool.csv');
    expect(preview.problems).toEqual([]);
    expect(preview.rows.map((r) => [r.row, r.code, r.facetName, r.keying])).toEqual([
      [2, 'TR01', 'Confidence in traffic', 'forward'],
      [3, 'TR02', 'Confidence in traffic', 'reverse'],
      [4, 'RP01', 'Route planning', 'forward'],
    ]);
    expect(preview.warnings).toContain('keying is blank on row 4: read as forward');
    expect(snapshot()).toEqual(before);
    const result = importItems(study, encode(good), 'pool.csv', {
      sourceType: 'literature',
      sourceNote: 'Course outlines',
    });
    expect(result).toEqual({ added: 3, codes: ['TR01', 'TR02', 'RP01'] });
    expect(study.log.count()).toBe(before.log + 1);
    const entry = study.log.list({ limit: 1 })[0];
    expect(entry).toMatchObject({ kind: 'items-imported', target: 'file "pool.csv"', detail: { items: 3 } });
    expect(entry.detail.sha256).toMatch(/^[0-9a-f]{64}$/);
    const items = itemsView(study).items;
    expect(items.map((it) => [it.code, it.state, it.sourceType, it.sourceNote])).toEqual([
      ['TR01', 'draft', 'literature', 'Course outlines'],
      ['TR02', 'draft', 'literature', 'Course outlines'],
      ['RP01', 'draft', 'literature', 'Course outlines'],
    ]);
    expect(listRevisions(study, items[1].id)[0]).toMatchObject({
      reason: 'imported',
      text: 'I can turn across traffic, even at a busy junction.',
    });
  });

  it.each([
    ['a missing column', 'code,text,facet\nTR01,x,Route planning\n', /^row 1: the header lacks 'keying'/],
    [
      'a blank code',
      'code,text,facet,keying\n,I ride.,Route planning,forward\n',
      /^row 2, column 1 \('code'\): the item code is blank/,
    ],
    [
      'a repeated code',
      'code,text,facet,keying\nTR01,I ride.,Route planning,forward\ntr01,I ride more.,Route planning,forward\n',
      /^row 3, column 1 \('code'\): item code 'tr01' already appears on row 2/,
    ],
    [
      'an unknown facet',
      'code,text,facet,keying\nTR01,I ride.,Bike handling,forward\n',
      /^row 2, column 3 \('facet'\): facet 'Bike handling' is not a facet of this study; use one of Confidence in traffic, Route planning/,
    ],
    [
      'a bad keying',
      'code,text,facet,keying\nTR01,I ride.,Route planning,backwards\n',
      /^row 2, column 4 \('keying'\): 'backwards' is not a keying; use forward or reverse/,
    ],
    [
      'a blank wording',
      'code,text,facet,keying\nTR01,,Route planning,forward\n',
      /^row 2, column 2 \('text'\): the item wording is blank/,
    ],
    ['an empty file', '', /^row 1: file "bad.csv" is empty/],
    ['a ragged row', 'code,text,facet,keying\nTR01,I ride.,Route planning\n', /row 2/],
  ])('names the row and column of %s, and writes nothing', (_label, content, message) => {
    const before = snapshot();
    const preview = previewItemImport(study, encode(content), 'bad.csv');
    expect(preview.problems.length).toBeGreaterThan(0);
    expect(preview.problems[0].text).toMatch(message);
    expectRule(
      () => importItems(study, encode(content), 'bad.csv', { sourceType: 'own-drafting', sourceNote: '' }),
      /bad\.csv was not imported: row \d/,
    );
    expect(snapshot()).toEqual(before);
  });

  it('refuses a code that is already in the pool', () => {
    item('TR01', 'I can ride in a bus lane.', traffic);
    const preview = previewItemImport(study, encode(good), 'pool.csv');
    expect(preview.problems.map((p) => p.text)).toEqual([
      "row 2, column 1 ('code'): item code 'TR01' is already in the pool (TR01)",
    ]);
  });

  it('reads a semicolon-separated file the same way', () => {
    const semicolons =
      'code;text;facet;keying\nTR01;I can ride in a bus lane, calmly.;Confidence in traffic;forward\n';
    const preview = previewItemImport(study, encode(semicolons), 'pool.csv');
    expect(preview.delimiter).toBe('semicolon');
    expect(preview.problems).toEqual([]);
    expect(preview.rows[0].text).toBe('I can ride in a bus lane, calmly.');
  });

  it('exports the pool to CSV that imports back into another study unchanged', () => {
    item('TR01', 'I can ride "in" a bus lane, calmly.', traffic, {
      sourceType: 'interviews',
      sourceNote: 'Wave 1',
    });
    item('RP01', 'I can plan a route.', routes, { keying: 'reverse' });
    const exported = exportItemsCsv(study);
    expect(exported.text.split('\r\n')[0]).toBe('code,text,facet,keying,source,source_note,state,revisions');
    const other = Study.create(path.join(tmp.dir, 'other.scalewright'), { actor: TEST_ACTOR, app: 'test' });
    try {
      addFacet(other, 'Confidence in traffic', '');
      addFacet(other, 'Route planning', '');
      const preview = previewItemImport(other, encode(exported.text), exported.fileName);
      expect(preview.problems).toEqual([]);
      expect(preview.warnings.filter((w) => w.includes('is not read'))).toHaveLength(2);
      importItems(other, encode(exported.text), exported.fileName, {
        sourceType: 'own-drafting',
        sourceNote: '',
      });
      const strip = (s: Study) =>
        itemsView(s).items.map((it) => [
          it.code,
          it.text,
          it.facetName,
          it.keying,
          it.sourceType,
          it.sourceNote,
        ]);
      expect(strip(other)).toEqual(strip(study));
    } finally {
      other.close();
    }
  });
});
