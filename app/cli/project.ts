import { PHASE_IDS, type PhaseId } from '../../db/repos/phase-state.ts';
import { Study } from '../../db/study.ts';
import { type BreakCheck, breakPlace, parseHead } from '../../db/verify.ts';
import { DEMO_TITLE, fillDemoStudy } from '../demo/index.ts';
import { currentActor } from '../launch/user-data.ts';
import { RuleError } from '../phases/errors.ts';
import { describeCheck, shortValue } from '../phases/history/rerun.ts';
import { verifyWithReruns } from '../phases/history/verify.ts';
import {
  type PhaseOverview,
  phaseOverview,
  reopenPhase,
  signOffPhase,
  studyOverview,
  type UpstreamChange,
} from '../phases/index.ts';
import type { ChecklistItem } from '../phases/types.ts';
import { type CliCommand, type OptionSpec, type ParsedArgs, stringValue } from './command.ts';
import { resolveUserPath } from './files.ts';
import { cut, formatTable, LINE_WIDTH, wrapIndented } from './table.ts';
import { type CliContext, DataError, UsageError } from './types.ts';

const CLI_APP = 'the Scalewright command line';

const STUDY_FILE = { name: 'FILE', description: 'the study file (.scalewright)' };
const JSON_OPTION: OptionSpec = {
  type: 'boolean',
  description: 'print one JSON object instead of the readable text',
};
const PHASE_OPTION: OptionSpec = {
  type: 'string',
  value: 'ID',
  required: true,
  description: `the phase: ${PHASE_IDS.join(', ')}`,
};

function studyArg(values: ParsedArgs, command: string, ctx: CliContext): string {
  const file = values._[0];
  if (!file) throw new UsageError(`project ${command} needs the study FILE`);
  return resolveUserPath(file, ctx);
}

function print(json: boolean, value: unknown, text: string): void {
  process.stdout.write(json ? `${JSON.stringify(value)}\n` : `${text}\n`);
}

/** "2026-12-01T22:51:07.123Z" → "2026-12-01 22:51 UTC". */
function when(iso: string): string {
  return `${iso.slice(0, 10)} ${iso.slice(11, 16)} UTC`;
}

/** "facet-added" → "facet added", as the decision log screen shows kinds. */
function kindText(kind: string): string {
  return kind.replace(/-/g, ' ');
}

/** The state as a person reads it; a signed-off phase whose earlier phases changed says so. */
function stateText(p: PhaseOverview): string {
  return p.needsReview ? 'needs review' : p.status.replace('-', ' ');
}

function checklistLines(items: ChecklistItem[]): string[] {
  return items.map((c) => wrapIndented(`${c.met ? '✓' : '○'} ${c.label}: ${c.detail}`, 4, 2));
}

/**
 * The readable form of stale sign-offs: which phases need review (signed off when), then one table
 * of the changes in earlier phases since, each with the phases it puts up for review.
 */
function reviewSection(stale: PhaseOverview[]): string[] {
  if (stale.length === 0) return [];
  const changes = new Map<number, { change: UpstreamChange; phases: string[] }>();
  for (const p of stale) {
    for (const change of p.needsReview?.changes ?? []) {
      const entry = changes.get(change.seq) ?? { change, phases: [] };
      entry.phases.push(p.title);
      changes.set(change.seq, entry);
    }
  }
  const phases = stale
    .map((p) => `${p.title} (signed off ${when(p.needsReview?.signedOffAt ?? '')})`)
    .join(', ');
  return [
    '',
    wrapIndented(`Needs review: ${phases}. Earlier phases changed after these sign-offs:`, 0),
    '',
    formatTable(
      ['log row', 'when', 'by', 'change', 'needs review'],
      [...changes.values()]
        .sort((a, b) => a.change.seq - b.change.seq)
        .map(({ change: c, phases: affected }) => [
          String(c.seq),
          when(c.at),
          c.by,
          `${c.phaseTitle}, ${kindText(c.kind)}: ${c.target}`,
          affected.join(', '),
        ]),
      ['right', 'left', 'left', 'left', 'left'],
    ),
    '',
    wrapIndented(
      'Sign such a phase off again with why it is still valid (project signoff), or reopen it (project reopen).',
      0,
    ),
  ];
}

function readPhase(values: ParsedArgs): PhaseId {
  const phase = stringValue(values, 'phase');
  if (phase === undefined) throw new UsageError(`--phase is required: one of ${PHASE_IDS.join(', ')}`);
  if (!(PHASE_IDS as readonly string[]).includes(phase)) {
    throw new UsageError(`unknown phase "${phase}"; choose one of ${PHASE_IDS.join(', ')}`);
  }
  return phase as PhaseId;
}

function readReason(values: ParsedArgs, what: string): string {
  const reason = stringValue(values, 'reason');
  if (reason === undefined || reason.trim() === '') {
    throw new UsageError(`--reason TEXT is required: ${what}`);
  }
  return reason;
}

/** The JSON of a phase action: the phase as it stands now, and the log row written (if any). */
function phaseActionJson(study: Study, p: PhaseOverview, done: boolean) {
  const head = study.log.list({ limit: 1 })[0];
  return {
    path: study.path,
    phase: p.id,
    title: p.title,
    done,
    state: p.status,
    needsReview: p.needsReview,
    checklist: p.checklist,
    logRow: done && head ? { seq: head.seq, hash: head.hash, kind: head.kind } : null,
  };
}

/**
 * Runs a sign-off or reopen as the app does. A refusal because the checklist is not met prints the
 * checklist (or the JSON object with `done: false`) and exits 1 with the unmet items on stderr.
 */
async function phaseAction(
  values: ParsedArgs,
  ctx: CliContext,
  command: 'signoff' | 'reopen',
): Promise<number> {
  const file = studyArg(values, command, ctx);
  const phase = readPhase(values);
  const reason = readReason(
    values,
    command === 'signoff'
      ? 'what was agreed (for a phase that needs review: why it is still valid)'
      : 'why the phase is reopened',
  );
  const json = values.json === true;
  const study = Study.open(file, { actor: currentActor(), app: CLI_APP });
  try {
    try {
      if (command === 'signoff') signOffPhase(study, phase, reason);
      else reopenPhase(study, phase, reason);
    } catch (error) {
      if (error instanceof RuleError && error.code === 'gate') {
        const p = phaseOverview(study, phase);
        print(
          json,
          phaseActionJson(study, p, false),
          [`${p.title} phase: not signed off; its checklist:`, ...checklistLines(p.checklist)].join('\n'),
        );
      }
      throw error;
    }
    const p = phaseOverview(study, phase);
    const head = study.log.list({ limit: 1 })[0];
    const verb = command === 'signoff' ? 'signed off' : 'reopened';
    print(
      json,
      phaseActionJson(study, p, true),
      [
        wrapIndented(`${verb} the ${p.title} phase of ${study.path} (log row ${head.seq})`, 2),
        ...(command === 'signoff' ? ['checklist:', ...checklistLines(p.checklist)] : []),
      ].join('\n'),
    );
    return 0;
  } finally {
    study.close();
  }
}

export const newCommand: CliCommand = {
  name: 'project new',
  summary: 'create a study file',
  args: [STUDY_FILE],
  options: {
    demo: {
      type: 'boolean',
      description: 'fill it with the invented demo study, every available phase worked',
    },
    title: { type: 'string', value: 'TEXT', description: 'the study title' },
    json: JSON_OPTION,
  },
  async run(values, ctx) {
    const file = studyArg(values, 'new', ctx);
    const demo = values.demo === true;
    const title = stringValue(values, 'title');
    const study = Study.create(
      file,
      { actor: currentActor(), app: CLI_APP },
      { title: title ?? (demo ? DEMO_TITLE : ''), init: demo ? fillDemoStudy : undefined },
    );
    const summary = { path: study.path, demo, version: study.version, logRows: study.log.count() };
    study.close();
    print(values.json === true, summary, `created ${summary.path}${demo ? ' (demo study)' : ''}`);
    return 0;
  },
};

export const statusCommand: CliCommand = {
  name: 'project status',
  summary:
    'phases with their states, what they hold, open gates, and signed-off phases that need review because an earlier phase changed since',
  args: [STUDY_FILE],
  options: { json: JSON_OPTION },
  async run(values, ctx) {
    const file = studyArg(values, 'status', ctx);
    const study = Study.open(file, { actor: currentActor(), app: CLI_APP, mode: 'read' });
    try {
      const phases = studyOverview(study);
      const rows = study.log.count();
      const value = {
        path: study.path,
        title: study.meta('title') ?? '',
        version: study.version,
        logRows: rows,
        log: { rows, head: study.log.head() ?? null },
        phases: phases.map((p) => ({
          phase: p.id,
          title: p.title,
          state: p.status,
          needsReview: p.needsReview,
          holds: p.holds,
          openGates: p.checklist
            .filter((c) => !c.met)
            .map((c) => ({ id: c.id, label: c.label, detail: c.detail })),
        })),
      };
      const lines = [
        cut(value.title || value.path, LINE_WIDTH),
        wrapIndented(`${value.path} · file version ${value.version} · ${rows} log rows`, 2),
        cut(`log head ${value.log.head ?? 'none (the log is empty)'}`, LINE_WIDTH),
        '  (record it outside the file; project verify FILE --head SEQ:HASH checks it later)',
        '',
        formatTable(
          ['phase', 'state', 'holds', 'open gates'],
          phases.map((p) => [
            p.title,
            stateText(p),
            p.holds.join(', '),
            String(p.checklist.filter((c) => !c.met).length),
          ]),
          ['left', 'left', 'left', 'right'],
        ),
      ];
      lines.push(...reviewSection(phases.filter((p) => p.needsReview)));
      print(values.json === true, value, lines.join('\n'));
      return 0;
    } finally {
      study.close();
    }
  },
};

export const signoffCommand: CliCommand = {
  name: 'project signoff',
  summary:
    'sign a phase off (a logged decision); refused, with the checklist, while any of its items is unmet. A signed-off phase that needs review is signed off again in place, the reason saying why it is still valid',
  args: [STUDY_FILE],
  options: {
    phase: PHASE_OPTION,
    reason: {
      type: 'string',
      value: 'TEXT',
      required: true,
      description: 'the sign-off note that goes into the log',
    },
    json: JSON_OPTION,
  },
  run: (values, ctx) => phaseAction(values, ctx, 'signoff'),
};

export const reopenCommand: CliCommand = {
  name: 'project reopen',
  summary: 'reopen a signed-off phase so it can change (a logged decision)',
  args: [STUDY_FILE],
  options: {
    phase: PHASE_OPTION,
    reason: {
      type: 'string',
      value: 'TEXT',
      required: true,
      description: 'why it is reopened; goes into the log',
    },
    json: JSON_OPTION,
  },
  run: (values, ctx) => phaseAction(values, ctx, 'reopen'),
};

export const verifyCommand: CliCommand = {
  name: 'project verify',
  summary:
    "check the file's integrity, the decision log's hash chain, every stored data file and analysis run, and the content against the last log row; re-run every stored analysis from its stored inputs; exit 1 on any break",
  args: [STUDY_FILE],
  options: {
    head: {
      type: 'string',
      value: 'SEQ:HASH',
      description:
        'a log head recorded outside the file (as project status prints it): check the log still holds it',
    },
    json: JSON_OPTION,
  },
  async run(values, ctx) {
    const file = studyArg(values, 'verify', ctx);
    const head = stringValue(values, 'head');
    if (head !== undefined && !parseHead(head)) {
      throw new UsageError(
        `--head "${head}" is not a log head; give it as SEQ:HASH (the row number, a colon and the row's 64-hex-digit hash, as project status prints it)`,
      );
    }
    const study = Study.open(file, { actor: currentActor(), app: CLI_APP, mode: 'read' });
    try {
      const report = verifyWithReruns(study, { head });
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
        rerun: report.rerun,
      };
      const rerun = report.rerun;
      const rerunOf = (status: string) => rerun.runs.filter((r) => r.status === status).length;
      const rerunNotes = [
        rerunOf('reproduced') > 0 ? `${rerunOf('reproduced')} reproduced` : '',
        rerun.breaks.length > 0 ? `${rerun.breaks.length} no longer reproduce` : '',
        rerun.engineDifferences.length > 0
          ? `${rerun.engineDifferences.length} differ under engine ${rerun.engineVersion} (stored by another version)`
          : '',
        rerunOf('inputs-gone') > 0 ? `${rerunOf('inputs-gone')} with inputs no longer stored` : '',
        rerunOf('not-rerun') > 0 ? `${rerunOf('not-rerun')} of a kind not re-run` : '',
      ].filter(Boolean);
      const lines = [
        `${study.path}`,
        `file integrity: ${status('file', 'ok')}`,
        `decision log: ${value.logRows} rows, ${count('log') === 0 ? 'hash chain intact' : `${count('log')} break(s)`}`,
        `stored files: ${status('stored-file', 'each matches its SHA-256')}`,
        `analysis runs: ${status('analysis-run', 'each matches the digest its log row holds')}`,
        `content: ${count('content') + count('digests') === 0 ? 'matches the state the last log row recorded' : `${count('content') + count('digests')} break(s)`}`,
        `re-run of ${rerun.runs.length} stored analyses (engine ${rerun.engineVersion}): ${rerunNotes.join(', ') || 'none stored'}`,
        ...rerun.runs
          .filter((r) => r.status !== 'reproduced' && !rerun.breaks.includes(r))
          .map((r) => wrapIndented(`note: ${describeCheck(r)}`, 4, 2)),
        ...(report.headChecked
          ? [
              `recorded head ${report.headChecked.head.slice(0, 20)}…: ${report.headChecked.held ? 'held by the log' : 'NOT held by the log'}`,
            ]
          : []),
        `head: ${report.head ?? 'none (the log is empty)'}`,
        ...report.breaks.map((b) =>
          wrapIndented(`${b.check}: ${[breakPlace(b), b.problem].filter(Boolean).join(': ')}`, 4, 2),
        ),
        ...[...rerun.breaks, ...rerun.engineDifferences].flatMap((c) => [
          `  run ${c.runId} (${c.kind}, engine ${c.engineVersion}${c.otherEngine ? ', another version' : ''}): ${c.differenceCount} field(s) differ`,
          ...c.differences.map((d) =>
            wrapIndented(
              `${d.field}: stored ${shortValue(d.stored)}, recomputed ${shortValue(d.recomputed)}`,
              6,
              4,
            ),
          ),
        ]),
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
