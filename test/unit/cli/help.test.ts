import { describe, expect, it } from 'vitest';
import { loadCommands } from '../../../app/cli/main.ts';
import { formatTable } from '../../../app/cli/table.ts';
import { runCli, runCliHere } from '../../helpers/cli.ts';

const COMMANDS = await loadCommands();
const EVERY_COMMAND = Object.values(COMMANDS).flatMap((group) => Object.values(group));

function widest(text: string): number {
  return Math.max(...text.split('\n').map((line) => line.length));
}

describe('--help', () => {
  it('the command table holds every command the command-line contract names', () => {
    expect(EVERY_COMMAND.map((c) => c.name).sort()).toEqual(
      [
        'stats reliability',
        'stats content',
        'stats cfa',
        'stats icc',
        'stats dimensionality',
        'stats efa',
        'stats polychoric',
        'project new',
        'project status',
        'project import',
        'project datasets',
        'project use',
        'project reopen',
        'project signoff',
        'project instrument',
        'project verify',
        'project export',
      ].sort(),
    );
  });

  it.each(EVERY_COMMAND.map((c) => [c.name, c] as const))(
    '%s --help prints its usage and every option, exit 0, within 100 columns',
    async (name, command) => {
      const run = await runCliHere([...name.split(' '), '--help']);
      expect(run.code).toBe(0);
      expect(run.stderr).toBe('');
      expect(run.stdout).toMatch(new RegExp(`^usage: scalewright ${name}`));
      for (const option of Object.keys(command.options)) {
        expect(run.stdout, `--${option}`).toMatch(new RegExp(`\\n  --${option}\\b`));
      }
      expect(run.stdout).toMatch(/\n {2}--help\b/);
      expect(widest(run.stdout)).toBeLessThanOrEqual(100);
    },
  );

  it('every option has a description (help is generated from the declarations, so none may be blank)', () => {
    for (const command of EVERY_COMMAND) {
      for (const [option, spec] of Object.entries(command.options)) {
        expect(spec.description.trim(), `${command.name} --${option}`).not.toBe('');
      }
    }
  });

  it('the top level lists every command, exit 0; with no command at all it is a usage mistake (exit 2)', async () => {
    const help = await runCliHere(['--help']);
    expect(help.code).toBe(0);
    for (const command of EVERY_COMMAND) expect(help.stdout).toContain(`scalewright ${command.name}`);
    expect(widest(help.stdout)).toBeLessThanOrEqual(100);
    expect((await runCliHere([])).code).toBe(2);
  });

  it('each group lists its commands', async () => {
    for (const group of ['stats', 'project'] as const) {
      const run = await runCliHere([group, '--help']);
      expect(run.code).toBe(0);
      for (const name of Object.keys(COMMANDS[group])) expect(run.stdout).toContain(`${group} ${name}`);
    }
  });

  it('--help wins over other arguments, even incomplete ones, and the real process exits 0', () => {
    const run = runCli(['project', 'signoff', '--phase', 'items', '--help']);
    expect(run.code).toBe(0);
    expect(run.stdout).toMatch(/^usage: scalewright project signoff FILE --phase ID --reason TEXT/);
  });

  it('an unknown option is a usage mistake that points to --help', async () => {
    const run = await runCliHere(['project', 'status', 'x.scalewright', '--wide']);
    expect(run.code).toBe(2);
    expect(run.stderr).toMatch(/^error: unknown option '--wide'.*see project status --help\)\n$/);
  });
});

describe('readable output fits 100 columns', () => {
  it.each([
    [
      'stats reliability',
      'stats reliability --data assets/examples/validation-wave.csv --items TR01,TR02,TR03,TR04,TR05,TR06,TR07,TR08,TR09 --missing-codes -9',
    ],
    ['stats content', 'stats content --ratings assets/examples/ratings.csv'],
  ])('%s on the example files', async (_name, line) => {
    const run = await runCliHere(line.split(' '));
    expect(run.code).toBe(0);
    expect(widest(run.stdout)).toBeLessThanOrEqual(100);
  });
});

describe('formatTable', () => {
  it('wraps the text columns of a table wider than the line, keeps numbers whole, and cuts a word longer than its column', () => {
    const long = 'word '.repeat(40).trim();
    const table = formatTable(
      ['name', 'notes', 'n'],
      [
        ['first', long, '12345'],
        ['second', `${'x'.repeat(150)} end`, '7'],
      ],
      ['left', 'left', 'right'],
    );
    const lines = table.split('\n');
    expect(widest(table)).toBeLessThanOrEqual(100);
    expect(lines[2]).toMatch(/^first +word word .* 12345$/);
    // Every word of the wrapped cell is still there, in order.
    expect((table.match(/word/g) ?? []).length).toBe(40);
    expect(table).toMatch(/x…/);
    expect(table).toMatch(/ end/);
  });

  it('leaves a table that fits as it was', () => {
    expect(formatTable(['a', 'b'], [['1', 'two']])).toBe('a  b\n─  ───\n1  two');
  });
});
