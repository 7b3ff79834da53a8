import { type ParseArgsConfig, parseArgs } from 'node:util';
import { LINE_WIDTH, wrapIndented } from './table.ts';
import {
  type CliContext,
  type OptionSpec,
  type OptionSpecs,
  type OptionValues,
  UsageError,
} from './types.ts';

export type { OptionSpec, OptionSpecs } from './types.ts';

/** What every command declares: its name, what it does, its positional arguments and its options. */
export interface CommandSpec {
  /** As typed after `scalewright`: "project status", "stats reliability". */
  name: string;
  summary: string;
  /** Positional arguments in order (for example the study FILE). */
  args?: { name: string; description: string }[];
  options: OptionSpecs;
  /**
   * Options other commands of its kind take that make no sense here, each with what to do instead:
   * naming one is a usage error with that hint, not "unknown option".
   */
  refused?: Record<string, string>;
  /** Paragraphs printed after the options in `--help` (conventions, rules of thumb, cautions). */
  notes?: string;
}

/** A command with its work: `run` gets the parsed options and returns the exit code. */
export interface CliCommand extends CommandSpec {
  run(values: ParsedArgs, ctx: CliContext): Promise<number>;
}

export type ParsedArgs = OptionValues & { _: string[] };

const HELP: OptionSpec = { type: 'boolean', description: 'show this help and exit' };

/** The option column of the help text is this wide (longer options push their text to the next line). */
const OPTION_COLUMN = 28;

/** Joins an option and its value so that wrapping never separates them. */
const KEEP_TOGETHER = '\u00a0';

function optionUsage(name: string, spec: OptionSpec, join = ' '): string {
  return spec.type === 'boolean' ? `--${name}` : `--${name}${join}${spec.value ?? 'VALUE'}`;
}

function usageParts(spec: CommandSpec): string[] {
  const parts = [`scalewright${KEEP_TOGETHER}${spec.name.replace(/ /g, KEEP_TOGETHER)}`];
  parts.push(...(spec.args ?? []).map((a) => a.name));
  for (const [name, option] of Object.entries(spec.options)) {
    const text = optionUsage(name, option, KEEP_TOGETHER);
    parts.push(option.required ? text : `[${text}]`);
  }
  return parts;
}

/**
 * The usage line (`scalewright project status FILE [--json]`: required options bare, the others in
 * brackets), wrapped between options, never inside one.
 */
function wrappedUsage(spec: CommandSpec, prefix: string, indent: number, first: number): string {
  return wrapIndented(`${prefix}${usageParts(spec).join(' ')}`, indent, first).replaceAll(KEEP_TOGETHER, ' ');
}

/** One help row: a term in the first column and its description wrapped beside it. */
function helpRow(term: string, description: string): string {
  const lead = `  ${term}`;
  if (lead.length + 2 > OPTION_COLUMN) {
    return `${lead}\n${wrapIndented(description, OPTION_COLUMN, OPTION_COLUMN)}`;
  }
  const body = wrapIndented(description, OPTION_COLUMN, OPTION_COLUMN);
  return lead.padEnd(OPTION_COLUMN) + body.slice(OPTION_COLUMN);
}

/** The `--help` text of a command: usage, what it does, its arguments and every option. */
export function helpText(spec: CommandSpec): string {
  const lines = [wrappedUsage(spec, 'usage: ', 4, 0), '', wrapIndented(spec.summary, 0, 0, LINE_WIDTH)];
  if (spec.args && spec.args.length > 0) {
    lines.push('', 'arguments:', ...spec.args.map((a) => helpRow(a.name, a.description)));
  }
  lines.push(
    '',
    'options:',
    ...Object.entries({ ...spec.options, help: HELP }).map(([name, option]) =>
      helpRow(optionUsage(name, option), option.description),
    ),
  );
  if (spec.notes) {
    const paragraphs = spec.notes.split(/\n\s*\n/).map((p) => wrapIndented(p.replace(/\s*\n\s*/g, ' '), 0));
    lines.push('', paragraphs.join('\n\n'));
  }
  return lines.join('\n');
}

/** A list of commands with one line each, for the top-level and group help. */
export function commandList(title: string, specs: CommandSpec[], footer: string[] = []): string {
  return [
    title,
    '',
    ...specs.map((s) => `${wrappedUsage(s, '', 6, 2)}\n${wrapIndented(s.summary, 6, 6)}`),
    ...(footer.length > 0 ? ['', ...footer] : []),
  ].join('\n');
}

export function asksForHelp(args: string[]): boolean {
  return args.includes('--help') || args.includes('-h');
}

/** Parses a command's arguments strictly: an unknown or malformed option is a usage error (exit 2). */
export function parseCommand(spec: CommandSpec, args: string[]): ParsedArgs {
  for (const arg of args) {
    const name = arg.startsWith('--') ? arg.slice(2).split('=')[0] : undefined;
    const hint = name === undefined ? undefined : spec.refused?.[name];
    if (hint !== undefined) throw new UsageError(`--${name} does not apply to ${spec.name}: ${hint}`);
  }
  const options: NonNullable<ParseArgsConfig['options']> = Object.fromEntries(
    Object.entries(spec.options).map(([name, o]) => [name, { type: o.type }]),
  );
  const positionals = spec.args?.length ?? 0;
  let parsed: ReturnType<typeof parseArgs>;
  try {
    parsed = parseArgs({
      args: joinNegativeValues(args, spec.options),
      options,
      strict: true,
      allowPositionals: positionals > 0,
    });
  } catch (error) {
    const message = (error as Error).message.split('\n')[0].replace(/^Unknown option/, 'unknown option');
    throw new UsageError(`${message} (see ${spec.name} --help)`);
  }
  if (parsed.positionals.length > positionals) {
    throw new UsageError(`unexpected argument "${parsed.positionals[positionals]}"`);
  }
  const values = parsed.values as OptionValues;
  return Object.assign(values, { _: parsed.positionals });
}

/**
 * `--missing-codes -99,999` and `--min -3` are values, not options: a string option followed by a
 * token that looks like a negative number is joined to it as `--option=-99`.
 */
function joinNegativeValues(args: string[], options: OptionSpecs): string[] {
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

/** Reads a string option; `--name` given without a value is a usage error naming it. */
export function stringValue(values: OptionValues, name: string): string | undefined {
  const value = values[name];
  if (value === true) throw new UsageError(`--${name} needs a value`);
  return typeof value === 'string' ? value : undefined;
}
