import path from 'node:path';
import { fileURLToPath } from 'node:url';
import { build } from 'esbuild';

/**
 * Bundles the desktop shell for Electron: main process and preload as CommonJS (a sandboxed
 * preload cannot be an ES module). better-sqlite3 stays external: it is a native addon; so do pdfkit
 * (it reads its data files beside its own module) and docx, loaded from node_modules at run time.
 */
const here = path.dirname(fileURLToPath(import.meta.url));
const common = {
  bundle: true,
  platform: 'node' as const,
  format: 'cjs' as const,
  target: 'node22',
  sourcemap: true,
  logLevel: 'warning' as const,
  external: ['electron', 'better-sqlite3', 'pdfkit', 'docx'],
  // Modules that find files next to themselves use import.meta.url; give the CommonJS bundle one.
  define: { 'import.meta.url': 'importMetaUrl' },
  banner: { js: "const importMetaUrl = require('node:url').pathToFileURL(__filename).href;" },
};
await build({
  ...common,
  entryPoints: [path.join(here, 'main.ts')],
  outfile: path.join(here, 'dist', 'main.cjs'),
});
await build({
  ...common,
  entryPoints: [path.join(here, 'preload.ts')],
  outfile: path.join(here, 'dist', 'preload.cjs'),
});
await build({
  ...common,
  entryPoints: [path.join(here, '..', 'workers', 'worker.ts')],
  outfile: path.join(here, 'dist', 'worker.cjs'),
});
