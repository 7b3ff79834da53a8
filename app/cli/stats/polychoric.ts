import { correlationInput } from '../../engine/factor/input.ts';
import { methodsField } from '../../engine/methods/index.ts';
import { formatTable } from '../table.ts';
import { type StatsAnalysis, UsageError } from '../types.ts';
import { itemInputs, loadItemData, statsHead } from './data.ts';
import { bounded, unbounded } from '../../api/format.ts';
import { columnBlocks, cut, engineStep, factorSpec } from './factor-common.ts';

/** `stats polychoric`: the polychoric correlation matrix and thresholds of ordinal items. */
export const polychoric: StatsAnalysis = {
  name: 'polychoric',
  summary: 'polychoric correlations of ordinal items (two-step), with thresholds',
  ...factorSpec(
    "Polychoric correlations of ordinal items (two-step maximum likelihood) with each item's thresholds;\na matrix that is not positive definite is smoothed, and the output says so.",
    [],
  ),
  async run(values, ctx) {
    if (values.seed !== undefined)
      throw new UsageError('stats polychoric does not take --seed: it has no random step');
    const loaded = await loadItemData(values, ctx);
    if (loaded.names.length < 2) throw new UsageError('give at least two items in --items');
    const input = engineStep(loaded.file, () =>
      correlationInput(loaded.names, loaded.data, { kind: 'polychoric', missing: loaded.missing }),
    );
    const thresholds = input.thresholds ?? [];
    const json = {
      ...statsHead('polychoric', loaded, itemInputs(loaded)),
      n: input.n,
      items: loaded.names,
      matrix: input.matrix,
      smoothed: input.smoothed,
      thresholds: Object.fromEntries(loaded.names.map((name, i) => [name, thresholds[i]])),
      methods: methodsField([
        'polychoric.two-step',
        'polychoric.bivariate-normal',
        ...(input.smoothed ? ['linalg.smoothing'] : []),
      ]),
    };
    const lines = [
      `Polychoric correlations of ${loaded.names.length} items: n = ${input.n} (${loaded.missing} deletion)${input.smoothed ? ', smoothed to positive definite' : ''}`,
      '',
    ];
    const numberWidth = String(loaded.names.length).length + 1;
    const nameWidth = Math.min(16, Math.max(4, ...loaded.names.map((s) => s.length))) + numberWidth;
    for (const block of columnBlocks(loaded.names.length, nameWidth + 2, 7)) {
      lines.push(
        formatTable(
          ['item', ...block.map((k) => String(k + 1))],
          loaded.names.map((name, i) => [
            `${i + 1} ${cut(name)}`,
            ...block.map((k) => bounded(input.matrix[i][k], 2)),
          ]),
          ['left', ...block.map(() => 'right' as const)],
        ),
        '',
      );
    }
    lines.push('thresholds (z values between adjacent answer categories)');
    for (const [i, name] of loaded.names.entries()) {
      const row = `  ${cut(name)}: ${thresholds[i].map((t) => unbounded(t)).join('  ')}`;
      lines.push(row.length > 100 ? `${row.slice(0, 99)}…` : row);
    }
    return { json, table: lines.join('\n'), warnings: [...loaded.warnings, ...input.warnings] };
  },
};
