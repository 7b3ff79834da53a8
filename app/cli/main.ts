import path from 'node:path';
import { StudyFileError } from '../../db/errors.ts';
import { EngineError } from '../engine/errors.ts';
import { RuleError } from '../phases/errors.ts';
import {
  asksForHelp,
  type CliCommand,
  type CommandSpec,
  commandList,
  helpText,
  parseCommand,
} from './command.ts';
import { type CliContext, DataError, type StatsAnalysis, UsageError } from './types.ts';

const RUN_AS = 'Run from the project root as: npm run -s cli -- <command> [options]';

/** A `stats` analysis as a command: parses, runs, prints the JSON object or the table. */
function statsCommand(analysis: StatsAnalysis): CliCommand {
  return {
    name: `stats ${analysis.name}`,
    summary: analysis.summary,
    options: analysis.options,
    refused: analysis.refused,
    notes: analysis.notes,
    async run(values, ctx) {
      const result = await analysis.run(values, ctx);
      if (values.json === true) {
        process.stdout.write(`${JSON.stringify({ ...result.json, warnings: result.warnings })}\n`);
      } else {
        process.stdout.write(`${result.table}\n`);
        for (const w of result.warnings) process.stderr.write(`warning: ${w}\n`);
      }
      return 0;
    },
  };
}

type Group = 'stats' | 'project';

const stats = (load: () => Promise<StatsAnalysis>) => async () => statsCommand(await load());

/**
 * Every command, by group and name, in the order the help lists them, each as the loader of its
 * module: a command reads only its own code (and what that imports), so `stats reliability` never
 * loads the study file, the exports or the validity phase, and the bundle's split keeps it that way.
 */
const LOADERS: Record<Group, Record<string, () => Promise<CliCommand>>> = {
  stats: {
    reliability: stats(async () => (await import('./stats/reliability.ts')).reliability),
    content: stats(async () => (await import('./stats/content.ts')).content),
    cfa: stats(async () => (await import('./stats/cfa.ts')).cfa),
    icc: stats(async () => (await import('./stats/icc.ts')).icc),
    dimensionality: stats(async () => (await import('./stats/dimensionality.ts')).dimensionality),
    efa: stats(async () => (await import('./stats/efa.ts')).efa),
    polychoric: stats(async () => (await import('./stats/polychoric.ts')).polychoric),
  },
  project: {
    new: async () => (await import('./project.ts')).newCommand,
    status: async () => (await import('./project.ts')).statusCommand,
    import: async () => (await import('./project-import.ts')).importCommand,
    datasets: async () => (await import('./project-datasets.ts')).datasetsCommand,
    use: async () => (await import('./project-datasets.ts')).useCommand,
    reopen: async () => (await import('./project.ts')).reopenCommand,
    signoff: async () => (await import('./project.ts')).signoffCommand,
    instrument: async () => (await import('./project-instrument.ts')).instrumentCommand,
    verify: async () => (await import('./project.ts')).verifyCommand,
    export: async () => (await import('./project-export.ts')).exportCommand,
  },
};

/** The commands of one group, loaded, in the help's order. */
async function groupCommands(group: Group): Promise<CliCommand[]> {
  return Promise.all(Object.values(LOADERS[group]).map((load) => load()));
}

/** Every command, loaded (the help texts and the tests of the command table use this). */
export async function loadCommands(): Promise<Record<Group, Record<string, CliCommand>>> {
  const entries = async (group: Group) => {
    const commands = await groupCommands(group);
    return Object.fromEntries(Object.keys(LOADERS[group]).map((name, i) => [name, commands[i]]));
  };
  return { stats: await entries('stats'), project: await entries('project') };
}

async function allCommands(): Promise<CommandSpec[]> {
  return [...(await groupCommands('stats')), ...(await groupCommands('project'))];
}

/** The top-level help: every command with its usage and what it does. */
export async function topLevelHelp(): Promise<string> {
  return commandList('usage: scalewright <command> [options]', await allCommands(), [
    'Every command answers --help with its options.',
    RUN_AS,
  ]);
}

function write(text: string): void {
  process.stdout.write(`${text}\n`);
}

export async function runCli(argv: string[], ctx: CliContext): Promise<number> {
  const [group, name, ...rest] = argv;
  if (group === undefined || group === '--help' || group === '-h' || group === 'help') {
    write(await topLevelHelp());
    return group === undefined ? 2 : 0;
  }
  try {
    if (group !== 'stats' && group !== 'project') {
      throw new UsageError(`unknown command "${group}"; run with --help to see the commands`);
    }
    const loaders = LOADERS[group];
    if (name === undefined || name === '--help' || name === '-h') {
      if (name !== undefined) {
        write(commandList(`usage: scalewright ${group} <command> [options]`, await groupCommands(group)));
        return 0;
      }
      throw new UsageError(`${group} needs a command: one of ${Object.keys(loaders).join(', ')}`);
    }
    if (!Object.hasOwn(loaders, name)) {
      throw new UsageError(
        `unknown ${group} command "${name}"; choose one of ${Object.keys(loaders).join(', ')}`,
      );
    }
    const command = await loaders[name]();
    if (asksForHelp(rest)) {
      write(helpText(command));
      return 0;
    }
    return await command.run(parseCommand(command, rest), ctx);
  } catch (error) {
    return report(error);
  }
}

/** One `error: ` line on stderr, never a stack trace; usage mistakes exit 2, everything else 1. */
function report(error: unknown): number {
  const message = error instanceof Error ? error.message : String(error);
  const known =
    error instanceof UsageError ||
    error instanceof DataError ||
    error instanceof EngineError ||
    error instanceof StudyFileError ||
    error instanceof RuleError;
  const line = known ? message : `unexpected failure: ${message}`;
  process.stderr.write(`error: ${line.replace(/\s*\n\s*/g, ' ')}\n`);
  return error instanceof UsageError ? 2 : 1;
}

const isMain =
  process.argv[1] !== undefined &&
  path.resolve(process.argv[1]) === path.resolve(new URL(import.meta.url).pathname);
if (isMain) {
  const ctx: CliContext = { cwd: process.env.INIT_CWD ?? process.cwd() };
  runCli(process.argv.slice(2), ctx).then((code) => {
    process.exitCode = code;
  });
}
