import { spawnSync } from 'node:child_process';
import path from 'node:path';
import { fileURLToPath } from 'node:url';

export const ROOT = fileURLToPath(new URL('../../', import.meta.url));
const TSX = path.join(ROOT, 'node_modules', 'tsx', 'dist', 'cli.mjs');
const MAIN = path.join(ROOT, 'app', 'cli', 'main.ts');

export interface CliRun {
  code: number;
  stdout: string;
  stderr: string;
}

/**
 * Runs the command line from its TypeScript sources through tsx, as a user would call it
 * (`npm run -s cli -- …` resolves paths against INIT_CWD); test/unit/cli/compiled.test.ts checks
 * that the compiled bundle answers the same.
 */
export function runCli(
  args: string[],
  options: { cwd?: string; env?: Record<string, string>; user?: { uid: number; gid: number } } = {},
): CliRun {
  const cwd = options.cwd ?? ROOT;
  const result = spawnSync(process.execPath, [TSX, MAIN, ...args], {
    cwd: ROOT,
    encoding: 'utf8',
    env: { ...process.env, INIT_CWD: cwd, SCALEWRIGHT_NAME: 'CLI Tester', ...options.env },
    ...(options.user ?? {}),
  });
  return { code: result.status ?? -1, stdout: result.stdout, stderr: result.stderr };
}

/** Runs `npm run -s cli -- …` itself, exactly as the README documents it (the compiled command line). */
export function runNpmCli(args: string[], cwd: string): CliRun {
  const result = spawnSync('npm', ['--prefix', ROOT, 'run', '-s', 'cli', '--', ...args], {
    cwd,
    encoding: 'utf8',
  });
  return { code: result.status ?? -1, stdout: result.stdout, stderr: result.stderr };
}

/**
 * The user to run the command line as in tests of file permissions: the superuser is allowed
 * everything, so when the tests run as root the command runs as the unprivileged "nobody" (65534);
 * otherwise as the current user.
 */
export function unprivilegedUser(): { uid: number; gid: number } | undefined {
  return process.getuid?.() === 0 ? { uid: 65534, gid: 65534 } : undefined;
}

/**
 * Runs the CLI inside the test process (no Node start per call), capturing what it writes and the
 * exit code it returns. For checks of output and exit codes; `runCli` covers the real process.
 */
export async function runCliHere(args: string[], cwd = ROOT): Promise<CliRun> {
  const { runCli: run } = await import('../../app/cli/main.ts');
  let stdout = '';
  let stderr = '';
  const out = process.stdout.write;
  const err = process.stderr.write;
  process.stdout.write = ((chunk: string | Uint8Array) => {
    stdout += String(chunk);
    return true;
  }) as typeof process.stdout.write;
  process.stderr.write = ((chunk: string | Uint8Array) => {
    stderr += String(chunk);
    return true;
  }) as typeof process.stderr.write;
  try {
    const code = await run(args, { cwd });
    return { code, stdout, stderr };
  } finally {
    process.stdout.write = out;
    process.stderr.write = err;
  }
}
