/** One option of a command, declared once: parsing, usage and help all come from this. */
export interface OptionSpec {
  type: 'string' | 'boolean';
  /** What the value looks like in usage and help ("FILE", "N", "a,b,c"); string options only. */
  value?: string;
  description: string;
  /** Shown without brackets in the usage line; the command still checks it and names it when absent. */
  required?: boolean;
}

export type OptionSpecs = Record<string, OptionSpec>;

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
 * One `stats <name>` analysis. `options` is every option it takes, each with its description (an
 * analysis of a data file spreads COMMON_STATS_OPTIONS from stats/data.ts into it); the dispatcher
 * (app/cli/main.ts) answers --help from them, parses argv strictly, and calls `run` with the values.
 */
export interface StatsAnalysis {
  name: string;
  summary: string;
  options: OptionSpecs;
  /** Common options that do not apply here, each with what to give instead. */
  refused?: Record<string, string>;
  /** Printed after the options in `--help`: what the analysis reports, its conventions, cautions. */
  notes?: string;
  run(values: OptionValues, ctx: CliContext): Promise<StatsResult>;
}
