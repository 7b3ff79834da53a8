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
import { PROJECT_COMMANDS } from './project.ts';
import { STATS_ANALYSES } from './stats/index.ts';
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

/** Every command, by group and name. */
export const COMMANDS: Record<'stats' | 'project', Record<string, CliCommand>> = {
  stats: Object.fromEntries(Object.entries(STATS_ANALYSES).map(([name, a]) => [name, statsCommand(a)])),
  project: Object.fromEntries(PROJECT_COMMANDS.map((c) => [c.name.replace(/^project /, ''), c])),
};

function allCommands(): CommandSpec[] {
  return [...Object.values(COMMANDS.stats), ...Object.values(COMMANDS.project)];
}

/** The top-level help: every command with its usage and what it does. */
export function topLevelHelp(): string {
  return commandList('usage: scalewright <command> [options]', allCommands(), [
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
    write(topLevelHelp());
    return group === undefined ? 2 : 0;
  }
  try {
    if (group !== 'stats' && group !== 'project') {
      throw new UsageError(`unknown command "${group}"; run with --help to see the commands`);
    }
    const commands = COMMANDS[group];
    if (name === undefined || name === '--help' || name === '-h') {
      if (name !== undefined) {
        write(commandList(`usage: scalewright ${group} <command> [options]`, Object.values(commands)));
        return 0;
      }
      throw new UsageError(`${group} needs a command: one of ${Object.keys(commands).join(', ')}`);
    }
    const command = commands[name];
    if (!command) {
      throw new UsageError(
        `unknown ${group} command "${name}"; choose one of ${Object.keys(commands).join(', ')}`,
      );
    }
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
