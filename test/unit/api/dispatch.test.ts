import path from 'node:path';
import { afterEach, beforeEach, describe, expect, it } from 'vitest';
import { dispatch } from '../../../app/api/dispatch.ts';
import { Session } from '../../../app/api/session.ts';
import { TEST_ACTOR, tempDir } from '../../helpers/tmp.ts';

let tmp: ReturnType<typeof tempDir>;
let session: Session;
beforeEach(() => {
  tmp = tempDir();
  session = new Session(TEST_ACTOR, 'test');
  session.create(path.join(tmp.dir, 's.scalewright'), 'S');
});
afterEach(() => {
  session.close();
  tmp.cleanup();
});

describe('the command table rejects inputs of the wrong shape with a clear message', () => {
  it.each([
    ['construct.setText', { field: 'colour', value: 'x' }, /construct\.setText: field: Invalid option/],
    ['construct.setText', { field: 'name' }, /value: .*expected string/i],
    ['facet.add', { name: 42, definition: '' }, /name: .*expected string/i],
    ['facet.retire', { id: -3, rationale: 'x' }, /id: .*(>0|positive|greater)/i],
    ['facet.retire', { id: 1, rationale: '   ' }, /rationale: a rationale is required/],
    ['phase.signOff', { phase: 'nowhere', rationale: 'x' }, /phase: Invalid option/],
    ['construct.setResponseFormat', { points: 40, min: 1, anchors: [] }, /points: /],
    ['log.list', 'not an object', /input: .*expected object/i],
  ])('%s %j', async (name, input, message) => {
    const result = await dispatch(session, name, input);
    expect(result.ok).toBe(false);
    if (!result.ok) {
      expect(result.error.code).toBe('invalid-input');
      expect(result.error.message).toMatch(message);
    }
    expect(session.study.log.count()).toBe(0);
  });

  it('names an unknown command', async () => {
    const result = await dispatch(session, 'study.delete', {});
    expect(result).toEqual({
      ok: false,
      error: { code: 'unknown-command', message: 'there is no command named "study.delete"' },
    });
  });

  it('turns a broken rule into a message, not a crash', async () => {
    const result = await dispatch(session, 'facet.retire', { id: 99, rationale: 'gone' });
    expect(result).toEqual({
      ok: false,
      error: { code: 'not-found', message: 'facet 99 does not exist in this study' },
    });
  });
});

describe('construct phase through the command table', () => {
  it('edits, logs every change, and moves the phase to in progress', async () => {
    expect((await dispatch(session, 'construct.setText', { field: 'name', value: 'Trail reading' })).ok).toBe(
      true,
    );
    const added = await dispatch(session, 'facet.add', { name: 'Signs', definition: 'Reading trail signs' });
    expect(added.ok).toBe(true);
    const facetId = added.ok ? (added.value as number) : 0;
    expect((await dispatch(session, 'facet.edit', { id: facetId, name: 'Waymarks' })).ok).toBe(true);
    const duplicate = await dispatch(session, 'facet.add', { name: 'waymarks', definition: '' });
    expect(duplicate.ok).toBe(false);
    const log = await dispatch(session, 'log.list', {});
    expect(log.ok && (log.value as { total: number }).total).toBe(3);
    const overview = await dispatch(session, 'study.overview', {});
    const construct = overview.ok ? (overview.value as { id: string; status: string }[])[0] : undefined;
    expect(construct?.status).toBe('in-progress');
  });

  it('refuses sign-off while the checklist is not met, and says what is missing', async () => {
    const result = await dispatch(session, 'phase.signOff', { phase: 'construct', rationale: 'done' });
    expect(result.ok).toBe(false);
    if (!result.ok) {
      expect(result.error.code).toBe('gate');
      expect(result.error.message).toMatch(/The construct has a name: no name yet/);
    }
  });
});

describe('the display name', () => {
  it('signs the log rows written after a change of name, and is kept for the next launch', async () => {
    const saved: string[] = [];
    const named = new Session(TEST_ACTOR, 'test', { saveDisplayName: (name) => saved.push(name) });
    named.create(path.join(tmp.dir, 'named.scalewright'), 'N');
    await dispatch(named, 'construct.setText', { field: 'name', value: 'Before' });
    expect((await dispatch(named, 'settings.setDisplayName', { name: '  ' })).ok).toBe(false);
    expect((await dispatch(named, 'settings.setDisplayName', { name: 'Dr. Field Lead' })).ok).toBe(true);
    await dispatch(named, 'construct.setText', { field: 'name', value: 'After' });
    const [after, before] = named.study.log.list();
    expect(before.actorName).toBe(TEST_ACTOR.name);
    expect(after.actorName).toBe('Dr. Field Lead');
    expect(after.actorUser).toBe(TEST_ACTOR.user);
    expect(saved).toEqual(['Dr. Field Lead']);
    named.close();
  });
});
