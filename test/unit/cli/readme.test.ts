import { spawnSync } from 'node:child_process';
import fs from 'node:fs';
import path from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { Study } from '../../../db/study.ts';
import { demoExampleFiles } from '../../../app/demo/examples.ts';
import { ROOT } from '../../helpers/cli.ts';
import { TEST_ACTOR, tempDir } from '../../helpers/tmp.ts';

const README = fs.readFileSync(path.join(ROOT, 'README.md'), 'utf8');
const EXAMPLES = path.join(ROOT, 'assets', 'examples');
const PREFIX = 'npm run -s cli -- ';

/** The indented command lines of the README's command-line section, in order. */
function readmeCommands(): string[] {
  const section = README.split(/^## /m).find((s) => s.startsWith('The command line\n'));
  if (!section) throw new Error('README.md has no "The command line" section');
  return section
    .split('\n')
    .filter((line) => line.startsWith(`    ${PREFIX}`))
    .map((line) => line.trim());
}

let tmp: ReturnType<typeof tempDir>;
beforeAll(() => {
  tmp = tempDir('scalewright-readme-');
  // The temp folder stands in for the project root: the example files at the paths the README names.
  fs.cpSync(EXAMPLES, path.join(tmp.dir, 'assets', 'examples'), { recursive: true });
});
afterAll(() => tmp.cleanup());

describe('the README', () => {
  it('the example files are what the demo generator writes (regenerate: npx tsx app/demo/examples.ts)', () => {
    for (const [name, text] of Object.entries(demoExampleFiles())) {
      expect(fs.readFileSync(path.join(EXAMPLES, name), 'utf8'), name).toBe(text);
    }
  });

  it('the map file shown in the README is the example map file', () => {
    const shown = /`assets\/examples\/map\.json`:\n\n((?: {4}.*\n)+)/.exec(README)?.[1];
    expect(shown).toBeDefined();
    const text = (shown ?? '').replace(/^ {4}/gm, '');
    expect(JSON.parse(text)).toEqual(JSON.parse(fs.readFileSync(path.join(EXAMPLES, 'map.json'), 'utf8')));
  });

  it('every command of its command-line section runs as written, in order, in a fresh folder: exit 0', () => {
    const commands = readmeCommands();
    expect(commands.length).toBeGreaterThanOrEqual(8);
    for (const name of ['new', 'status', 'reopen', 'import', 'signoff', 'verify']) {
      expect(commands.some((c) => c.startsWith(`${PREFIX}project ${name} `))).toBe(true);
    }
    for (const command of commands) {
      // As typed by a user in the project root; npm is pointed at the project from the temp folder.
      const run = spawnSync(
        'bash',
        ['-c', command.replace(PREFIX, `npm --prefix ${JSON.stringify(ROOT)} run -s cli -- `)],
        { cwd: tmp.dir, encoding: 'utf8' },
      );
      expect(
        run.stderr.split('\n').filter((l) => l.startsWith('error:')),
        command,
      ).toEqual([]);
      expect(run.status, command).toBe(0);
      if (command.includes('--json')) expect(() => JSON.parse(run.stdout), command).not.toThrow();
    }
    const status = spawnSync(
      'bash',
      ['-c', `npm --prefix ${JSON.stringify(ROOT)} run -s cli -- project status study.scalewright --json`],
      { cwd: tmp.dir, encoding: 'utf8' },
    );
    const value = JSON.parse(status.stdout);
    const pilot = value.phases.find((p: { phase: string }) => p.phase === 'pilot');
    expect(pilot).toMatchObject({ state: 'signed-off', needsReview: null });
    const study = Study.open(path.join(tmp.dir, 'study.scalewright'), {
      actor: TEST_ACTOR,
      app: 'test',
      mode: 'read',
    });
    try {
      const last = study.log.list({ limit: 4 }).reverse();
      expect(last.map((r) => [r.phase, r.kind])).toEqual([
        ['validity', 'reopened'],
        // The demo has its own validation wave, which stays current: the new one waits beside it.
        ['validity', 'dataset-imported'],
        ['pilot', 'reopened'],
        ['pilot', 'signed-off'],
      ]);
      expect(last[1].target).toMatch(/Validation wave, autumn \(demo\)/);
    } finally {
      study.close();
    }
  }, 300_000);
});
