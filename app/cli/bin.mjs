#!/usr/bin/env node
// The command line's launcher (`npm run cli` and the package's `bin`): makes sure the compiled bundle
// matches the sources (rebuilding it when a source changed), then runs it in this process.
import { CLI_BUNDLE, ensureCliBuilt } from './build.mjs';
import { pathToFileURL } from 'node:url';

try {
  await ensureCliBuilt();
} catch (error) {
  process.stderr.write(`error: ${error.message}\n`);
  process.exit(1);
}
const { runCli } = await import(pathToFileURL(CLI_BUNDLE).href);
process.exitCode = await runCli(process.argv.slice(2), { cwd: process.env.INIT_CWD ?? process.cwd() });
