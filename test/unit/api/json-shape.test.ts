import fs from 'node:fs';
import path from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { type CommandName, commands } from '../../../app/api/commands.ts';
import { dispatch } from '../../../app/api/dispatch.ts';
import { Session } from '../../../app/api/session.ts';
import { fillDemoStudy } from '../../../app/demo/index.ts';
import { TEST_ACTOR, tempDir } from '../../helpers/tmp.ts';

/**
 * Both transports carry a command's output as data: HTTP as JSON, Electron IPC by structured clone.
 * An output that survives JSON unchanged (no Date, Map, Set, typed array, NaN or Infinity, and no
 * property set to undefined) reaches the screen in the same shape either way. Every command of the
 * table is run here on the demo study and its output compared with its JSON round trip.
 */

const EXAMPLES = path.resolve(import.meta.dirname, '../../../assets/examples');
const base64 = (file: string) => fs.readFileSync(file).toString('base64');

let tmp: ReturnType<typeof tempDir>;
let session: Session;
const covered = new Set<string>();

/** Runs one command, which must succeed, and checks its output against its JSON round trip. */
async function call<T = unknown>(name: CommandName, input: unknown = {}): Promise<T> {
  const result = await dispatch(session, name, input);
  if (!result.ok) throw new Error(`${name} failed: ${result.error.message}`);
  const value = result.value;
  expect(JSON.parse(JSON.stringify(value)), `${name} output after JSON`).toStrictEqual(value);
  covered.add(name);
  return value as T;
}

async function finished(taskId: string): Promise<void> {
  for (;;) {
    const status = await call<{ state: string }>('task.status', { id: taskId });
    if (status.state !== 'running' && status.state !== 'queued') return;
    await new Promise((resolve) => setTimeout(resolve, 20));
  }
}

beforeAll(() => {
  tmp = tempDir('scalewright-json-');
  session = new Session(TEST_ACTOR, 'test');
  session.create(path.join(tmp.dir, 'demo.scalewright'), 'Demo');
  // The whole demo: the test reopens validity and purification to run their analyses and decisions.
  fillDemoStudy(session.study);
});

interface ValidityViewShape {
  model: {
    factors: { name: string; items: string[] }[];
    orthogonal: boolean;
    residualCovariances: { a: string; b: string; rationale: string }[];
  };
  columns: {
    measures: {
      column: string;
      setting: {
        relationId: number | null;
        timing: 'concurrent' | 'predictive';
        reliability: number | null;
      } | null;
    }[];
    groups: {
      column: string;
      setting: { relationId: number | null; higher: string; lower: string } | null;
    }[];
  };
  sourceIds: string[];
  cfa: { runId: number } | null;
}
afterAll(async () => {
  await session.shutdown();
  tmp.cleanup();
});

describe('every command output is plain JSON data', () => {
  it('reads: overview, phases, log, exports', async () => {
    await call('study.info');
    await call('study.overview');
    await call('study.recent');
    await call('study.listFolder', { path: tmp.dir });
    await call('settings.get');
    await call('construct.get');
    const items = await call<{ items: { id: number; text: string }[] }>('items.get');
    await call('items.checkWording', { text: items.items[0].text, itemId: items.items[0].id });
    await call('items.revisions', { id: items.items[0].id });
    await call('items.exportCsv');
    const review = await call<{ rounds: { id: number }[] }>('review.get');
    const roundId = review.rounds[0].id;
    await call('review.blankSheet', { roundId });
    await call('review.packet', { roundId });
    await call('review.previewRatings', {
      roundId,
      fileName: 'ratings.csv',
      content: base64(path.join(EXAMPLES, 'ratings.csv')),
    });
    const pilot = await call<{ datasets: { id: number }[] }>('pilot.view');
    const datasetId = pilot.datasets[0].id;
    await call('pilot.dataset', { datasetId });
    await call('pilot.screening', { datasetId });
    const purification = await call<{ rounds: { id: number }[] }>('purification.view');
    await call('purification.round', { id: purification.rounds[0].id });
    for (const kind of ['purification-items', 'purification-rounds', 'screening', 'content-validity']) {
      await call('export.table', { kind, roundId, datasetId });
    }
    await call('log.list', { limit: 50 });
    await call('log.exportCsv', {});
    await call('log.lastChange');
    await call('log.verify', {});
    const log = await call<{ entries: { seq: number; runId: number | null }[] }>('log.list', { limit: 200 });
    const runId = log.entries.find((e) => e.runId !== null)!.runId;
    await call('history.items');
    await call('history.itemStory', { code: 'TR01' });
    await call('history.row', { seq: log.entries[0].seq });
    await call('history.run', { id: runId });
    await call('history.rerun', { id: runId });
  });

  it('the final instrument: its form, a logged order, its files', async () => {
    const view = await call<{ available: boolean; items: { code: string }[] }>('instrument.view');
    expect(view.available).toBe(true);
    await call('instrument.setForm', {
      order: view.items.map((it) => it.code).reverse(),
      reason: 'Easier items last.',
    });
    await call('instrument.files');
  });

  it('validity: the model, a CFA and an invariance test in a worker, relations, retest, acknowledgements', async () => {
    await call('phase.reopen', { phase: 'validity', rationale: 'Check the command outputs.' });
    const view = await call<ValidityViewShape>('validity.view');
    if (view.cfa) await call('validity.run', { id: view.cfa.runId });
    const { model } = view;
    await call('validity.setModel', {
      model: {
        factors: model.factors,
        orthogonal: !model.orthogonal,
        residualCovariances: model.residualCovariances,
      },
      rationale: 'Try the other choice of factor correlations.',
    });
    const measure = view.columns.measures.find((m) => m.setting !== null);
    if (measure?.setting) {
      const { relationId, timing, reliability } = measure.setting;
      await call('validity.describeMeasure', {
        column: measure.column,
        relationId,
        timing,
        reliability,
        rationale: 'Unchanged.',
      });
    }
    const group = view.columns.groups.find((g) => g.setting !== null);
    if (group?.setting) {
      const { relationId, higher, lower } = group.setting;
      await call('validity.describeGroups', {
        column: group.column,
        relationId,
        higher,
        lower,
        rationale: 'Unchanged.',
      });
      const invariance = await call<{ taskId: string }>('validity.startInvariance', {
        groupColumn: group.column,
      });
      await finished(invariance.taskId);
      await call('validity.collect', { taskId: invariance.taskId });
    }
    const cfa = await call<{ taskId: string }>('validity.startCfa');
    await finished(cfa.taskId);
    await call('validity.collect', { taskId: cfa.taskId });
    await call('validity.runRelations');
    await call('validity.runRetest');
    expect(view.sourceIds).toContain('internal-structure');
    await call('validity.acknowledge', { source: 'internal-structure', note: 'The orthogonal model, seen.' });
  }, 120_000);

  it('the methods appendix, in a text and a binary format', async () => {
    for (const format of ['md', 'docx'] as const) await call('export.appendix', { format });
  });

  it('long jobs: a purification round started, followed and collected; one cancelled', async () => {
    await call('phase.reopen', { phase: 'purification', rationale: 'Check the command outputs.' });
    const cancelled = await call<{ taskId: string }>('purification.startRound', {});
    await call('task.cancel', { id: cancelled.taskId });
    await finished(cancelled.taskId);
    // Collecting a cancelled round is refused (a round that finished first is stored instead).
    await dispatch(session, 'purification.collectRound', { taskId: cancelled.taskId });
    const started = await call<{ taskId: string }>('purification.startRound', { bootstrap: null });
    await finished(started.taskId);
    await call('purification.collectRound', { taskId: started.taskId });
  });

  it('purification decisions, reversed, and the last change undone', async () => {
    const view = await call<{ rounds: { id: number }[] }>('purification.view');
    const round = await call<{ rows: { code: string }[] }>('purification.round', {
      id: view.rounds.at(-1)!.id,
    });
    const [first, second, third] = round.rows.map((item) => item.code);
    const decisionId = await call<number>('purification.decide', {
      itemCode: first,
      action: 'drop',
      domainRationale: 'Reads as two questions in one.',
    });
    await call('purification.decideMany', {
      itemCodes: [second, third],
      action: 'keep',
      statisticalRationale: 'Item-rest correlations above the others.',
    });
    await call('purification.reverse', { decisionId, domainRationale: 'Decided too early.' });
    const last = await call<{ seq: number; undoable: boolean }>('log.lastChange');
    expect(last.undoable).toBe(true);
    await call('log.undo', { seq: last.seq, reason: 'Reversal was a slip.' });
    const facets = (await call<{ facets: { id: number; name: string }[] }>('purification.view')).facets;
    const byName = (name: string) => facets.find((f) => f.name === name)?.id as number;
    const split = await call<{ facetId: number }>('purification.splitFacet', {
      facetId: byName('Route planning'),
      itemCodes: ['RP01', 'RP03'],
      newFacet: { name: 'Route finding', definition: 'Finding the way on a trip (test).' },
      domainRationale: 'Two kinds of planning (test).',
    });
    await call('purification.mergeFacets', {
      fromFacetId: split.facetId,
      intoFacetId: byName('Route planning'),
      domainRationale: 'One kind after all (test).',
    });
  });

  it('construct: reopened, edited, signed off again', async () => {
    await call('phase.reopen', { phase: 'construct', rationale: 'Add a planned relation.' });
    const view = await call<{
      construct: { population: string; responsePoints: number; responseMin: number; anchors: string[] };
    }>('construct.get');
    await call('construct.setText', {
      field: 'population',
      value: `${view.construct.population} Adults only.`,
    });
    await call('construct.setScoreUse', { use: 'basic-research' });
    const { responsePoints: points, responseMin: min, anchors } = view.construct;
    await call('construct.setResponseFormat', { points, min, anchors });
    const facet = await call<number>('facet.add', {
      name: 'Weather',
      definition: 'Riding in rain and wind.',
    });
    await call('facet.edit', { id: facet, definition: 'Riding in rain, wind and the dark.' });
    await call('facet.move', { id: facet, toIndex: 0 });
    await call('facet.retire', { id: facet, rationale: 'Out of scope after all.' });
    await call('facet.restore', { id: facet, rationale: 'Back in scope.' });
    const relation = {
      otherConstruct: 'General self-efficacy',
      kind: 'convergent',
      expectedSign: 'positive',
      expectedStrength: 'moderate',
      measure: 'an invented ten-item measure',
      rationale: 'Domain confidence draws on general confidence.',
    };
    const relationId = await call<number>('relation.add', relation);
    await call('relation.edit', { ...relation, id: relationId, expectedStrength: 'weak' });
    await call('relation.withdraw', { id: relationId, rationale: 'Not measured in the validation wave.' });
    await call('phase.signOff', { phase: 'construct', rationale: 'Definition unchanged in substance.' });
  });

  it('item pool: reopened, items imported, added, reworded, edited, retired', async () => {
    await call('phase.reopen', { phase: 'items', rationale: 'Two weather items.' });
    const pool = Buffer.from(
      'code,text,facet,keying\nWX01,I can ride home in heavy rain.,Weather,forward\n',
    ).toString('base64');
    await call('items.previewImport', { fileName: 'pool.csv', content: pool });
    await call('items.import', { fileName: 'pool.csv', content: pool, sourceType: 'own-drafting' });
    const itemId = await call<number>('items.add', {
      code: 'WX02',
      text: 'I can ride in strong wind.',
      facetId: null,
      keying: 'forward',
      sourceType: 'own-drafting',
      sourceNote: '',
    });
    await call('items.reword', { id: itemId, text: 'I can ride in a strong crosswind.' });
    await call('items.edit', { id: itemId, keying: 'reverse' });
    await call('items.setState', { id: itemId, state: 'retired', rationale: 'Duplicates WX01.' });
  });

  it('expert review: a round with its panel, ratings and a decision', async () => {
    await call('phase.reopen', { phase: 'review', rationale: 'Rate the weather item.' });
    const roundId = await call<number>('review.addRound', { label: 'Weather items', scope: 'kept' });
    await call('review.syncItems', { roundId });
    await call('review.setForm', {
      roundId,
      asksEssential: false,
      asksFacet: true,
      asksComment: true,
      instructions: 'Rate each item.',
    });
    await call('review.addExpert', { roundId, code: 'EN', role: 'traffic planner' });
    const extra = await call<number>('review.addExpert', { roundId, code: 'EX', role: 'none' });
    await call('review.editExpert', { id: extra, code: 'EX', role: 'cycling instructor' });
    await call('review.removeExpert', { id: extra });
    const view = await call<{ rounds: { id: number; items: { code: string; itemId: number }[] }[] }>(
      'review.get',
    );
    const round = view.rounds.find((r) => r.id === roundId)!;
    const lines = ['item,expert,relevance'];
    for (const item of round.items) for (const e of ['EN', 'E2', 'E3']) lines.push(`${item.code},${e},4`);
    const content = Buffer.from(lines.join('\n')).toString('base64');
    await call('review.importRatings', { roundId, fileName: 'r.csv', content, addExperts: ['E2', 'E3'] });
    await call('review.decide', {
      roundId,
      itemId: round.items[0].itemId,
      decision: 'keep',
      rationale: 'Rated relevant by all.',
    });
    const after = await call<{ rounds: { id: number; imports: { id: number }[] }[] }>('review.get');
    const importId = after.rounds.find((r) => r.id === roundId)!.imports[0].id;
    await call('review.withdrawRatings', { importId, rationale: 'Wrong file.' });
  });

  it('data: a file staged, previewed, read in a worker, stored, screened', async () => {
    await call('phase.reopen', { phase: 'pilot', rationale: 'Store the validation wave.' });
    const content = base64(path.join(EXAMPLES, 'validation-wave.csv'));
    const staged = await call<{ stageId: string; preview: { proposal: { mapping: unknown } } }>(
      'pilot.stage',
      {
        fileName: 'validation-wave.csv',
        content,
      },
    );
    await call('pilot.preview', { stageId: staged.stageId, reading: { delimiter: ',' } });
    const read = await call<{ taskId: string }>('pilot.startRead', {
      stageId: staged.stageId,
      role: 'validation',
      mapping: staged.preview.proposal.mapping,
      missingCodes: { numeric: [-9] },
    });
    await finished(read.taskId);
    const check = await call<{ readId: string }>('pilot.collectRead', { taskId: read.taskId });
    const stored = await call<{ datasetId: number }>('pilot.confirmImport', {
      readId: check.readId,
      acceptProblems: true,
      current: { makeCurrent: true, reason: 'The second validation wave replaces the first.' },
    });
    await call('pilot.discard');
    const pilot = await call<{ datasets: { id: number; role: string }[] }>('pilot.view');
    const pilotId = pilot.datasets.find((d) => d.role === 'pilot')!.id;
    await call('pilot.screen', { datasetId: pilotId });
    await call('pilot.exclude', { datasetId: pilotId, respondents: [0], reason: 'Test row.' });
    await call('pilot.include', { datasetId: pilotId, respondents: [0], reason: 'Not a test row.' });
    await call('pilot.withdraw', { datasetId: stored.datasetId, reason: 'Read with the wrong codes.' });
    await call('pilot.makeCurrent', { datasetId: stored.datasetId, reason: 'The codes were right.' });
  });

  it('settings and study files', async () => {
    await call('settings.setDisplayName', { name: 'Second Researcher' });
    const copy = path.join(tmp.dir, 'copy.scalewright');
    await call('study.saveCopy', { path: copy });
    await call('study.create', { path: path.join(tmp.dir, 'new.scalewright'), title: 'New' });
    await call('study.open', { path: copy });
  });
});

describe('all commands are covered', () => {
  it('every command of the table ran above', () => {
    expect([...covered].sort()).toEqual(Object.keys(commands).sort());
  });
});
