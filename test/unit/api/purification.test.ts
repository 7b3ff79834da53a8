import { readFileSync } from 'node:fs';
import path from 'node:path';
import { afterEach, beforeEach, describe, expect, it } from 'vitest';
import { dispatch } from '../../../app/api/dispatch.ts';
import { Session } from '../../../app/api/session.ts';
import { addFacet } from '../../../app/phases/construct/index.ts';
import {
  FACTOR_DEFAULTS,
  type RoundDetail,
  type RoundSummary,
} from '../../../app/phases/purification/index.ts';
import type { TaskStatus } from '../../../app/workers/tasks.ts';
import { listRounds } from '../../../db/repos/purification.ts';
import { insertFixturePool, responsesCsv, storeCsv } from '../../helpers/study-data.ts';
import { TEST_ACTOR, tempDir } from '../../helpers/tmp.ts';

/** Invented pilot responses and their expected round-1 values: test/reference/purification.py (numpy + scipy). */
const fixture = JSON.parse(
  readFileSync(new URL('../../reference/fixtures/purification.json', import.meta.url), 'utf8'),
) as {
  codes: string[];
  reverse: string[];
  offDomain: string;
  rows: (number | null)[][];
  round1WithStraightLiners: { n: number; alpha: number };
};

let tmp: ReturnType<typeof tempDir>;
let session: Session;
beforeEach(() => {
  tmp = tempDir();
  session = new Session(TEST_ACTOR, 'test');
  session.create(path.join(tmp.dir, 's.scalewright'), 'S');
});
afterEach(async () => {
  await session.shutdown();
  tmp.cleanup();
});

/** Facets, the item pool and the pilot file of the fixture, put into the open study. */
async function fillStudy(): Promise<void> {
  const study = session.study;
  const facets: Record<string, number> = {};
  for (const prefix of ['TR', 'RP', 'BH', 'RR']) facets[prefix] = addFacet(study, `Facet ${prefix}`, '');
  insertFixturePool(study, fixture, facets);
  const { csv, mapping } = responsesCsv(fixture.codes, fixture.rows);
  await storeCsv(study, csv, mapping);
}

async function ok<T>(name: string, input: unknown): Promise<T> {
  const result = await dispatch(session, name, input);
  if (!result.ok) throw new Error(`${name} failed: ${result.error.message}`);
  return result.value as T;
}

async function refused(name: string, input: unknown): Promise<{ code: string; message: string }> {
  const result = await dispatch(session, name, input);
  if (result.ok) throw new Error(`${name} should have been refused`);
  return result.error;
}

async function waitUntilFinished(taskId: string): Promise<TaskStatus> {
  for (;;) {
    const status = await ok<TaskStatus>('task.status', { id: taskId });
    if (status.state !== 'running') return status;
    await new Promise((resolve) => setTimeout(resolve, 20));
  }
}

describe('purification through the command table', () => {
  it('starts a round in a worker, reports progress, collects and stores it', async () => {
    await fillStudy();
    const started = await ok<{ taskId: string; round: number; items: number; respondents: number }>(
      'purification.startRound',
      { bootstrap: { resamples: 400, seed: 3 } },
    );
    expect(started).toMatchObject({ round: 1, items: 17, respondents: fixture.rows.length });
    const during = await ok<{ running: { taskId: string; round: number }[] }>('purification.view', {});
    expect(during.running).toEqual([{ taskId: started.taskId, round: 1 }]);
    const status = await waitUntilFinished(started.taskId);
    // One progress scale: 400 resamples for the scale and four facets, then the parallel analysis.
    expect(status).toMatchObject({ state: 'done', total: 400 * 5 + FACTOR_DEFAULTS.iterations });
    const round = await ok<RoundSummary>('purification.collectRound', { taskId: started.taskId });
    expect(round).toMatchObject({ number: 1, n: fixture.round1WithStraightLiners.n });
    expect(round.alpha).toBeCloseTo(fixture.round1WithStraightLiners.alpha, 9);
    expect(round.bootstrapCI).toMatchObject({ resamples: 400, seed: 3 });

    const detail = await ok<RoundDetail>('purification.round', { id: round.id });
    expect(detail.rows).toHaveLength(17);
    expect(detail.rules.map((r) => r.rule)).toContain('alpha-rises');
    const view = await ok<{ rounds: RoundSummary[]; running: unknown[] }>('purification.view', {});
    expect(view.rounds.map((r) => r.number)).toEqual([1]);
    expect(view.running).toEqual([]);

    const dropped = await ok<number>('purification.decide', {
      itemCode: 'OD1',
      action: 'drop',
      domainRationale: 'Off the construct’s domain.',
      statisticalRationale: 'Low corrected item-total r.',
    });
    expect(dropped).toBeGreaterThan(0);
    const again = await refused('purification.collectRound', { taskId: started.taskId });
    expect(again).toEqual({
      code: 'not-found',
      message: `no purification round is running as task ${started.taskId}`,
    });
  });

  it('cancels a running round and stores nothing', async () => {
    await fillStudy();
    const started = await ok<{ taskId: string }>('purification.startRound', {
      missing: 'pairwise',
      bootstrap: { resamples: 20_000, seed: 1 },
    });
    await ok('task.cancel', { id: started.taskId });
    const status = await waitUntilFinished(started.taskId);
    expect(status.state).toBe('cancelled');
    const error = await refused('purification.collectRound', { taskId: started.taskId });
    expect(error).toEqual({ code: 'cancelled', message: 'round 1 was cancelled; nothing was stored' });
    expect(listRounds(session.study)).toHaveLength(0);
    expect(session.study.log.list({ phase: 'purification' })).toHaveLength(0);
  });

  it('refuses bad requests with a clear message and leaves the study unchanged', async () => {
    expect(await refused('purification.startRound', {})).toEqual({
      code: 'no-data',
      message:
        'no pilot data has been imported yet; import the pilot responses in the Pilot data phase first',
    });
    await fillStudy();
    const rows = session.study.log.count();
    const cases: [string, unknown, string, RegExp][] = [
      ['purification.startRound', { ciLevel: 1.5 }, 'invalid-input', /ciLevel/],
      ['purification.startRound', { bootstrap: { resamples: 10 } }, 'invalid-input', /bootstrap\.resamples/],
      ['purification.startRound', { missing: 'impute' }, 'invalid-input', /missing/],
      ['purification.decide', { itemCode: 'TR1', action: 'keep' }, 'no-round', /run a round first/],
      ['purification.decide', { itemCode: ' ', action: 'keep' }, 'invalid-input', /itemCode: name the item/],
      ['purification.decide', { itemCode: 'TR1', action: 'retire' }, 'invalid-input', /action/],
      ['purification.round', { id: 42 }, 'not-found', /there is no purification round 42/],
      ['purification.reverse', { decisionId: 7 }, 'not-found', /there is no item decision 7/],
    ];
    for (const [name, input, code, message] of cases) {
      const error = await refused(name, input);
      expect(error.code, name).toBe(code);
      expect(error.message, name).toMatch(message);
    }
    const started = await ok<{ taskId: string }>('purification.startRound', { bootstrap: null });
    await ok('purification.collectRound', { taskId: started.taskId });
    const blank = await refused('purification.decide', { itemCode: 'TR1', action: 'drop' });
    expect(blank.message).toBe(
      'give a rationale for dropping item TR1: how it relates to the construct’s domain, and what the statistics show',
    );
    const unknown = await refused('purification.decide', {
      itemCode: 'XX1',
      action: 'drop',
      domainRationale: 'x',
    });
    expect(unknown).toEqual({ code: 'not-found', message: 'there is no item "XX1" in the item pool' });
    // Only the round itself was logged.
    expect(session.study.log.count()).toBe(rows + 1);
  });
});

describe('one reason for several flagged items', () => {
  it('records one decision and one log row per item, all with the same reasons', async () => {
    await fillStudy();
    const started = await ok<{ taskId: string }>('purification.startRound', { bootstrap: null });
    await ok('purification.collectRound', { taskId: started.taskId });
    const before = session.study.log.count();
    const ids = await ok<number[]>('purification.decideMany', {
      itemCodes: ['TR1', 'TR2', 'TR1'],
      action: 'keep',
      domainRationale: 'Both describe riding in traffic, the facet’s core.',
      statisticalRationale: 'Their flags are skew only; item–total r is fine.',
    });
    expect(ids).toHaveLength(2);
    const rows = session.study.log.list({ phase: 'purification', limit: 2, offset: 0 });
    expect(session.study.log.count()).toBe(before + 2);
    expect(rows.map((r) => r.target).sort()).toEqual(['item TR1', 'item TR2']);
    for (const row of rows) expect(row.rationale).toContain('Both describe riding in traffic');
  });

  it('records none when one item of the set is refused', async () => {
    await fillStudy();
    const started = await ok<{ taskId: string }>('purification.startRound', { bootstrap: null });
    await ok('purification.collectRound', { taskId: started.taskId });
    const before = session.study.log.count();
    const error = await refused('purification.decideMany', {
      itemCodes: ['TR1', 'XX9'],
      action: 'keep',
      domainRationale: 'x',
      statisticalRationale: 'y',
    });
    expect(error).toEqual({ code: 'not-found', message: 'there is no item "XX9" in the item pool' });
    expect(session.study.log.count()).toBe(before);
    expect((await refused('purification.decideMany', { itemCodes: [], action: 'keep' })).message).toMatch(
      /choose at least one item/,
    );
  });
});
