import path from 'node:path';
import { afterEach, beforeEach, describe, expect, it } from 'vitest';
import { dispatch } from '../../../app/api/dispatch.ts';
import { Session } from '../../../app/api/session.ts';
import { fillDemoConstruct } from '../../../app/demo/construct.ts';
import { DEMO_EXPERTS, fillDemoReview } from '../../../app/demo/review.ts';
import { fillDemoItems } from '../../../app/demo/items.ts';
import type { ItemContentValidity } from '../../../app/engine/content.ts';
import { signOffPhase } from '../../../app/phases/index.ts';
import { benchmarksMet, compareRounds } from '../../../app/phases/review/index.ts';
import { TEST_ACTOR, tempDir } from '../../helpers/tmp.ts';

function stats(over: Partial<ItemContentValidity>): ItemContentValidity {
  return {
    item: 'X',
    facet: null,
    rated: 6,
    relevant: 6,
    iCvi: 1,
    modifiedKappa: 1,
    kappaBand: 'excellent',
    essentialAnswered: 0,
    essentialCount: 0,
    cvr: null,
    cvrCritical: null,
    aikenV: 1,
    facetAgreement: null,
    flags: [],
    ...over,
  } as ItemContentValidity;
}

describe('rounds side by side', () => {
  const report = (sCviAve: number, sCviUa: number) => ({ sCviAve, sCviUa });
  const comparison = compareRounds([
    {
      number: 2,
      items: [
        { code: 'TR02', stats: stats({ iCvi: 1 }) },
        { code: 'TR10', stats: stats({ iCvi: 0.83 }) },
      ],
      report: report(0.92, 0.5),
    },
    {
      number: 1,
      items: [
        { code: 'TR01', stats: stats({ iCvi: 1 }) },
        { code: 'TR02', stats: stats({ iCvi: 0.5 }) },
      ],
      report: report(0.75, 0.5),
    },
    { number: 3, items: [{ code: 'TR01', stats: null }], report: null },
  ]);

  it('keeps an item that only the second round holds, marked as new there', () => {
    expect(comparison.rounds).toEqual([1, 2]);
    expect(comparison.rows.map((r) => r.code)).toEqual(['TR01', 'TR02', 'TR10']);
    const added = comparison.rows.find((r) => r.code === 'TR10');
    expect(added?.newInLatest).toBe(true);
    expect(Object.keys(added?.cells ?? {})).toEqual(['2']);
    expect(added?.cells[2]?.iCvi).toBe(0.83);
    expect(comparison.rows.find((r) => r.code === 'TR02')?.newInLatest).toBe(false);
  });

  it('puts each round’s S-CVI under that round, whatever order the rounds come in', () => {
    expect(comparison.scale).toEqual([
      { label: 'S-CVI/Ave', values: { 1: 0.75, 2: 0.92 } },
      { label: 'S-CVI/UA', values: { 1: 0.5, 2: 0.5 } },
    ]);
  });
});

describe('what an item without statistical flags is said to meet', () => {
  // Benchmarks: I-CVI 1.00 with 3–5 experts (Lynn 1986), ≥ .78 with 6 or more (Polit & Beck 2006);
  // modified kappa above .74 excellent, .60–.74 good (Polit, Beck & Owen 2007); CVR against the exact
  // binomial critical value (Wilson, Pan & Schumsky 2012): .750 for 8 experts.
  it('names each benchmark met with its source, and none it cannot support', () => {
    expect(
      benchmarksMet(stats({ rated: 6, iCvi: 0.83, modifiedKappa: 0.82, kappaBand: 'excellent' })),
    ).toEqual([
      'I-CVI .83 ≥ .78 (6+ experts; Polit & Beck 2006)',
      'modified kappa .82 excellent (Polit, Beck & Owen 2007)',
    ]);
    expect(benchmarksMet(stats({ rated: 8, cvr: 0.75, cvrCritical: 0.75 }))).toContain(
      'CVR .75 ≥ critical .750 (Wilson, Pan & Schumsky 2012)',
    );
    expect(benchmarksMet(stats({ rated: 4, iCvi: 1, modifiedKappa: 1 }))[0]).toBe(
      'I-CVI 1.00 = 1.00 (3–5 experts; Lynn 1986)',
    );
    expect(benchmarksMet(stats({ rated: 2, iCvi: 1, modifiedKappa: null, kappaBand: null }))).toEqual([]);
  });
});

describe('the review screen’s data for a signed-off demo review', () => {
  let tmp: ReturnType<typeof tempDir>;
  let session: Session;
  beforeEach(() => {
    tmp = tempDir();
    session = new Session(TEST_ACTOR, 'test');
    session.create(path.join(tmp.dir, 'review.scalewright'), 'Review');
    fillDemoConstruct(session.study);
    signOffPhase(session.study, 'construct', 'Agreed by the team.');
    fillDemoItems(session.study);
    fillDemoReview(session.study);
  });
  afterEach(async () => {
    await session.shutdown();
    tmp.cleanup();
  });

  it('still hands out the blank ratings sheet after sign-off, and writes nothing', async () => {
    const overview = await dispatch(session, 'study.overview', {});
    if (!overview.ok) throw new Error(overview.error.message);
    const review = (overview.value as { id: string; status: string }[]).find((p) => p.id === 'review');
    expect(review?.status).toBe('signed-off');
    const rows = session.study.log.count();
    const view = await dispatch(session, 'review.get', {});
    if (!view.ok) throw new Error(view.error.message);
    const first = (view.value as { rounds: { id: number; number: number; items: unknown[] }[] }).rounds[0];
    const sheet = await dispatch(session, 'review.blankSheet', { roundId: first.id });
    if (!sheet.ok) throw new Error(sheet.error.message);
    const { fileName, text } = sheet.value as { fileName: string; text: string };
    expect(fileName).toBe('ratings-sheet-round-1.csv');
    const lines = text.trimEnd().split('\r\n');
    expect(lines[0]).toMatch(/^item,expert,relevance/);
    expect(lines).toHaveLength(1 + DEMO_EXPERTS.length * first.items.length);
    expect(session.study.log.count()).toBe(rows);
  });

  it('shows wording flags beside the benchmarks an item meets', async () => {
    const view = await dispatch(session, 'review.get', {});
    if (!view.ok) throw new Error(view.error.message);
    const items = (
      view.value as {
        rounds: {
          items: { code: string; wordingFlags: string[]; benchmarksMet: string[]; stats: unknown }[];
        }[];
      }
    ).rounds.flatMap((r) => r.items);
    for (const it of items) expect(Array.isArray(it.wordingFlags)).toBe(true);
    const clean = items.find((it) => it.benchmarksMet.length > 0);
    expect(clean?.benchmarksMet[0]).toMatch(/^I-CVI .* \((Lynn 1986|6\+ experts; Polit & Beck 2006)\)$/);
  });
});
