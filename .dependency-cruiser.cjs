/**
 * The layers of Scalewright, enforced by `npm run layers` (part of `npm test`).
 * Type-only imports count: a type that crosses a layer ties the layers together just the same.
 */

/** Node built-ins and packages that do input/output: the engine touches none of them. */
const IO_MODULES = [
  '^(node:)?(fs|fs/promises|child_process|worker_threads|net|http|https|os|path|url|readline|stream|zlib|cluster|dgram|dns|tls|process|module|vm|inspector|v8)$',
  '^better-sqlite3$',
  '^electron$',
  '^papaparse$',
  '^read-excel-file',
  '^docx$',
  '^pdfkit$',
  '^react',
];

/** @type {import('dependency-cruiser').IConfiguration} */
module.exports = {
  forbidden: [
    {
      name: 'renderer-only-api',
      comment:
        'The interface reaches the main side only through the command table: renderer code imports ' +
        'from app/api (its contracts and the command types) and from renderer itself, nothing else ' +
        'of app or db. Declare or re-export what a screen needs under app/api/contracts.',
      severity: 'error',
      from: { path: '^renderer/' },
      to: { path: '^(app|db)/', pathNot: '^app/api/' },
    },
    {
      name: 'engine-is-pure',
      comment:
        'The engine is pure functions over numbers and plain objects: no file, process, database, ' +
        'network, Electron or interface modules, so every statistic is testable and reusable anywhere. ' +
        'The kernels\' build script (app/engine/kernels/build.mjs) runs at development time, not in the engine.',
      severity: 'error',
      from: { path: '^app/engine/', pathNot: '^app/engine/kernels/build\\.mjs$' },
      to: { path: IO_MODULES },
    },
    {
      name: 'engine-below-everything',
      comment:
        'The engine sits below every other layer: it imports no db, phases, workers, shell, command ' +
        'line, readers, writers, command table or interface code.',
      severity: 'error',
      from: { path: '^app/engine/' },
      to: { path: '^(db|renderer)/|^app/(phases|workers|shell|cli|import|export|api|web|launch|demo)/' },
    },
    {
      name: 'db-below-phases',
      comment:
        'The study file layer stores and checks; it knows no phase rules, no file readers and no ' +
        'interface, so phases can change without touching storage.',
      severity: 'error',
      from: { path: '^db/' },
      to: { path: '^renderer/|^app/(phases|import)/' },
    },
    {
      name: 'workers-no-phases',
      comment:
        'A worker runs a pure job on plain data in another thread; phase rules (and the study file ' +
        'they write) stay on the main thread.',
      severity: 'error',
      from: { path: '^app/workers/' },
      to: { path: '^app/phases/' },
    },
    {
      name: 'cli-no-shell',
      comment:
        'The command line runs without Electron: it never imports the desktop shell (which would pull ' +
        'Electron into a scripted pipeline).',
      severity: 'error',
      from: { path: '^app/cli/' },
      to: { path: '^app/shell/' },
    },
    {
      name: 'no-circular',
      comment:
        'Modules that import each other cannot be understood, tested or moved one at a time; break the ' +
        'cycle by moving the shared part down a layer.',
      severity: 'error',
      from: {},
      to: { circular: true },
    },
  ],
  options: {
    doNotFollow: { path: 'node_modules' },
    exclude: { path: '(^|/)(dist|node_modules)/' },
    tsPreCompilationDeps: true,
    tsConfig: { fileName: 'tsconfig.json' },
    enhancedResolveOptions: { extensions: ['.ts', '.tsx', '.js', '.mjs', '.cjs', '.json'] },
    reporterOptions: { text: { highlightFocused: true } },
  },
};
