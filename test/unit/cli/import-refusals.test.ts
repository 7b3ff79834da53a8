import fs from 'node:fs';
import path from 'node:path';
import { afterAll, beforeAll, describe, expect, it, vi } from 'vitest';
import { runCli } from '../../../app/cli/main.ts';
import type { ColumnMapping } from '../../../app/import/mapping.ts';
import { createStudyWithPool } from '../../helpers/study-data.ts';
import { sha256File, tempDir } from '../../helpers/tmp.ts';
import { CORPUS, type CorpusEntry } from '../import/broken-corpus.ts';

/**
 * `project import` refusals leave the study byte for byte as it was: every file of the broken-file
 * corpus that the import refuses is tried against one study, whose SHA-256 is compared before and
 * after. The command runs in this process (the same entry point as the command line) to keep the
 * many cases fast.
 */
const POOL = ['tc1', 'tc2', 'q1', 'q2'];

let tmp: ReturnType<typeof tempDir>;
let studyFile: string;

beforeAll(() => {
  tmp = tempDir();
  studyFile = path.join(tmp.dir, 'refusals.scalewright');
  const study = createStudyWithPool(studyFile, POOL);
  study.close();
});
afterAll(() => tmp.cleanup());

/** The corpus entry's reading settings and mapping as a map file, or undefined when it has none. */
function mapFile(entry: CorpusEntry): object | undefined {
  const columns: Record<string, unknown> = {};
  for (const [column, role] of Object.entries(entry.dataset?.mapping ?? ({} as ColumnMapping))) {
    if (role.role === 'item') columns[column] = { item: role.itemCode };
    else if (role.role === 'attention')
      columns[column] = { role: 'attention', correctAnswer: role.correctAnswer };
    else columns[column] = role.role;
  }
  const map = {
    ...(Object.keys(columns).length > 0 ? { columns } : {}),
    ...(entry.parse?.delimiter === undefined ? {} : { delimiter: entry.parse.delimiter }),
    ...(entry.parse?.encoding === undefined ? {} : { encoding: entry.parse.encoding }),
  };
  return Object.keys(map).length > 0 ? map : undefined;
}

/** Entries the command line can express: no reader limit of its own, no per-import scale bounds. */
const EXPRESSIBLE = CORPUS.filter((e) => e.parse?.maxBytes === undefined && e.dataset?.options === undefined);

async function importInProcess(args: string[]): Promise<{ code: number; stderr: string; stdout: string }> {
  let stderr = '';
  let stdout = '';
  const err = vi.spyOn(process.stderr, 'write').mockImplementation((chunk) => {
    stderr += String(chunk);
    return true;
  });
  const out = vi.spyOn(process.stdout, 'write').mockImplementation((chunk) => {
    stdout += String(chunk);
    return true;
  });
  try {
    const code = await runCli(args, { cwd: tmp.dir });
    return { code, stderr, stdout };
  } finally {
    err.mockRestore();
    out.mockRestore();
  }
}

describe('a refused import leaves the study byte-identical', () => {
  it(`over the broken-file corpus (${EXPRESSIBLE.length} files)`, async () => {
    const refused: string[] = [];
    for (const [i, entry] of EXPRESSIBLE.entries()) {
      const data = path.join(tmp.dir, `case-${i}.csv`);
      fs.writeFileSync(data, entry.bytes);
      const args = ['project', 'import', studyFile, '--data', data, '--role', 'pilot'];
      const map = mapFile(entry);
      if (map) {
        fs.writeFileSync(path.join(tmp.dir, `case-${i}.json`), JSON.stringify(map));
        args.push('--map', path.join(tmp.dir, `case-${i}.json`));
      }
      const before = sha256File(studyFile);
      const run = await importInProcess(args);
      if (run.code === 0) {
        // Accepted (a file with warnings only): then the study changed, as it should.
        expect(sha256File(studyFile), entry.name).not.toBe(before);
        expect('error' in entry.expect, entry.name).toBe(false);
        continue;
      }
      refused.push(entry.name);
      // 1: the data cannot be imported; 2: the map file cannot express the case.
      expect([1, 2], `${entry.name}: ${run.stderr}`).toContain(run.code);
      expect(run.stderr, entry.name).toMatch(/^error: [^\n]+\n$/);
      expect(sha256File(studyFile), `${entry.name}: ${run.stderr}`).toBe(before);
      expect(
        fs.readdirSync(tmp.dir).filter((f) => f.startsWith('refusals.scalewright')),
        entry.name,
      ).toEqual(['refusals.scalewright']);
    }
    // Every file the corpus expects to be unreadable was among the refusals, and so was every
    // file whose cells need a look (no "acceptProblems" in the map file).
    for (const entry of EXPRESSIBLE) {
      const mustRefuse = 'error' in entry.expect || (entry.expect.problems?.length ?? 0) > 0;
      if (mustRefuse) expect(refused, entry.name).toContain(entry.name);
    }
    expect(refused.length).toBeGreaterThanOrEqual(25);
  }, 120_000);
});
