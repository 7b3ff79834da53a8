import { currentActor } from '../launch/user-data.ts';
import { fillDemoStudy, DEMO_TITLE } from '../demo/index.ts';
import { Study } from '../../db/study.ts';
import { studyOverview } from '../phases/index.ts';
import { parseStrict, resolveUserPath } from './main.ts';
import { datasetsCommand, useCommand } from './project-datasets.ts';
import { importCommand } from './project-import.ts';
import { formatTable } from './table.ts';
import { type CliContext, DataError, UsageError } from './types.ts';

type ProjectCommand = (args: string[], ctx: CliContext) => Promise<number>;

const CLI_APP = 'the Scalewright command line';

function studyArg(values: { _: string[] }, command: string, ctx: CliContext): string {
  const file = values._[0];
  if (!file) throw new UsageError(`project ${command} needs the study FILE`);
  return resolveUserPath(file, ctx);
}

function print(json: boolean, value: unknown, table: string): void {
  process.stdout.write(json ? `${JSON.stringify(value)}\n` : `${table}\n`);
}

export const projectCommands: Record<string, ProjectCommand> = {
  async new(args, ctx) {
    const values = parseStrict(
      args,
      { demo: { type: 'boolean' }, title: { type: 'string' }, json: { type: 'boolean' } },
      1,
    );
    const file = studyArg(values, 'new', ctx);
    const demo = values.demo === true;
    const study = Study.create(
      file,
      { actor: currentActor(), app: CLI_APP },
      {
        title: typeof values.title === 'string' ? values.title : demo ? DEMO_TITLE : '',
        init: demo ? fillDemoStudy : undefined,
      },
    );
    const summary = { path: study.path, demo, version: study.version, logRows: study.log.count() };
    study.close();
    print(values.json === true, summary, `created ${summary.path}${demo ? ' (demo study)' : ''}`);
    return 0;
  },

  async status(args, ctx) {
    const values = parseStrict(args, { json: { type: 'boolean' } }, 1);
    const file = studyArg(values, 'status', ctx);
    const study = Study.open(file, { actor: currentActor(), app: CLI_APP, mode: 'read' });
    try {
      const phases = studyOverview(study);
      const value = {
        path: study.path,
        title: study.meta('title') ?? '',
        version: study.version,
        logRows: study.log.count(),
        phases: phases.map((p) => ({
          phase: p.id,
          title: p.title,
          state: p.status,
          holds: p.holds,
          openGates: p.checklist
            .filter((c) => !c.met)
            .map((c) => ({ id: c.id, label: c.label, detail: c.detail })),
        })),
      };
      const table = [
        `${value.title || value.path}`,
        `${value.path} · file version ${value.version} · ${value.logRows} log rows`,
        '',
        formatTable(
          ['phase', 'state', 'holds', 'open gates'],
          value.phases.map((p) => [p.title, p.state, p.holds.join(', '), String(p.openGates.length)]),
        ),
      ].join('\n');
      print(values.json === true, value, table);
      return 0;
    } finally {
      study.close();
    }
  },

  import: importCommand,
  datasets: datasetsCommand,
  use: useCommand,

  async verify(args, ctx) {
    const values = parseStrict(args, { json: { type: 'boolean' } }, 1);
    const file = studyArg(values, 'verify', ctx);
    const study = Study.open(file, { actor: currentActor(), app: CLI_APP, mode: 'read' });
    try {
      const integrity = (study.db.pragma('integrity_check') as { integrity_check: string }[]).map(
        (r) => r.integrity_check,
      );
      const fileProblems = integrity.filter((r) => r !== 'ok');
      const breaks = study.log.verify();
      const value = {
        path: study.path,
        fileIntact: fileProblems.length === 0,
        fileProblems,
        logRows: study.log.count(),
        logIntact: breaks.length === 0,
        breaks,
      };
      const lines = [
        `${study.path}`,
        `file integrity: ${value.fileIntact ? 'ok' : fileProblems.join('; ')}`,
        `decision log: ${value.logRows} rows, ${value.logIntact ? 'hash chain intact' : `${breaks.length} break(s)`}`,
        ...breaks.map((b) => `  row ${b.seq}: ${b.problem}`),
      ];
      print(values.json === true, value, lines.join('\n'));
      if (!value.fileIntact || !value.logIntact) {
        const first = breaks[0];
        throw new DataError(
          first
            ? `decision log of ${study.path} is broken at row ${first.seq}: ${first.problem}${breaks.length > 1 ? ` (and ${breaks.length - 1} more)` : ''}`
            : `${study.path} failed its integrity check: ${fileProblems[0]}`,
        );
      }
      return 0;
    } finally {
      study.close();
    }
  },
};
