/**
 * `npm run bench`: runs every benchmark in this folder in turn, each in its own process so that
 * one's memory does not colour another's figures. Each prints its own figures and targets.
 */
import { spawnSync } from 'node:child_process';
import fs from 'node:fs';
import path from 'node:path';
import { fileURLToPath } from 'node:url';

const here = path.dirname(fileURLToPath(import.meta.url));
const tsx = path.join(here, '..', '..', 'node_modules', 'tsx', 'dist', 'cli.mjs');
/** Files here that are not benchmarks: this runner and what the benchmarks share. */
const SHARED = new Set(['run.ts', 'import-baseline.ts', 'process-time.ts']);
const only = process.argv[2];
const benches = fs
  .readdirSync(here)
  .filter((f) => f.endsWith('.ts') && !SHARED.has(f) && (!only || f.includes(only)))
  .sort();
let failed = 0;
for (const file of benches) {
  process.stdout.write(`\n── ${file} ──\n`);
  const result = spawnSync(process.execPath, ['--expose-gc', tsx, path.join(here, file)], {
    stdio: 'inherit',
  });
  if (result.status !== 0) failed++;
}
process.exitCode = failed > 0 ? 1 : 0;
