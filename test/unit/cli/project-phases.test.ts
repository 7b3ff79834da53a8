import fs from 'node:fs';
import path from 'node:path';
import { afterAll, beforeAll, beforeEach, describe, expect, it } from 'vitest';
import { getPhaseStatus } from '../../../db/repos/phase-state.ts';
import { Study } from '../../../db/study.ts';
import { addFacet } from '../../../app/phases/construct/index.ts';
import { reopenPhase } from '../../../app/phases/index.ts';
import { modelInForce, setMeasurementModel } from '../../../app/phases/validity/index.ts';
import { runCli, runCliHere } from '../../helpers/cli.ts';
import { TEST_ACTOR, tempDir } from '../../helpers/tmp.ts';

let tmp: ReturnType<typeof tempDir>;
let template: string;
let file: string;

beforeAll(() => {
  tmp = tempDir();
  template = path.join(tmp.dir, 'template.scalewright');
  expect(runCli(['project', 'new', template, '--demo']).code).toBe(0);
});
afterAll(() => tmp.cleanup());
beforeEach(() => {
  file = path.join(tmp.dir, `s${Math.random().toString(36).slice(2)}.scalewright`);
  fs.copyFileSync(template, file);
});

function withStudy<T>(fn: (study: Study) => T): T {
  const study = Study.open(file, { actor: TEST_ACTOR, app: 'test' });
  try {
    return fn(study);
  } finally {
    study.close();
  }
}

/** Reopens the validity phase and changes its model, so that its CFA no longer describes it. */
function outdateValidityCfa(): void {
  withStudy((s) => {
    reopenPhase(s, 'validity', 'Check the model once more.');
    setMeasurementModel(s, { ...modelInForce(s).model, orthogonal: true }, 'Try uncorrelated facets.');
  });
}

/** The log and phase states: equal before and after means a refused command changed nothing. */
function state() {
  return withStudy((s) => ({
    log: s.log.count(),
    head: s.meta('log_head'),
    phases: s.db.prepare('SELECT phase, state FROM phase_state ORDER BY phase').all(),
  }));
}

interface StatusPhase {
  phase: string;
  state: string;
  needsReview: { since: string; changes: { phase: string; kind: string; target: string }[] } | null;
}

async function status(): Promise<{ phases: StatusPhase[]; log: { rows: number; head: string } }> {
  const run = await runCliHere(['project', 'status', file, '--json']);
  expect(run.code).toBe(0);
  return JSON.parse(run.stdout);
}

function widest(text: string): number {
  return Math.max(...text.split('\n').map((line) => line.length));
}

describe('project reopen and project signoff', () => {
  it('reopen writes the same logged action as the app; the real process exits 0', () => {
    const rowsBefore = withStudy((s) => s.log.count());
    const run = runCli([
      'project',
      'reopen',
      file,
      '--phase',
      'construct',
      '--reason',
      'A night-riding facet.',
    ]);
    expect(run.stderr).toBe('');
    expect(run.code).toBe(0);
    expect(run.stdout).toMatch(
      new RegExp(`reopened the Construct phase of .* \\(log row ${rowsBefore + 1}\\)`),
    );
    withStudy((s) => {
      expect(getPhaseStatus(s, 'construct')).toBe('reopened');
      expect(s.log.list({ limit: 1 })[0]).toMatchObject({
        seq: rowsBefore + 1,
        phase: 'construct',
        kind: 'reopened',
        target: 'Construct phase',
        rationale: 'A night-riding facet.',
        actorName: 'CLI Tester',
      });
    });
  });

  it('a sign-off whose checklist is not met is refused: exit 1, the unmet items on stderr, the checklist on stdout, nothing written', () => {
    outdateValidityCfa();
    const before = state();
    const run = runCli(['project', 'signoff', file, '--phase', 'validity', '--reason', 'Done.']);
    expect(run.code).toBe(1);
    expect(run.stderr).toMatch(
      /^error: the Validity evidence phase cannot be signed off yet: A CFA of the measurement model on the current validation data: run \d+ is out of date: the measurement model changed since[^\n]*\n$/,
    );
    expect(run.stdout).toMatch(/^Validity evidence phase: not signed off; its checklist:\n/);
    expect(run.stdout).toMatch(/✓ The Purification phase is signed off/);
    expect(run.stdout).toMatch(/○ A CFA of the measurement model on the current validation data/);
    expect(widest(run.stdout)).toBeLessThanOrEqual(100);
    expect(state()).toEqual(before);
  });

  it('with --json a refusal prints one object with the checklist and done: false', async () => {
    outdateValidityCfa();
    const run = await runCliHere([
      'project',
      'signoff',
      file,
      '--phase',
      'validity',
      '--reason',
      'x',
      '--json',
    ]);
    expect(run.code).toBe(1);
    const value = JSON.parse(run.stdout);
    expect(value).toMatchObject({ phase: 'validity', done: false, state: 'reopened', logRow: null });
    expect(value.checklist.find((c: { id: string }) => c.id === 'cfa-on-current-data').met).toBe(false);
  });

  it('usage mistakes exit 2 and refusals by the phase rules exit 1, each with one error line and nothing written', async () => {
    withStudy((s) => reopenPhase(s, 'validity', 'Look again.'));
    const before = state();
    const cases: [string[], number, RegExp][] = [
      [['project', 'signoff', file, '--phase', 'items'], 2, /--reason TEXT is required/],
      [['project', 'signoff', file, '--phase', 'items', '--reason', '  '], 2, /--reason TEXT is required/],
      [['project', 'reopen', file, '--reason', 'x'], 2, /--phase is required: one of construct, items/],
      [['project', 'reopen', file, '--phase', 'analysis', '--reason', 'x'], 2, /unknown phase "analysis"/],
      [['project', 'reopen', '--phase', 'items', '--reason', 'x'], 2, /needs the study FILE/],
      [
        ['project', 'signoff', file, '--phase', 'items', '--reason', 'x'],
        1,
        /Item pool phase is already signed off/,
      ],
      [
        ['project', 'reopen', file, '--phase', 'validity', '--reason', 'x'],
        1,
        /not signed off, so there is nothing to reopen/,
      ],
      [
        ['project', 'reopen', path.join(tmp.dir, 'none.scalewright'), '--phase', 'items', '--reason', 'x'],
        1,
        /does not exist/,
      ],
    ];
    for (const [args, code, message] of cases) {
      const run = await runCliHere(args);
      expect(run.code, args.join(' ')).toBe(code);
      expect(run.stderr, args.join(' ')).toMatch(/^error: [^\n]+\n$/);
      expect(run.stderr, args.join(' ')).toMatch(message);
    }
    expect(state()).toEqual(before);
  });
});

describe('stale sign-offs on the command line', () => {
  it('after the construct is reopened and a facet added, status shows the item pool, review and pilot as needing review, with the change', async () => {
    const rowsBefore = withStudy((s) => s.log.count());
    const facetRow = rowsBefore + 2;
    expect(
      (await runCliHere(['project', 'reopen', file, '--phase', 'construct', '--reason', 'Night riding.']))
        .code,
    ).toBe(0);
    const facetAt = withStudy((s) => {
      addFacet(s, 'Riding after dark', 'Confidence riding at night and in poor light.');
      return s.log.list({ limit: 1 })[0].at;
    });
    const value = await status();
    const byPhase = Object.fromEntries(value.phases.map((p) => [p.phase, p]));
    for (const id of ['items', 'review', 'pilot']) {
      // The state keeps its meaning (the phase is still signed off); needsReview says why it is not settled.
      expect(byPhase[id].state).toBe('signed-off');
      expect(byPhase[id].needsReview?.since).toBe(facetAt);
      expect(byPhase[id].needsReview?.changes).toMatchObject([
        { phase: 'construct', kind: 'facet-added', target: 'facet "Riding after dark"' },
      ]);
    }
    expect(byPhase.construct.needsReview).toBeNull();
    expect(byPhase.construct.state).toBe('reopened');
    expect(value.log.rows).toBe(facetRow);
    expect(value.log.head).toMatch(new RegExp(`^${facetRow}:[0-9a-f]{64}$`));

    const table = await runCliHere(['project', 'status', file]);
    expect(table.code).toBe(0);
    expect(table.stdout).toMatch(/\nItem pool +needs review /);
    expect(table.stdout).toMatch(/\nExpert review +needs review /);
    expect(table.stdout).toMatch(/\nPilot data +needs review /);
    expect(table.stdout).toMatch(
      new RegExp(
        `\\n {4}${facetRow} +\\d{4}-\\d\\d-\\d\\d \\d\\d:\\d\\d UTC +Test Researcher +Construct, facet added:`,
      ),
    );
    expect(table.stdout).toMatch(/facet "Riding after dark"/);
    expect(table.stdout).toMatch(/Item pool, Expert review,/);
    expect(widest(table.stdout)).toBeLessThanOrEqual(100);

    // The item pool cannot be confirmed while the construct is open and the new facet has no items.
    const refused = await runCliHere([
      'project',
      'signoff',
      file,
      '--phase',
      'items',
      '--reason',
      'Still fine.',
    ]);
    expect(refused.code).toBe(1);
    expect(refused.stderr).toMatch(/The Construct phase is signed off: reopened/);
    expect(refused.stderr).toMatch(/Riding after dark/);
  });

  it('signing off again with a reason clears a stale phase and logs the changes it reviewed', async () => {
    await runCliHere(['project', 'reopen', file, '--phase', 'construct', '--reason', 'Sharper definition.']);
    const changed = withStudy((s) => {
      s.change({ phase: 'construct', kind: 'edit', target: 'definition' }, () => undefined);
      return s.log.count();
    });
    expect(
      (await runCliHere(['project', 'signoff', file, '--phase', 'construct', '--reason', 'Agreed.'])).code,
    ).toBe(0);
    expect((await status()).phases.filter((p) => p.needsReview).map((p) => p.phase)).toEqual([
      'items',
      'review',
      'pilot',
      'purification',
      'validity',
    ]);
    const run = await runCliHere([
      'project',
      'signoff',
      file,
      '--phase',
      'review',
      '--reason',
      'The panel rated items, not the definition wording; the ratings stand.',
      '--json',
    ]);
    expect(run.code).toBe(0);
    const value = JSON.parse(run.stdout);
    expect(value).toMatchObject({ phase: 'review', done: true, state: 'signed-off', needsReview: null });
    withStudy((s) => {
      const row = s.log.list({ limit: 1 })[0];
      expect(row).toMatchObject({ seq: value.logRow.seq, kind: 'signed-off', phase: 'review' });
      expect(row.detail.reviewedChanges).toEqual([changed]);
    });
    expect((await status()).phases.filter((p) => p.needsReview).map((p) => p.phase)).toEqual([
      'items',
      'pilot',
      'purification',
      'validity',
    ]);
  });

  it('status of the demo fits 100 columns', async () => {
    const run = await runCliHere(['project', 'status', template]);
    expect(run.code).toBe(0);
    expect(run.stdout).toMatch(/\nExpert review +signed off +2 review rounds/);
    expect(widest(run.stdout)).toBeLessThanOrEqual(100);
  });
});
