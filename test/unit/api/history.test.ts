import path from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { ItemStory, RunCheck, RunView } from '../../../app/api/contracts/history.ts';
import { dispatch } from '../../../app/api/dispatch.ts';
import { Session } from '../../../app/api/session.ts';
import { DEMO_PURIFICATION_SEEDS } from '../../../app/demo/purification.ts';
import { fillDemoStudy } from '../../../app/demo/index.ts';
import { Study } from '../../../db/study.ts';
import { TEST_ACTOR, tempDir } from '../../helpers/tmp.ts';

let tmp: ReturnType<typeof tempDir>;
let session: Session;
beforeAll(() => {
  tmp = tempDir();
  const file = path.join(tmp.dir, 'demo.scalewright');
  // The demo up to purification, which is quicker to make; the full demo's runs, the validity
  // phase's included, are re-run in test/unit/phases/history/validity-rerun.test.ts.
  Study.create(
    file,
    { actor: TEST_ACTOR, app: 'test' },
    { init: (study) => fillDemoStudy(study, 'purification') },
  ).close();
  session = new Session(TEST_ACTOR, 'test');
  session.open(file);
}, 60_000);
afterAll(() => {
  session.close();
  tmp.cleanup();
});

async function ok<T>(name: string, input: unknown): Promise<T> {
  const result = await dispatch(session, name, input);
  if (!result.ok) throw new Error(result.error.message);
  return result.value as T;
}

describe('history.itemStory', () => {
  it('tells the dropped demo item’s life in log order, each step on its log row', async () => {
    const story = await ok<ItemStory>('history.itemStory', { code: 'tr09' });
    expect(story.item.code).toBe('TR09');
    expect(story.steps.map((s) => s.stage)).toEqual(['drafted', 'edited', 'rated', 'analysed', 'decided']);
    const seqs = story.steps.map((s) => s.seq);
    expect(seqs).toEqual([...seqs].sort((a, b) => a - b));
    for (const step of story.steps) {
      const row = session.study.log.row(step.seq);
      expect(row?.target ?? '', `row ${step.seq}`).toMatch(/TR09|round|file/);
      expect(step.runId).toBe(row?.runId ?? null);
    }
    const drop = story.steps.at(-1);
    expect(drop?.kind).toBe('item-dropped');
    expect(drop?.reason).toMatch(/^Domain: .*\nStatistics: /s);
    expect(story.standing).toMatch(/^dropped \(Purification phase, log row \d+\)$/);
    // The analysed step's figures are the ones the stored round holds for the item.
    const analysed = story.steps.find((s) => s.stage === 'analysed');
    const run = await ok<RunView>('history.run', { id: analysed?.runId });
    const stored = (
      run.results as { scale: { items: { name: string; correctedItemTotal: number }[] } }
    ).scale.items.find((it) => it.name === 'TR09');
    expect(analysed?.figures.find((f) => f.label === 'corrected item-total r')?.value).toBe(
      stored?.correctedItemTotal,
    );
  });

  it('shows each rewording with the wording before and after', async () => {
    const story = await ok<ItemStory>('history.itemStory', { code: 'TR05' });
    const revised = story.steps.filter((s) => s.stage === 'revised');
    expect(revised).toHaveLength(1);
    expect(revised[0].before).not.toBe(revised[0].wording);
    expect(revised[0].wording).toBe(story.item.text);
    expect(revised[0].reason.length).toBeGreaterThan(0);
  });

  it('refuses an unknown item with its code', async () => {
    const result = await dispatch(session, 'history.itemStory', { code: 'ZZ99' });
    expect(result.ok).toBe(false);
    if (!result.ok) expect(result.error.message).toBe('the study has no item with the code "ZZ99"');
  });
});

describe('history.run and history.rerun', () => {
  it('show a stored round with its seed, digest and the decision citing it, and re-run it', async () => {
    const runs = session.study.db
      .prepare("SELECT id FROM analysis_run WHERE kind = 'purification-round' ORDER BY id")
      .pluck()
      .all() as number[];
    const run = await ok<RunView>('history.run', { id: runs[0] });
    expect(run.seed).toBe(DEMO_PURIFICATION_SEEDS[0]);
    expect(run.digest.matches).toBe(true);
    expect(run.recordedBy).not.toBeNull();
    // The demo drops two items on round 1: the off-domain item and the cross-loading one.
    expect(run.citedBy.map((c) => c.kind)).toEqual(['item-dropped', 'item-dropped']);
    expect(run.inputsSummary.map((l) => l.name)).toContain('dataset');
    expect(run.resultsSummary.find((l) => l.name === 'scale.alpha.value')?.value).toBe(
      (run.results as { scale: { alpha: { value: number } } }).scale.alpha.value,
    );
    const check = await ok<RunCheck>('history.rerun', { id: runs[0] });
    expect(check).toMatchObject({ status: 'reproduced', differenceCount: 0, seq: run.recordedBy });
  }, 30_000);

  it('refuse an unknown run and a malformed id', async () => {
    const unknown = await dispatch(session, 'history.run', { id: 9999 });
    expect(unknown.ok).toBe(false);
    if (!unknown.ok) expect(unknown.error.message).toBe('the study has no analysis run 9999');
    expect((await dispatch(session, 'history.rerun', { id: -1 })).ok).toBe(false);
  });

  it('log.verify re-runs the stored analyses too', async () => {
    const report = await ok<{ intact: boolean; rerun: { runs: RunCheck[] } }>('log.verify', {});
    expect(report.intact).toBe(true);
    expect(report.rerun.runs.length).toBeGreaterThan(0);
    expect(report.rerun.runs.every((r) => r.status === 'reproduced')).toBe(true);
  }, 30_000);
});
