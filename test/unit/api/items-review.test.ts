import path from 'node:path';
import { afterEach, beforeEach, describe, expect, it } from 'vitest';
import { dispatch } from '../../../app/api/dispatch.ts';
import { Session } from '../../../app/api/session.ts';
import { MAX_ITEM_FILE_BYTES } from '../../../app/phases/items/index.ts';
import { TEST_ACTOR, tempDir } from '../../helpers/tmp.ts';

let tmp: ReturnType<typeof tempDir>;
let session: Session;
const b64 = (text: string) => Buffer.from(text, 'utf8').toString('base64');

async function ok<T>(name: string, input: unknown): Promise<T> {
  const result = await dispatch(session, name, input);
  if (!result.ok) throw new Error(`${name} failed: ${result.error.message}`);
  return result.value as T;
}

beforeEach(async () => {
  tmp = tempDir();
  session = new Session(TEST_ACTOR, 'test');
  session.create(path.join(tmp.dir, 's.scalewright'), 'S');
  await ok('facet.add', { name: 'Confidence in traffic', definition: 'Riding among motor vehicles.' });
  await ok('facet.add', { name: 'Route planning', definition: 'Choosing a route.' });
});
afterEach(() => {
  session.close();
  tmp.cleanup();
});

const POOL = [
  'code,text,facet,keying',
  'TR01,I can ride in a bus lane while buses pass me.,Confidence in traffic,forward',
  'TR02,I can turn across oncoming traffic at a busy junction.,Confidence in traffic,forward',
  'RP01,I can plan a bike route to a part of the city I do not know.,Route planning,forward',
].join('\n');

describe('item pool commands', () => {
  it.each([
    [
      'items.previewImport',
      { fileName: 'p.csv', content: 'not base64!' },
      /content: the file content must be base64/,
    ],
    [
      'items.previewImport',
      { fileName: 'p.csv', content: 'A'.repeat(Math.ceil(MAX_ITEM_FILE_BYTES / 3) * 4 + 4) },
      /content: the file is larger than \d+ bytes/,
    ],
    ['items.previewImport', { fileName: '', content: b64(POOL) }, /fileName: the file needs a name/],
    [
      'items.add',
      {
        code: 'T R',
        text: 'x',
        facetId: null,
        keying: 'forward',
        sourceType: 'own-drafting',
        sourceNote: '',
      },
      /code: a code is a letter or digit/,
    ],
    ['items.setState', { id: 1, state: 'gone' }, /state: Invalid option/],
    [
      'items.add',
      {
        code: 'TR01',
        text: 'x',
        facetId: null,
        keying: 'sideways',
        sourceType: 'own-drafting',
        sourceNote: '',
      },
      /keying: Invalid option/,
    ],
  ])('%s rejects %j', async (name, input, message) => {
    const result = await dispatch(session, name, input);
    expect(result.ok).toBe(false);
    if (!result.ok) {
      expect(result.error.code).toBe('invalid-input');
      expect(result.error.message).toMatch(message);
    }
  });

  it('previews a pool file without writing, imports it, and exports it again', async () => {
    const before = session.study.log.count();
    const preview = await ok<{ rows: unknown[]; problems: unknown[] }>('items.previewImport', {
      fileName: 'pool.csv',
      content: b64(POOL),
    });
    expect(preview.rows).toHaveLength(3);
    expect(preview.problems).toEqual([]);
    expect(session.study.log.count()).toBe(before);
    await ok('items.import', { fileName: 'pool.csv', content: b64(POOL), sourceType: 'interviews' });
    expect(session.study.log.count()).toBe(before + 1);
    const view = await ok<{ items: { code: string; state: string }[] }>('items.get', {});
    expect(view.items.map((it) => it.code)).toEqual(['TR01', 'TR02', 'RP01']);
    const exported = await ok<{ text: string }>('items.exportCsv', {});
    expect(exported.text).toContain(
      'TR02,I can turn across oncoming traffic at a busy junction.,Confidence in traffic',
    );
  });

  it('turns a bad pool file into a message naming row and column, and writes nothing', async () => {
    const before = session.study.log.count();
    const result = await dispatch(session, 'items.import', {
      fileName: 'pool.csv',
      content: b64('code,text,facet,keying\nTR01,I ride.,Nowhere,forward\n'),
      sourceType: 'own-drafting',
    });
    expect(result).toEqual({
      ok: false,
      error: {
        code: 'file',
        message:
          "pool.csv was not imported: row 2, column 3 ('facet'): facet 'Nowhere' is not a facet of this study; use one of Confidence in traffic, Route planning",
      },
    });
    expect(session.study.log.count()).toBe(before);
  });

  it('checks wording as it is typed', async () => {
    const check = await ok<{ wording: { flags: { check: string }[] } }>('items.checkWording', {
      text: 'I never feel unsafe and I always signal.',
    });
    expect(check.wording.flags.map((f) => f.check)).toEqual([
      'double-barrelled',
      'double-negative',
      'absolute',
    ]);
  });
});

describe('expert review commands', () => {
  async function keptPool(): Promise<void> {
    await ok('items.import', { fileName: 'pool.csv', content: b64(POOL), sourceType: 'interviews' });
    const view = await ok<{ items: { id: number }[] }>('items.get', {});
    for (const it of view.items) await ok('items.setState', { id: it.id, state: 'kept' });
  }

  it('runs a round from the panel to a logged decision', async () => {
    await keptPool();
    const roundId = await ok<number>('review.addRound', { label: 'First round' });
    await ok('review.addExpert', { roundId, code: 'E1', role: 'traffic engineer' });
    const ratings = ['item,expert,relevance,facet,comment'];
    for (const e of ['E1', 'E2', 'E3']) {
      ratings.push(
        `TR01,${e},4,Confidence in traffic,`,
        `TR02,${e},${e === 'E3' ? 2 : 4},Confidence in traffic,`,
      );
      ratings.push(`RP01,${e},3,Route planning,`);
    }
    const file = { roundId, fileName: 'ratings.csv', content: b64(ratings.join('\n')) };
    const preview = await ok<{ ratingCount: number; problems: unknown[] }>('review.previewRatings', file);
    expect(preview).toMatchObject({ ratingCount: 9, problems: [] });
    // E2 and E3 are not on the panel: refused until confirmed, then added.
    const refused = await dispatch(session, 'review.importRatings', file);
    expect(refused).toMatchObject({ ok: false, error: { code: 'unknown-experts' } });
    await ok('review.importRatings', { ...file, addExperts: ['E2', 'E3'] });
    const view = await ok<{
      rounds: { items: { code: string; itemId: number; stats: { iCvi: number; flags: string[] } }[] }[];
    }>('review.get', {});
    const tr02 = view.rounds[0].items.find((it) => it.code === 'TR02');
    expect(tr02?.stats.iCvi).toBeCloseTo(2 / 3, 12);
    // Lynn (1986): with three to five experts every expert must rate the item relevant.
    expect(tr02?.stats.flags[0]).toBe('I-CVI .67 below 1.00 (3–5 experts; Lynn 1986)');
    const missing = await dispatch(session, 'review.decide', {
      roundId,
      itemId: tr02?.itemId,
      decision: 'retire',
    });
    expect(missing.ok).toBe(false);
    if (!missing.ok) expect(missing.error.message).toMatch(/rationale: /);
    await ok('review.decide', {
      roundId,
      itemId: tr02?.itemId,
      decision: 'retire',
      rationale: 'Off the construct.',
    });
    const log = await ok<{ entries: { kind: string; target: string; rationale: string }[] }>('log.list', {
      phase: 'review',
    });
    expect(log.entries[0]).toMatchObject({
      kind: 'retired-after-review',
      target: 'item TR02',
      rationale: 'Off the construct.',
    });
    const packet = await ok<{ sections: { items: { code: string }[] }[] }>('review.packet', { roundId });
    expect(packet.sections[0].items.map((it) => it.code)).toEqual(['TR01', 'RP01', 'TR02']);
  });

  it('refuses a bad ratings file with the row and column, leaving the log as it was', async () => {
    await keptPool();
    const roundId = await ok<number>('review.addRound', {});
    const before = session.study.log.count();
    const result = await dispatch(session, 'review.importRatings', {
      roundId,
      fileName: 'ratings.csv',
      content: b64('item,expert,relevance\nTR01,E1,4\nTR01,E2,9\n'),
    });
    expect(result).toEqual({
      ok: false,
      error: {
        code: 'file',
        message:
          "ratings.csv was not imported: row 3, column 3 ('relevance'): rating 9 is outside the relevance scale 1–4",
      },
    });
    expect(session.study.log.count()).toBe(before);
  });

  it('says plainly when a round cannot start', async () => {
    const result = await dispatch(session, 'review.addRound', {});
    expect(result.ok).toBe(false);
    if (!result.ok) expect(result.error.message).toMatch(/no items are kept for review/);
  });
});
