import path from 'node:path';
import Papa from 'papaparse';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { dispatch } from '../../../app/api/dispatch.ts';
import { Session } from '../../../app/api/session.ts';
import { fillDemoStudy } from '../../../app/demo/index.ts';
import type { LogEntry } from '../../../db/decision-log.ts';
import { Study } from '../../../db/study.ts';
import type { VerifyReport } from '../../../db/verify.ts';
import { TEST_ACTOR, tempDir } from '../../helpers/tmp.ts';

let tmp: ReturnType<typeof tempDir>;
let session: Session;
beforeAll(() => {
  tmp = tempDir();
  const file = path.join(tmp.dir, 'demo.scalewright');
  Study.create(file, { actor: TEST_ACTOR, app: 'test' }, { init: fillDemoStudy }).close();
  session = new Session(TEST_ACTOR, 'test');
  session.open(file);
}, 60_000);
afterAll(() => {
  session.close();
  tmp.cleanup();
});

type Page = { total: number; entries: LogEntry[]; head: string; kinds: string[] };

async function ok<T>(name: string, input: unknown): Promise<T> {
  const result = await dispatch(session, name, input);
  if (!result.ok) throw new Error(result.error.message);
  return result.value as T;
}

describe('log.list: search, filters and paging', () => {
  it('pages newest first and reports the head and the kinds', async () => {
    const all = await ok<Page>('log.list', { limit: 1000 });
    expect(all.total).toBe(session.study.log.count());
    expect(all.head).toBe(`${all.entries[0].seq}:${all.entries[0].hash}`);
    expect(all.kinds).toContain('item-added');
    const second = await ok<Page>('log.list', { limit: 10, offset: 10 });
    expect(second.total).toBe(all.total);
    expect(second.entries.map((e) => e.seq)).toEqual(all.entries.slice(10, 20).map((e) => e.seq));
  });

  it('narrows by phase, kind, item and text, and the filters combine', async () => {
    const all = (await ok<Page>('log.list', { limit: 1000 })).entries;
    const byItem = await ok<Page>('log.list', { item: 'tr03', limit: 1000 });
    expect(byItem.entries.map((e) => e.seq)).toEqual(
      all.filter((e) => /^item TR03( |$)/i.test(e.target)).map((e) => e.seq),
    );
    expect(byItem.total).toBeGreaterThanOrEqual(3);
    const kind = await ok<Page>('log.list', { kind: 'item-reworded', limit: 1000 });
    expect(kind.entries.map((e) => e.target).sort()).toEqual(['item BH08', 'item TR03']);
    const both = await ok<Page>('log.list', { kind: 'item-reworded', item: 'BH08' });
    expect(both.total).toBe(1);
    const phase = await ok<Page>('log.list', { phase: 'construct', limit: 1000 });
    expect(phase.entries.every((e) => e.phase === 'construct')).toBe(true);
    expect(phase.total).toBe(all.filter((e) => e.phase === 'construct').length);
    // Text is searched in the target, the rationale and the kind (with or without its hyphen).
    const search = await ok<Page>('log.list', { search: 'SIGNED OFF', limit: 1000 });
    expect(search.total).toBe(
      all.filter((e) => e.kind === 'signed-off' || /signed off/i.test(`${e.target} ${e.rationale}`)).length,
    );
    expect(search.total).toBeGreaterThan(0);
    // LIKE's wildcards are taken literally.
    expect((await ok<Page>('log.list', { search: '%' })).total).toBe(
      all.filter((e) => `${e.target}${e.rationale}${e.kind}`.includes('%')).length,
    );
    expect((await ok<Page>('log.list', { item: '_R03' })).total).toBe(0);
  });

  it.each([
    [{ phase: 'nowhere' }, /phase: Invalid option/],
    [{ limit: 0 }, /limit: /],
    [{ offset: -1 }, /offset: /],
    [{ item: 'x'.repeat(21) }, /item: /],
    [{ kind: 42 }, /kind: .*expected string/i],
  ])('refuses %j', async (input, message) => {
    const result = await dispatch(session, 'log.list', input);
    expect(result.ok).toBe(false);
    if (!result.ok) expect(result.error.message).toMatch(message);
  });
});

describe('log.exportCsv', () => {
  it('writes the filtered log, oldest first, each row with the head it was exported at', async () => {
    const filter = { phase: 'items' as const };
    const file = await ok<{ fileName: string; text: string; rows: number; head: string }>(
      'log.exportCsv',
      filter,
    );
    const listed = (await ok<Page>('log.list', { ...filter, limit: 1000 })).entries.reverse();
    const parsed = Papa.parse<Record<string, string>>(file.text.trim(), { header: true });
    expect(parsed.errors).toEqual([]);
    expect(parsed.meta.fields).toEqual([
      'seq',
      'at',
      'who',
      'os_user',
      'phase',
      'kind',
      'target',
      'rationale',
      'run',
      'detail',
      'hash',
      'log_head_at_export',
    ]);
    expect(parsed.data.map((r) => Number(r.seq))).toEqual(listed.map((e) => e.seq));
    expect(parsed.data.map((r) => r.hash)).toEqual(listed.map((e) => e.hash));
    expect(parsed.data.map((r) => JSON.parse(r.detail))).toEqual(listed.map((e) => e.detail));
    expect(new Set(parsed.data.map((r) => r.log_head_at_export))).toEqual(
      new Set([session.study.log.head()]),
    );
    expect(file.fileName).toBe(`decision-log-to-row-${session.study.log.count()}.csv`);
    expect(file.rows).toBe(listed.length);
  });
});

describe('log.verify', () => {
  it('reports an intact study and checks a recorded head', async () => {
    const head = session.study.log.head() as string;
    const report = await ok<VerifyReport>('log.verify', { head });
    expect(report).toMatchObject({ intact: true, head, headChecked: { head, held: true }, breaks: [] });
    const forged = `${head.split(':')[0]}:${'c'.repeat(64)}`;
    const bad = await ok<VerifyReport>('log.verify', { head: forged });
    expect(bad.intact).toBe(false);
    expect(bad.breaks).toEqual([expect.objectContaining({ check: 'head' })]);
  });

  it('refuses a malformed head with what a head looks like', async () => {
    const result = await dispatch(session, 'log.verify', { head: '12:abc' });
    expect(result.ok).toBe(false);
    if (!result.ok) expect(result.error.message).toMatch(/head: a log head reads SEQ:HASH/);
  });
});
