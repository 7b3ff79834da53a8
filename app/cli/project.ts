import { currentActor } from '../launch/user-data.ts';
import { fillDemoStudy, DEMO_TITLE } from '../demo/index.ts';
import { Study } from '../../db/study.ts';
import { type BreakCheck, breakPlace, parseHead, verifyStudy } from '../../db/verify.ts';
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
        log: { rows: study.log.count(), head: study.log.head() ?? null },
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
        `log head ${value.log.head ?? 'none (the log is empty)'}`,
        '  (record it outside the file; project verify FILE --head SEQ:HASH checks it later)',
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
    const values = parseStrict(args, { json: { type: 'boolean' }, head: { type: 'string' } }, 1);
    const file = studyArg(values, 'verify', ctx);
    const head = typeof values.head === 'string' ? values.head : undefined;
    if (head !== undefined && !parseHead(head)) {
      throw new UsageError(
        `--head "${head}" is not a log head; give it as SEQ:HASH (the row number, a colon and the row's 64-hex-digit hash, as project status prints it)`,
      );
    }
    const study = Study.open(file, { actor: currentActor(), app: CLI_APP, mode: 'read' });
    try {
      const report = verifyStudy(study, { head });
      const count = (check: BreakCheck) => report.breaks.filter((b) => b.check === check).length;
      const status = (check: BreakCheck, ok: string) => {
        const n = count(check);
        return n === 0 ? ok : `${n} break${n === 1 ? '' : 's'}`;
      };
      const value = {
        path: study.path,
        intact: report.intact,
        fileIntact: report.fileIntact,
        fileProblems: report.breaks.filter((b) => b.check === 'file').map((b) => b.problem),
        logRows: report.logRows,
        logIntact: count('log') === 0,
        head: report.head,
        headChecked: report.headChecked,
        breaks: report.breaks,
      };
      const lines = [
        `${study.path}`,
        `file integrity: ${status('file', 'ok')}`,
        `decision log: ${value.logRows} rows, ${count('log') === 0 ? 'hash chain intact' : `${count('log')} break(s)`}`,
        `stored files: ${status('stored-file', 'each matches its SHA-256')}`,
        `analysis runs: ${status('analysis-run', 'each matches the digest its log row holds')}`,
        `content: ${count('content') + count('digests') === 0 ? 'matches the state the last log row recorded' : `${count('content') + count('digests')} break(s)`}`,
        ...(report.headChecked
          ? [
              `recorded head ${report.headChecked.head.slice(0, 20)}…: ${report.headChecked.held ? 'held by the log' : 'NOT held by the log'}`,
            ]
          : []),
        `head: ${report.head ?? 'none (the log is empty)'}`,
        ...report.breaks.flatMap((b) =>
          wrap(`${b.check}: ${[breakPlace(b), b.problem].filter(Boolean).join(': ')}`),
        ),
      ];
      print(values.json === true, value, lines.join('\n'));
      if (!report.intact) {
        const first = report.breaks[0];
        const more = report.breaks.length > 1 ? ` (and ${report.breaks.length - 1} more)` : '';
        throw new DataError(
          `${study.path} failed verification: ${[breakPlace(first), first.problem].filter(Boolean).join(': ')}${more}`,
        );
      }
      return 0;
    } finally {
      study.close();
    }
  },
};

/** Indents a break under the summary and wraps it to the 100 columns a table may use. */
function wrap(text: string, width = 100): string[] {
  const lines: string[] = [];
  let line = ' ';
  for (const word of text.split(' ')) {
    if (line.length + 1 + word.length > width && line.trim() !== '') {
      lines.push(line);
      line = '    ';
    }
    line += ` ${word}`;
  }
  lines.push(line);
  return lines.map((l) => (l.length > width ? `${l.slice(0, width - 1)}…` : l));
}
