import { spawnSync } from 'node:child_process';
import fs from 'node:fs';
import path from 'node:path';
import { fileURLToPath } from 'node:url';

export const PROJECT_ROOT = fileURLToPath(new URL('../../', import.meta.url));
export const RENDERER_DIST = path.join(PROJECT_ROOT, 'renderer', 'dist');

/** Newest modification time under the given folders (skipping build output). */
function newestSource(dirs: string[]): number {
  let newest = 0;
  const walk = (dir: string) => {
    for (const entry of fs.readdirSync(dir, { withFileTypes: true })) {
      if (entry.name === 'dist' || entry.name === 'node_modules') continue;
      const full = path.join(dir, entry.name);
      if (entry.isDirectory()) walk(full);
      else newest = Math.max(newest, fs.statSync(full).mtimeMs);
    }
  };
  for (const dir of dirs) walk(dir);
  return newest;
}

/** Builds the renderer when it was never built or a source file is newer than the build. */
export function ensureRendererBuilt(log: (line: string) => void): void {
  const index = path.join(RENDERER_DIST, 'index.html');
  const sources = ['renderer', 'app/api', 'app/phases', 'db/repos'].map((d) => path.join(PROJECT_ROOT, d));
  if (fs.existsSync(index) && fs.statSync(index).mtimeMs >= newestSource(sources)) return;
  log('building the interface (renderer/dist)…');
  const vite = path.join(PROJECT_ROOT, 'node_modules', 'vite', 'bin', 'vite.js');
  const result = spawnSync(
    process.execPath,
    [vite, 'build', '--config', 'renderer/vite.config.ts', '--logLevel', 'warn'],
    {
      cwd: PROJECT_ROOT,
      stdio: 'inherit',
    },
  );
  if (result.status !== 0) throw new Error('building the interface failed (see the messages above)');
}
