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
}, 60_000);
afterAll(async () => {
  await session.shutdown();
  tmp.cleanup();
});

describe('export.appendix', () => {
  it('returns the appendix as base64 with its file name and log head, and writes nothing to the study', async () => {
    const rows = session.study.log.count();
    const head = session.study.log.head();
    const result = await dispatch(session, 'export.appendix', { format: 'pdf' });
    expect(result.ok).toBe(true);
    if (!result.ok) return;
    const file = result.value as {
      fileName: string;
      mediaType: string;
      base64: string;
      size: number;
      head: string;
      intact: boolean;
    };
    expect(file).toMatchObject({
      fileName: 'demo-methods-appendix.pdf',
      mediaType: 'application/pdf',
      head,
      intact: true,
    });
    const bytes = Buffer.from(file.base64, 'base64');
    expect(bytes.length).toBe(file.size);
    expect(bytes.subarray(0, 5).toString()).toBe('%PDF-');
    expect(session.study.log.count()).toBe(rows);
    expect(session.study.log.head()).toBe(head);
  }, 60_000);

  it('refuses a format it does not write, naming the choices', async () => {
    const result = await dispatch(session, 'export.appendix', { format: 'rtf' });
    expect(result.ok).toBe(false);
    if (result.ok) return;
    expect(result.error.message).toMatch(/md|html|docx|pdf/);
  });
});
