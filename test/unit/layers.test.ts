import fs from 'node:fs';
import path from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { tempDir } from '../helpers/tmp.ts';
import { checkLayers, formatViolations, loadRules } from '../layers/check.ts';

/** A miniature tree with the project's top-level folders, cruised with the project's rules. */
function plant(dir: string, files: Record<string, string>): void {
  for (const [name, text] of Object.entries(files)) {
    fs.mkdirSync(path.dirname(path.join(dir, name)), { recursive: true });
    fs.writeFileSync(path.join(dir, name), text);
  }
}

describe('layer rules (.dependency-cruiser.cjs)', () => {
  const tmp = tempDir('scalewright-layers-');
  beforeAll(() => {
    plant(tmp.dir, {
      'db/store.ts': 'export interface Row { id: number }\nexport const open = () => 1;\n',
      'app/api/contracts/rows.ts': 'export type { Row } from "../../../db/store.ts";\n',
      'app/engine/sum.ts': 'export const sum = (a: number, b: number) => a + b;\n',
      'app/engine/reads.ts': 'import fs from "node:fs";\nexport const read = () => fs.readFileSync("x");\n',
      'app/workers/a.ts': 'import { b } from "./b.ts";\nexport const a = () => b();\n',
      'app/workers/b.ts': 'import { a } from "./a.ts";\nexport const b = (): number => a();\n',
      // A type-only import from the study-file layer, straight into the interface.
      'renderer/typed.ts': 'import type { Row } from "../db/store.ts";\nexport const rows: Row[] = [];\n',
      'renderer/ok.ts':
        'import type { Row } from "../app/api/contracts/rows.ts";\nimport { sum } from "./sum.ts";\n' +
        'export const r: Row[] = [];\nexport const s = sum;\n',
      'renderer/sum.ts': 'export const sum = 1;\n',
    });
  });
  afterAll(() => tmp.cleanup());

  it('every rule is named and gives its reason', () => {
    const rules = loadRules().forbidden ?? [];
    expect(rules.map((r) => r.name)).toEqual([
      'renderer-only-api',
      'engine-is-pure',
      'engine-below-everything',
      'db-below-phases',
      'workers-no-phases',
      'cli-no-shell',
      'no-circular',
    ]);
    for (const rule of rules) expect(rule.comment?.length ?? 0).toBeGreaterThan(40);
  });

  it('a renderer file importing a db type fails with the rule and its reason; app/api is allowed', async () => {
    const { violations } = await checkLayers(['renderer', 'app', 'db'], { baseDir: tmp.dir });
    const renderer = violations.filter((v) => v.rule === 'renderer-only-api');
    expect(renderer.map((v) => [v.from, v.to])).toEqual([['renderer/typed.ts', 'db/store.ts']]);
    expect(renderer[0].reason).toMatch(/only through the command table/);
    const text = formatViolations(violations);
    expect(text).toContain('renderer-only-api: The interface reaches the main side only through');
    expect(text).toContain('  renderer/typed.ts → db/store.ts');
  });

  it('the engine may not read files, and a cycle is reported with its path', async () => {
    const { violations } = await checkLayers(['renderer', 'app', 'db'], { baseDir: tmp.dir });
    expect(violations.filter((v) => v.rule === 'engine-is-pure').map((v) => v.from)).toEqual([
      'app/engine/reads.ts',
    ]);
    const cycles = violations.filter((v) => v.rule === 'no-circular');
    expect(cycles.length).toBeGreaterThan(0);
    expect(cycles[0].cycle.at(-1)).toBe(cycles[0].from);
  });
});
