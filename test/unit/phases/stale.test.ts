import fs from 'node:fs';
import path from 'node:path';
import { afterAll, afterEach, beforeAll, beforeEach, describe, expect, it } from 'vitest';
import { Study } from '../../../db/study.ts';
import { fillDemoStudy } from '../../../app/demo/index.ts';
import { addFacet } from '../../../app/phases/construct/index.ts';
import { RuleError } from '../../../app/phases/errors.ts';
import { phaseOverview, reopenPhase, signOffPhase, studyOverview } from '../../../app/phases/index.ts';
import { addItem } from '../../../app/phases/items/index.ts';
import { TEST_ACTOR, tempDir } from '../../helpers/tmp.ts';

let tmp: ReturnType<typeof tempDir>;
let template: string;
let study: Study;

beforeAll(() => {
  tmp = tempDir();
  template = path.join(tmp.dir, 'template.scalewright');
  Study.create(template, { actor: TEST_ACTOR, app: 'test' }, { init: fillDemoStudy }).close();
});
afterAll(() => tmp.cleanup());

beforeEach(() => {
  const file = path.join(tmp.dir, `s${Math.random().toString(36).slice(2)}.scalewright`);
  fs.copyFileSync(template, file);
  study = Study.open(file, { actor: TEST_ACTOR, app: 'test' });
});
afterEach(() => study.close());

function rule(fn: () => unknown): RuleError {
  try {
    fn();
  } catch (error) {
    if (error instanceof RuleError) return error;
    throw error;
  }
  throw new Error('expected a RuleError');
}

/** Reopens the construct and adds a facet; reopens the item pool and adds an item to that facet. */
function changeUpstream(): { facet: number } {
  reopenPhase(study, 'construct', 'A night-riding facet came up in the focus groups.');
  const facet = addFacet(study, 'Riding after dark', 'Confidence riding at night and in poor light.');
  reopenPhase(study, 'items', 'Items for the new facet.');
  addItem(study, {
    code: 'NR01',
    text: 'I can ride home after dark on roads I know.',
    facetId: facet,
    keying: 'forward',
    sourceType: 'own-drafting',
    sourceNote: '',
  });
  return { facet };
}

describe('stale sign-offs', () => {
  it('the demo as created has signed-off phases and none needs review', () => {
    const phases = studyOverview(study);
    expect(phases.filter((p) => p.status === 'signed-off').map((p) => p.id)).toEqual([
      'construct',
      'items',
      'review',
      'pilot',
      'purification',
      'validity',
    ]);
    for (const p of phases) expect(p.needsReview, p.id).toBeNull();
  });

  it('a facet added to the construct puts every later signed-off phase up for review, with the change and its time', () => {
    reopenPhase(study, 'construct', 'A night-riding facet came up in the focus groups.');
    const before = study.log.count();
    addFacet(study, 'Riding after dark', 'Confidence riding at night and in poor light.');
    const facetRow = study.log.list({ limit: 1 })[0];
    expect(facetRow.seq).toBe(before + 1);
    for (const id of ['items', 'review', 'pilot', 'purification', 'validity'] as const) {
      const p = phaseOverview(study, id);
      expect(p.status).toBe('signed-off');
      expect(p.needsReview, id).not.toBeNull();
      expect(p.needsReview?.since).toBe(facetRow.at);
      expect(p.needsReview?.changes).toEqual([
        {
          seq: facetRow.seq,
          at: facetRow.at,
          by: TEST_ACTOR.name,
          phase: 'construct',
          phaseTitle: 'Construct',
          kind: 'facet-added',
          target: 'facet "Riding after dark"',
        },
      ]);
    }
    // Each checklist is evaluated again: the item pool's says the construct is no longer signed off
    // and the new facet has no items.
    const unmet = phaseOverview(study, 'items').checklist.filter((c) => !c.met);
    expect(unmet.map((c) => c.id)).toContain('previous-signed-off');
    expect(unmet.map((c) => c.detail).join(' ')).toMatch(/Riding after dark/);
    // The construct itself is reopened, not stale.
    expect(phaseOverview(study, 'construct').needsReview).toBeNull();
  });

  it('an item added after that shows in review and pilot beside the facet, oldest first; the item pool shows its own failing checklist', () => {
    changeUpstream();
    const items = phaseOverview(study, 'items');
    expect(items.status).toBe('reopened');
    expect(items.needsReview).toBeNull();
    for (const id of ['review', 'pilot'] as const) {
      const changes = phaseOverview(study, id).needsReview?.changes ?? [];
      expect(changes.map((c) => [c.phase, c.kind, c.target])).toEqual([
        ['construct', 'facet-added', 'facet "Riding after dark"'],
        ['items', 'item-added', 'item NR01'],
      ]);
    }
  });

  it('signing the construct off again does not clear the later phases; each needs its own review', () => {
    reopenPhase(study, 'construct', 'New facet.');
    addFacet(study, 'Riding after dark', 'Confidence riding at night.');
    signOffPhase(study, 'construct', 'Facet agreed by the team.');
    expect(phaseOverview(study, 'construct').needsReview).toBeNull();
    for (const id of ['items', 'review', 'pilot'] as const) {
      expect(phaseOverview(study, id).needsReview?.changes).toHaveLength(1);
    }
  });

  it('a stale phase whose checklist fails cannot be signed off again, and nothing is written', () => {
    reopenPhase(study, 'construct', 'New facet.');
    addFacet(study, 'Riding after dark', 'Confidence riding at night.');
    signOffPhase(study, 'construct', 'Facet agreed by the team.');
    const items = phaseOverview(study, 'items');
    // A facet with no items fails the item pool's coverage check.
    expect(items.blockers.length).toBeGreaterThan(0);
    const rows = study.log.count();
    const error = rule(() => signOffPhase(study, 'items', 'Still fine.'));
    expect(error.code).toBe('gate');
    expect(error.message).toMatch(/Item pool phase cannot be signed off yet/);
    expect(study.log.count()).toBe(rows);
    expect(phaseOverview(study, 'items').needsReview).not.toBeNull();
  });

  it('confirming a stale phase with a reason clears it and logs the changes it reviewed; a blank reason is refused', () => {
    reopenPhase(study, 'construct', 'Sharper wording of the definition.');
    const definitionRow = (() => {
      study.change({ phase: 'construct', kind: 'edit', target: 'definition' }, () => undefined);
      return study.log.list({ limit: 1 })[0];
    })();
    signOffPhase(study, 'construct', 'Wording agreed.');
    expect(phaseOverview(study, 'items').needsReview?.changes.map((c) => c.seq)).toEqual([definitionRow.seq]);
    expect(rule(() => signOffPhase(study, 'items', '  ')).message).toMatch(
      /say why the Item pool phase is still valid/,
    );
    signOffPhase(study, 'items', 'The sharper wording changes no facet the items map to.');
    const row = study.log.list({ limit: 1 })[0];
    expect(row).toMatchObject({ phase: 'items', kind: 'signed-off', target: 'Item pool phase' });
    expect(row.detail.reviewedChanges).toEqual([definitionRow.seq]);
    expect(phaseOverview(study, 'items').needsReview).toBeNull();
    expect(phaseOverview(study, 'items').status).toBe('signed-off');
    // Review and pilot rest on the construct too: still up for review until they are confirmed.
    expect(phaseOverview(study, 'review').needsReview).not.toBeNull();
    // A phase that does not need review cannot be signed off twice.
    expect(rule(() => signOffPhase(study, 'items', 'again')).message).toMatch(/already signed off/);
  });

  it('reopening a stale phase and signing it off again clears it too', () => {
    reopenPhase(study, 'construct', 'Sharper wording.');
    study.change({ phase: 'construct', kind: 'edit', target: 'definition' }, () => undefined);
    signOffPhase(study, 'construct', 'Wording agreed.');
    reopenPhase(study, 'items', 'Look at the items against the new wording.');
    expect(phaseOverview(study, 'items').needsReview).toBeNull();
    signOffPhase(study, 'items', 'Checked every item against the new wording.');
    expect(phaseOverview(study, 'items').needsReview).toBeNull();
  });

  it('analysis runs and phase actions upstream change no content and leave later sign-offs standing', () => {
    reopenPhase(study, 'construct', 'Only looking.');
    signOffPhase(study, 'construct', 'Nothing changed.');
    study.change({ phase: 'construct', kind: 'analysis-run', target: 'a run' }, () => undefined);
    for (const p of studyOverview(study)) expect(p.needsReview, p.id).toBeNull();
  });
});
