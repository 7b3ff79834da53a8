import crypto from 'node:crypto';
import path from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { dispatch } from '../../../app/api/dispatch.ts';
import { Session } from '../../../app/api/session.ts';
import { fillDemoStudy } from '../../../app/demo/index.ts';
import { TEST_ACTOR, tempDir } from '../../helpers/tmp.ts';

let tmp: ReturnType<typeof tempDir>;
let session: Session;
beforeAll(() => {
  tmp = tempDir();
  session = new Session(TEST_ACTOR, 'test');
  session.create(path.join(tmp.dir, 'demo.scalewright'), 'Demo');
  fillDemoStudy(session.study);
});
afterAll(async () => {
  await session.shutdown();
  tmp.cleanup();
});

async function ok(name: string, input: unknown) {
  const result = await dispatch(session, name, input);
  if (!result.ok) throw new Error(result.error.message);
  return result.value as Record<string, unknown>;
}

describe('the final instrument through the command table', () => {
  it('shows the retained items, sets their order as a logged decision, and offers every file', async () => {
    const view = (await ok('instrument.view', {})) as {
      available: boolean;
      items: { code: string }[];
      chosen: boolean;
    };
    expect(view.available).toBe(true);
    expect(view.chosen).toBe(false);
    const codes = view.items.map((it) => it.code);
    const refused = await dispatch(session, 'instrument.setForm', { order: codes, reason: '' });
    expect(refused.ok).toBe(false);
    if (!refused.ok) expect(refused.error.message).toContain('reason: a rationale is required');
    const rows = session.study.log.count();
    const sorted = [...codes].sort();
    await ok('instrument.setForm', {
      order: sorted,
      rule: 'sum',
      reason: 'Facet by facet, easier to read aloud (test)',
    });
    expect(session.study.log.count()).toBe(rows + 1);
    const after = (await ok('instrument.view', {})) as {
      items: { code: string }[];
      chosen: boolean;
      rule: string;
    };
    expect(after.items.map((it) => it.code)).toEqual(sorted);
    expect(after.chosen).toBe(true);
    expect(after.rule).toBe('sum');
    const files = (await ok('instrument.files', {})) as {
      files: { name: string; sha256: string; base64: string }[];
      verified: boolean;
    };
    expect(files.verified).toBe(true);
    expect(files.files.map((f) => f.name)).toEqual([
      'questionnaire.html',
      'questionnaire.pdf',
      'scoring-key.csv',
      'scoring-key.json',
      'norms.csv',
    ]);
    for (const f of files.files) {
      const digest = crypto.createHash('sha256').update(Buffer.from(f.base64, 'base64')).digest('hex');
      expect(digest, f.name).toBe(f.sha256);
    }
    expect(session.study.log.count()).toBe(rows + 1);
  });

  it('says why there is no instrument in a study without a purification round', async () => {
    const other = new Session(TEST_ACTOR, 'test');
    other.create(path.join(tmp.dir, 'empty.scalewright'), 'Empty');
    try {
      const result = await dispatch(other, 'instrument.view', {});
      expect(result.ok).toBe(true);
      if (result.ok) {
        const value = result.value as { available: boolean; reason: string };
        expect(value.available).toBe(false);
        expect(value.reason).toMatch(/^the purification phase has no retained item set yet/);
      }
      const files = await dispatch(other, 'instrument.files', {});
      expect(files.ok).toBe(false);
      if (!files.ok) expect(files.error.code).toBe('no-retained-set');
    } finally {
      await other.shutdown();
    }
  });
});
