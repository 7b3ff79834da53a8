import fs from 'node:fs';
import path from 'node:path';
import Database from 'better-sqlite3';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { runCli, runNpmCli } from '../../helpers/cli.ts';
import { tempDir } from '../../helpers/tmp.ts';

let tmp: ReturnType<typeof tempDir>;
beforeAll(() => {
  tmp = tempDir();
});
afterAll(() => tmp.cleanup());

/** Rewrites the log table without its append-only triggers, as someone editing the file by hand would. */
function tamper(file: string, sql: string) {
  const db = new Database(file);
  db.exec('DROP TRIGGER decision_log_no_update; DROP TRIGGER decision_log_no_delete;');
  db.exec(sql);
  db.close();
}

describe('project new, status and verify', () => {
  it('work through npm with a relative path, resolved against the folder npm was run from', () => {
    const made = runNpmCli(['project', 'new', 'rel/demo.scalewright', '--demo'], tmp.dir);
    expect(made.stderr).toBe('');
    expect(made.code).toBe(0);
    const file = path.join(tmp.dir, 'rel', 'demo.scalewright');
    expect(fs.existsSync(file)).toBe(true);
    const status = runNpmCli(['project', 'status', 'rel/demo.scalewright', '--json'], tmp.dir);
    expect(status.code).toBe(0);
    const value = JSON.parse(status.stdout);
    expect(value.path).toBe(file);
    expect(value.phases.map((p: { phase: string }) => p.phase)).toEqual([
      'construct',
      'items',
      'review',
      'pilot',
      'purification',
      'validity',
      'appendix',
    ]);
    expect(value.phases[0].state).toBe('signed-off');
    const verify = runNpmCli(['project', 'verify', 'rel/demo.scalewright'], tmp.dir);
    expect(verify.code).toBe(0);
    expect(verify.stdout).toMatch(/hash chain intact/);
    // The demo works every phase (two CFAs included): allow for a busy machine.
  }, 120_000);

  it('work with an absolute path', () => {
    const file = path.join(tmp.dir, 'abs.scalewright');
    expect(runCli(['project', 'new', file, '--demo']).code).toBe(0);
    const status = runCli(['project', 'status', file, '--json'], { cwd: '/' });
    expect(status.code).toBe(0);
    expect(() => JSON.parse(status.stdout)).not.toThrow();
    expect(status.stdout.trim().split('\n')).toHaveLength(1);
    expect(runCli(['project', 'verify', file], { cwd: '/' }).code).toBe(0);
  }, 120_000);

  it('usage mistakes exit 2 with one error line', () => {
    for (const args of [
      ['project'],
      ['project', 'status'],
      ['project', 'status', 'x', '--nope'],
      ['frobnicate'],
    ]) {
      const run = runCli(args);
      expect(run.code, args.join(' ')).toBe(2);
      expect(run.stderr).toMatch(/^error: [^\n]+\n$/);
    }
  });

  it('a missing or foreign file exits 1 with the reason and no stack trace', () => {
    const missing = runCli(['project', 'status', path.join(tmp.dir, 'nope.scalewright')]);
    expect(missing.code).toBe(1);
    expect(missing.stderr).toMatch(/^error: .*does not exist\n$/);
    const text = path.join(tmp.dir, 'notes.txt');
    fs.writeFileSync(text, 'hello');
    const foreign = runCli(['project', 'verify', text]);
    expect(foreign.code).toBe(1);
    expect(foreign.stderr).toMatch(/^error: .*not a Scalewright study file/);
    expect(foreign.stderr).not.toMatch(/\n\s+at /);
  });

  it('refuses to create over an existing file', () => {
    const file = path.join(tmp.dir, 'abs.scalewright');
    const before = fs.readFileSync(file);
    const run = runCli(['project', 'new', file]);
    expect(run.code).toBe(1);
    expect(run.stderr).toMatch(/already exists/);
    expect(fs.readFileSync(file).equals(before)).toBe(true);
  });
});

describe('project verify finds a tampered decision log', () => {
  const cases: [string, string, RegExp][] = [
    [
      'an edited row',
      "UPDATE decision_log SET rationale = 'nobody said this' WHERE seq = 3",
      /row 3: its content does not match its hash/,
    ],
    ['a deleted row', 'DELETE FROM decision_log WHERE seq = 4', /row 4 is missing/],
    [
      'a removed last row',
      'DELETE FROM decision_log WHERE seq = (SELECT max(seq) FROM decision_log)',
      /rows were\s+removed from the end/,
    ],
    [
      'two swapped rows',
      `UPDATE decision_log SET seq = -1 WHERE seq = 5; UPDATE decision_log SET seq = 5 WHERE seq = 6; UPDATE decision_log SET seq = 6 WHERE seq = -1;`,
      /row 5: .*(does not match|link)/,
    ],
  ];
  it.each(cases)(
    '%s',
    (_label, sql, expected) => {
      const file = path.join(tmp.dir, `tamper-${Math.random().toString(36).slice(2)}.scalewright`);
      expect(runCli(['project', 'new', file, '--demo']).code).toBe(0);
      tamper(file, sql);
      const run = runCli(['project', 'verify', file]);
      expect(run.code).toBe(1);
      expect(run.stdout).toMatch(expected);
      expect(run.stderr).toMatch(/^error: .* failed verification: log row \d+: [^\n]+\n$/);
      const json = runCli(['project', 'verify', file, '--json']);
      expect(json.code).toBe(1);
      expect(JSON.parse(json.stdout).logIntact).toBe(false);
    },
    120_000,
  );
});

describe('the log head: shown by status, checked by verify --head', () => {
  let file: string;
  beforeAll(() => {
    file = path.join(tmp.dir, 'head.scalewright');
    expect(runCli(['project', 'new', file, '--demo']).code).toBe(0);
  }, 60_000);

  function head(): string {
    const status = runCli(['project', 'status', file, '--json']);
    expect(status.code).toBe(0);
    return JSON.parse(status.stdout).log.head;
  }

  it('status prints the head in its table and as log {rows, head} in its JSON', () => {
    const value = JSON.parse(runCli(['project', 'status', file, '--json']).stdout);
    expect(value.log.rows).toBe(value.logRows);
    expect(value.log.head).toMatch(new RegExp(`^${value.log.rows}:[0-9a-f]{64}$`));
    const table = runCli(['project', 'status', file]);
    const line = table.stdout.split('\n').find((l) => l.startsWith('log head '));
    expect(line).toBe(`log head ${value.log.head}`);
    expect(line?.length).toBeLessThanOrEqual(100);
  });

  it('verify --head accepts the current head and an earlier one, and exits 0', () => {
    const current = head();
    const run = runCli(['project', 'verify', file, '--head', current, '--json']);
    expect(run.code).toBe(0);
    expect(JSON.parse(run.stdout)).toMatchObject({
      intact: true,
      head: current,
      headChecked: { head: current, held: true },
    });
  });

  it('verify --head exits 1 naming the row when the log no longer holds that hash', () => {
    const [seq] = head().split(':');
    const forged = `${seq}:${'b'.repeat(64)}`;
    const run = runCli(['project', 'verify', file, '--head', forged]);
    expect(run.code).toBe(1);
    expect(run.stdout).toMatch(/NOT held by the log/);
    expect(run.stderr).toMatch(
      new RegExp(
        `^error: .* failed verification: log row ${seq}: row ${seq} now has hash [0-9a-f]{64}, not the recorded b{64}`,
      ),
    );
    for (const line of run.stdout.split('\n')) expect(line.length).toBeLessThanOrEqual(100);
  });

  it.each(['12', 'abc:def', `0:${'a'.repeat(64)}`, `3:${'a'.repeat(63)}`, `3:${'g'.repeat(64)}`])(
    'a malformed head (%s) is a usage error: exit 2, one line',
    (bad) => {
      const run = runCli(['project', 'verify', file, '--head', bad]);
      expect(run.code).toBe(2);
      expect(run.stderr).toMatch(/^error: --head ".*" is not a log head; give it as SEQ:HASH[^\n]*\n$/);
      expect(run.stdout).toBe('');
    },
  );

  it('verify names an edited item wording by table, row and column', () => {
    const copy = path.join(tmp.dir, 'head-edited.scalewright');
    fs.copyFileSync(file, copy);
    const db = new Database(copy);
    db.exec(
      "DROP TRIGGER item_revision_no_update; UPDATE item_revision SET text = 'Edited by hand.' WHERE id = 4",
    );
    db.close();
    const run = runCli(['project', 'verify', copy, '--json']);
    expect(run.code).toBe(1);
    const value = JSON.parse(run.stdout);
    expect(value.intact).toBe(false);
    expect(value.logIntact).toBe(true);
    expect(value.breaks).toEqual([
      expect.objectContaining({ check: 'content', table: 'item_revision', row: 'id 4', columns: ['text'] }),
    ]);
    expect(run.stderr).toMatch(/^error: .* failed verification: item_revision \(id 4\): text differs/);
  });
});
