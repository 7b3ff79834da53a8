/**
 * What the whole-process benchmarks share: running a command to completion and measuring its wall
 * time and the CPU time of its whole process tree. Not a benchmark itself (test/bench/run.ts skips it).
 */
import { spawnSync } from 'node:child_process';
import { readFileSync } from 'node:fs';
import os from 'node:os';
import { performance } from 'node:perf_hooks';

export interface Timed {
  wallMs: number;
  cpuMs: number;
  stdout: string;
}

/** Runs a command to completion: wall time, the CPU time of its whole process tree, and its output. */
export function timed(command: string, args: string[], cwd: string): Timed {
  const cpuBefore = childrenCpuMs();
  const started = performance.now();
  const result = spawnSync(command, args, {
    cwd,
    encoding: 'utf8',
    maxBuffer: 256 * 1024 * 1024,
    env: { ...process.env, INIT_CWD: cwd },
  });
  const wallMs = performance.now() - started;
  if (result.status !== 0) {
    throw new Error(`${command} ${args.join(' ')} exited ${result.status}: ${result.stderr.slice(0, 400)}`);
  }
  return { wallMs, cpuMs: childrenCpuMs() - cpuBefore, stdout: result.stdout };
}

/**
 * CPU milliseconds (user + system) of this process's finished children and theirs: fields cutime and
 * cstime of /proc/self/stat, in clock ticks of 10 ms (Linux). NaN elsewhere.
 */
export function childrenCpuMs(): number {
  try {
    const stat = readFileSync('/proc/self/stat', 'utf8');
    const fields = stat.slice(stat.lastIndexOf(')') + 2).split(' ');
    return (Number(fields[13]) + Number(fields[14])) * 10;
  } catch {
    return Number.NaN;
  }
}

export function median(xs: number[]): number {
  const s = [...xs].sort((a, b) => a - b);
  return s[s.length >> 1];
}

/** Whether `python` runs and imports numpy (the numpy figures are skipped, and said so, when not). */
export function hasNumpy(python: string): boolean {
  try {
    timed(python, ['-c', 'import numpy'], os.tmpdir());
    return true;
  } catch {
    return false;
  }
}

/** The machine's state, printed above every whole-process figure: shared machines skew them. */
export function machineLine(): string {
  return `cores: ${os.availableParallelism()}; load average ${os.loadavg()[0].toFixed(1)} (figures under load are not comparable)`;
}
