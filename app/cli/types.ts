import type { ParseArgsConfig } from 'node:util';

/** A mistake in how the command was called: exit code 2. */
export class UsageError extends Error {
  override name = 'UsageError';
}

/** The data cannot be analysed (bad file, too few cases, unknown column): exit code 1. */
export class DataError extends Error {
  override name = 'DataError';
}

export type OptionValues = Record<string, string | boolean | undefined>;

export interface CliContext {
  /** Folder that relative paths resolve against (npm passes the user's folder as INIT_CWD). */
  cwd: string;
}

export interface StatsResult {
  /** Printed as the one JSON object with --json; numbers at full precision. */
  json: Record<string, unknown>;
  /** Printed without --json: a readable, rounded table. */
  table: string;
  /** Also inside json.warnings; printed to stderr in table mode. */
  warnings: string[];
}

/**
 * One `stats <name>` analysis. The dispatcher (app/cli/main.ts) adds the common options
 * (--data, --items, --reverse, --min, --max, --missing, --missing-codes, --seed, --json) to
 * `options`, parses argv strictly, and calls `run` with the parsed values.
 */
export interface StatsAnalysis {
  name: string;
  summary: string;
  /** Printed by `stats <name> --help`: usage line and every option with what it does. */
  help?: string;
  options: NonNullable<ParseArgsConfig['options']>;
  run(values: OptionValues, ctx: CliContext): Promise<StatsResult>;
}
