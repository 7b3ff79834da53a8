import { mkdtempSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, describe, expect, it } from 'vitest';
import { STAT_LABELS } from '../../../../app/api/format.ts';
import { COLUMNS } from '../../../../renderer/phases/purification/ItemTable.tsx';
import { runCli } from '../../../helpers/cli.ts';

const dir = mkdtempSync(join(tmpdir(), 'scalewright-labels-'));
afterAll(() => rmSync(dir, { recursive: true, force: true }));

describe('the command line and the screens name each statistic alike', () => {
  it('the item table of the purification screen and the reliability table share their headers', () => {
    const file = join(dir, 'trips.csv');
    writeFileSync(file, 'a,b,c\n1,2,2\n2,3,3\n3,3,4\n4,5,4\n5,4,5\n2,2,1\n3,4,3\n');
    const run = runCli(['stats', 'reliability', '--data', file, '--items', 'a,b,c']);
    expect(run.code).toBe(0);
    const screenLabels = new Map(COLUMNS.map((c) => [c.key, c.label]));
    const shared = [
      ['mean', STAT_LABELS.mean],
      ['sd', STAT_LABELS.sd],
      ['skewness', STAT_LABELS.skewness],
      ['kurtosis', STAT_LABELS.kurtosis],
      ['missing', STAT_LABELS.missing],
      ['r', STAT_LABELS.correctedItemTotal],
      ['ifDeleted', STAT_LABELS.alphaIfDeleted],
    ] as const;
    const headers = run.stdout
      .split('\n')
      .filter((line) => line.startsWith('Item '))
      .join(' ');
    for (const [key, label] of shared) {
      expect(screenLabels.get(key)).toBe(label);
      expect(headers).toContain(label);
    }
    expect(run.stdout).toContain(STAT_LABELS.alpha);
    expect(run.stdout).not.toMatch(/\b(acceptable|questionable|unacceptable)\b/);
  });
});
