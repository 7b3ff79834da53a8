import path from 'node:path';
import Papa from 'papaparse';
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

async function exported(input: Record<string, unknown>) {
  const result = await dispatch(session, 'export.table', input);
  if (!result.ok) throw new Error(result.error.message);
  const file = result.value as { fileName: string; text: string; rows: number };
  const lines = file.text.split('\r\n');
  const header = lines.filter((l) => l.startsWith('# '));
  const parsed = Papa.parse<Record<string, string>>(lines.filter((l) => !l.startsWith('# ')).join('\r\n'), {
    header: true,
    skipEmptyLines: true,
  });
  return { file, header, rows: parsed.data };
}

describe('result tables export as CSV, headed by the study, what they hold, and the log head', () => {
  it('every kind names the study and the current log head, and writes nothing to the study', async () => {
    const head = session.study.meta('log_head');
    const rowsBefore = session.study.log.count();
    const datasets = session.study.db
      .prepare("SELECT id FROM dataset WHERE role = 'pilot'")
      .pluck()
      .all() as number[];
    for (const request of [
      { kind: 'purification-items' },
      { kind: 'purification-rounds' },
      { kind: 'screening', datasetId: datasets[0] },
      { kind: 'content-validity' },
    ]) {
      const { file, header, rows } = await exported(request);
      expect(header[1]).toBe('# Study: Demo (demo.scalewright)');
      expect(header[2]).toBe(`# Decision log head: ${head} (${rowsBefore} rows)`);
      expect(rows.length).toBe(file.rows);
      expect(rows.length).toBeGreaterThan(0);
    }
    expect(session.study.log.count()).toBe(rowsBefore);
  });

  it('keeps numbers unrounded and item wording in the item table', async () => {
    const { rows } = await exported({ kind: 'purification-items' });
    const first = rows[0];
    expect(first.wording.length).toBeGreaterThan(10);
    expect(first.correctedItemTotal).toMatch(/^-?0\.\d{6,}/);
  });

  it('refuses a screening export without a dataset, with a message', async () => {
    const result = await dispatch(session, 'export.table', { kind: 'screening' });
    expect(result).toEqual({
      ok: false,
      error: { code: 'invalid-input', message: 'say which dataset’s screening to export' },
    });
  });
});
