import { EngineError } from '../../engine/errors.ts';
import { type CorrelationInput, type CorrelationKind, correlationInput } from '../../engine/factor/input.ts';
import { DataError, type OptionValues, UsageError } from '../types.ts';
import type { OptionSpecs } from '../command.ts';
import { COMMON_STATS_OPTIONS, itemInputs, type LoadedItems, statsHead } from './data.ts';

/** Widest a command-line table may be. */
export const TABLE_WIDTH = 100;
/** Item names in tables are cut to this many characters (with an ellipsis). */
export const NAME_WIDTH = 16;

/** The options the factor analyses share: which correlations to analyse. */
export function correlationKindOption(values: OptionValues): CorrelationKind {
  const raw = values.correlation;
  if (raw === undefined) return 'pearson';
  if (raw !== 'pearson' && raw !== 'polychoric') {
    throw new UsageError(`--correlation must be pearson or polychoric (got "${String(raw)}")`);
  }
  return raw;
}

/** One of a fixed set of words for an option, or its default. */
export function choiceOption<T extends string>(
  values: OptionValues,
  name: string,
  choices: readonly T[],
  fallback: T,
): T {
  const raw = values[name];
  if (raw === undefined) return fallback;
  if (typeof raw !== 'string' || !choices.includes(raw as T)) {
    throw new UsageError(`--${name} must be one of ${choices.join(', ')} (got "${String(raw)}")`);
  }
  return raw as T;
}

/** The correlation matrix of the loaded items; engine refusals become data errors naming the file. */
export function correlationsOf(loaded: LoadedItems, kind: CorrelationKind): CorrelationInput {
  if (loaded.names.length < 2) throw new UsageError('give at least two items in --items');
  try {
    return correlationInput(loaded.names, loaded.data, { kind, missing: loaded.missing });
  } catch (error) {
    if (error instanceof EngineError) throw new DataError(`${loaded.file}: ${error.message}`);
    throw error;
  }
}

/** Runs an engine computation; its refusal is a data error (exit 1) naming the file. */
export function engineStep<T>(file: string, run: () => T): T {
  try {
    return run();
  } catch (error) {
    if (error instanceof EngineError) throw new DataError(`${file}: ${error.message}`);
    throw error;
  }
}

/** An item name cut to `width` characters with an ellipsis. */
export function cut(name: string, width = NAME_WIDTH): string {
  return name.length <= width ? name : `${name.slice(0, width - 1)}…`;
}

/**
 * Splits numeric columns into blocks so that each printed table stays within TABLE_WIDTH: `fixedWidth`
 * is what the leading columns take, `columnWidth` each numeric column (with its separator).
 */
export function columnBlocks(count: number, fixedWidth: number, columnWidth: number): number[][] {
  const per = Math.max(1, Math.floor((TABLE_WIDTH - fixedWidth) / columnWidth));
  const blocks: number[][] = [];
  for (let start = 0; start < count; start += per) {
    blocks.push(Array.from({ length: Math.min(per, count - start) }, (_, i) => start + i));
  }
  return blocks;
}

/**
 * The options and help notes of a factor-analysis command: the common options, then its own, each
 * given as ["--name VALUE", "what it does"] ("--name" alone for a switch; "(required)" marks one).
 */
export function factorSpec(about: string, own: [string, string][]): { options: OptionSpecs; notes: string } {
  const options: OptionSpecs = { ...COMMON_STATS_OPTIONS };
  for (const [flag, description] of own) {
    const [name, value] = flag.replace(/^--/, '').split(' ');
    options[name] =
      value === undefined
        ? { type: 'boolean', description }
        : { type: 'string', value, description, required: description.includes('(required)') };
  }
  return {
    options,
    notes: `${about}\n\nRules of thumb shown advise; the researcher decides. A new scale is not validated for diagnosis, hiring, admission or other high-stakes decisions about people.`,
  };
}

/** The opening of a factor analysis's JSON output: the analysis, the engine, the data file and every input. */
export function analysisHead(
  analysis: string,
  loaded: LoadedItems,
  input: CorrelationInput,
  settings: Record<string, unknown>,
) {
  return statsHead(analysis, loaded, { ...itemInputs(loaded), correlation: input.kind, ...settings });
}
