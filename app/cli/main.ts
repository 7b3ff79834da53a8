import path from 'node:path';
import { type ParseArgsConfig, parseArgs } from 'node:util';
import { StudyFileError } from '../../db/errors.ts';
import { EngineError } from '../engine/errors.ts';
import { RuleError } from '../phases/errors.ts';
import { projectCommands } from './project.ts';
import { STATS_ANALYSES } from './stats/index.ts';
import { type CliContext, DataError, UsageError } from './types.ts';

const USAGE = `usage: scalewright <command> [options]

  stats reliability --data FILE --items a,b,c [options]
                                           alpha, omega and item statistics from a CSV or TSV file
  stats content --ratings FILE [options]   content validity from expert ratings
  stats cfa --data FILE --model FILE.json [options]
                                           confirmatory factor analysis: fit, loadings, CR, AVE, HTMT
  stats icc --data FILE --columns a,b,c [options]
                                           the six intraclass correlations with intervals, SEM, MDC
  stats dimensionality --data FILE --items a,b,c [options]
                                           how many factors: KMO, Bartlett, parallel analysis, MAP
  stats efa --data FILE --items a,b,c --factors M [options]
                                           exploratory factor analysis with rotation
  stats polychoric --data FILE --items a,b,c [options]
                                           polychoric correlations of ordinal items
  project new FILE [--demo]                create a study file
  project status FILE [--json]             phases, states, counts, open gates
  project import FILE --data CSV --role pilot|validation|retest [--map map.json]
                                           import a data file into the study
  project datasets FILE [--json]           datasets, their rows and SHA-256, the current one of each role
  project use FILE --dataset N --reason TEXT
                                           make a dataset current for its role (a logged decision)
  project verify FILE [--head SEQ:HASH]    check the file, its log, stored files, runs and content;
                                           with --head, that the log still holds that row

Run from the project root as: npm run -s cli -- <command> [options]`;

/** Options every `stats` analysis takes; the analysis adds its own. */
export const COMMON_STATS_OPTIONS: NonNullable<ParseArgsConfig['options']> = {
  data: { type: 'string' },
  items: { type: 'string' },
  reverse: { type: 'string' },
  min: { type: 'string' },
  max: { type: 'string' },
  missing: { type: 'string' },
  'missing-codes': { type: 'string' },
  'decimal-mark': { type: 'string' },
  seed: { type: 'string' },
  json: { type: 'boolean' },
};

export async function runCli(argv: string[], ctx: CliContext): Promise<number> {
  const [group, name, ...rest] = argv;
  if (group === undefined || group === '--help' || group === 'help') {
    process.stdout.write(`${USAGE}\n`);
    return group === undefined ? 2 : 0;
  }
  try {
    if (group === 'stats') {
      const analysis = name === undefined ? undefined : STATS_ANALYSES[name];
      if (!analysis)
        throw new UsageError(
          `unknown analysis "${name ?? ''}"; choose one of ${Object.keys(STATS_ANALYSES).join(', ')}`,
        );
      if (rest.includes('--help') && analysis.help) {
        process.stdout.write(`${analysis.help}\n`);
        return 0;
      }
      const values = parseStrict(rest, { ...COMMON_STATS_OPTIONS, ...analysis.options });
      const result = await analysis.run(values, ctx);
      if (values.json === true) {
        process.stdout.write(`${JSON.stringify({ ...result.json, warnings: result.warnings })}\n`);
      } else {
        process.stdout.write(`${result.table}\n`);
        for (const w of result.warnings) process.stderr.write(`warning: ${w}\n`);
      }
      return 0;
    }
    if (group === 'project') {
      const cmd = name === undefined ? undefined : projectCommands[name];
      if (!cmd)
        throw new UsageError(
          `unknown project command "${name ?? ''}"; choose one of ${Object.keys(projectCommands).join(', ')}`,
        );
      return await cmd(rest, ctx);
    }
    throw new UsageError(`unknown command "${group}"; run with --help to see the commands`);
  } catch (error) {
    return report(error);
  }
}

/** Parses options strictly: an unknown or malformed option is a usage error (exit 2). */
export function parseStrict(
  args: string[],
  options: NonNullable<ParseArgsConfig['options']>,
  positionals = 0,
): Record<string, string | boolean | undefined> & { _: string[] } {
  let parsed: ReturnType<typeof parseArgs>;
  try {
    parsed = parseArgs({
      args: joinNegativeValues(args, options),
      options,
      strict: true,
      allowPositionals: positionals > 0,
    });
  } catch (error) {
    throw new UsageError(
      (error as Error).message.split('\n')[0].replace(/^Unknown option/, 'unknown option'),
    );
  }
  if (parsed.positionals.length > positionals) {
    throw new UsageError(`unexpected argument "${parsed.positionals[positionals]}"`);
  }
  const values = parsed.values as Record<string, string | boolean | undefined>;
  return Object.assign(values, { _: parsed.positionals });
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

/**
 * `--missing-codes -99,999` and `--min -3` are values, not options: a string option followed by a
 * token that looks like a negative number is joined to it as `--option=-99`.
 */
function joinNegativeValues(args: string[], options: NonNullable<ParseArgsConfig['options']>): string[] {
  const out: string[] = [];
  for (let i = 0; i < args.length; i++) {
    const name = args[i].startsWith('--') ? args[i].slice(2) : undefined;
    const next = args[i + 1];
    if (name && options[name]?.type === 'string' && next !== undefined && /^-\d|^-\.\d/.test(next)) {
      out.push(`--${name}=${next}`);
      i++;
    } else {
      out.push(args[i]);
    }
  }
  return out;
}

/** Resolves a path the user typed against the folder they ran npm from. */
export function resolveUserPath(file: string, ctx: CliContext): string {
  return path.resolve(ctx.cwd, file);
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
