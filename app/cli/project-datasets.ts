import { Study } from '../../db/study.ts';
import { currentActor } from '../launch/user-data.ts';
import { pilotView, makeDatasetCurrent } from '../phases/pilot/index.ts';
import { type CliCommand, type ParsedArgs, stringValue } from './command.ts';
import { resolveUserPath } from './files.ts';
import { cut, formatTable, LINE_WIDTH } from './table.ts';
import { type CliContext, UsageError } from './types.ts';

const CLI_APP = 'the Scalewright command line';

/** Longest dataset name shown in the table; longer names end in an ellipsis (the JSON has them whole). */
const NAME_WIDTH = 28;

const STUDY_FILE = { name: 'FILE', description: 'the study file (.scalewright)' };

/** `project datasets FILE [--json]`: every dataset with role, rows, SHA-256, and the current one of each role. */
export const datasetsCommand: CliCommand = {
  name: 'project datasets',
  summary:
    "list the study's datasets: id, role, name, rows, excluded respondents, the original file's SHA-256, and which one is current for its role (the one analyses use), with the reason recorded",
  args: [STUDY_FILE],
  options: {
    json: {
      type: 'boolean',
      description:
        'one JSON object: {path, datasets: [{id, role, name, fileName, rows, excluded, sha256, importedAt, current, standing}], current: {pilot, validation, retest}}',
    },
  },
  run: listDatasets,
};

async function listDatasets(values: ParsedArgs, ctx: CliContext): Promise<number> {
  const file = values._[0];
  if (!file) throw new UsageError('project datasets needs the study FILE');
  const study = Study.open(resolveUserPath(file, ctx), { actor: currentActor(), app: CLI_APP, mode: 'read' });
  try {
    const view = pilotView(study);
    const datasets = view.datasets.map((d) => ({
      id: d.id,
      role: d.role,
      name: d.name,
      fileName: d.fileName,
      rows: d.respondents,
      excluded: d.excluded,
      sha256: d.fileSha256,
      importedAt: d.importedAt,
      current: d.current,
      standing: d.standing.text,
    }));
    const currentOf = (role: string) => datasets.find((d) => d.role === role && d.current)?.id ?? null;
    const value = {
      path: study.path,
      datasets,
      current: {
        pilot: currentOf('pilot'),
        validation: currentOf('validation'),
        retest: currentOf('retest'),
      },
    };
    if (values.json === true) {
      process.stdout.write(`${JSON.stringify(value)}\n`);
      return 0;
    }
    const lines = [
      study.path,
      '',
      datasets.length === 0
        ? 'no datasets yet; add one with project import'
        : formatTable(
            ['id', 'role', 'name', 'rows', 'excl.', 'SHA-256', 'current'],
            datasets.map((d) => [
              String(d.id),
              d.role,
              cut(d.name, NAME_WIDTH),
              String(d.rows),
              String(d.excluded),
              `${d.sha256.slice(0, 12)}…`,
              d.current ? 'yes' : '',
            ]),
            ['right', 'left', 'left', 'right', 'right', 'left', 'left'],
          ),
      '',
      ...datasets.map((d) => cut(`${d.id}: ${d.standing}`, LINE_WIDTH)),
    ];
    process.stdout.write(`${lines.join('\n')}\n`);
    return 0;
  } finally {
    study.close();
  }
}

/** `project use FILE --dataset N --reason TEXT`: makes a dataset current for its role, as a logged decision. */
export const useCommand: CliCommand = {
  name: 'project use',
  summary:
    'make a dataset the current one of its role, the data its analyses use from now on (a logged decision); rounds on other data are then out of date. Reverse it by making the earlier dataset current again',
  args: [STUDY_FILE],
  options: {
    dataset: {
      type: 'string',
      value: 'N',
      required: true,
      description: "the dataset's id, as project datasets lists it",
    },
    reason: { type: 'string', value: 'TEXT', required: true, description: 'why; goes into the decision log' },
    json: { type: 'boolean', description: 'one JSON object describing the choice' },
  },
  run: useDataset,
};

async function useDataset(values: ParsedArgs, ctx: CliContext): Promise<number> {
  const file = values._[0];
  if (!file) throw new UsageError('project use needs the study FILE');
  const raw = stringValue(values, 'dataset');
  if (raw === undefined) throw new UsageError('project use needs --dataset N (see project datasets)');
  if (!/^\d+$/.test(raw.trim()) || Number(raw) < 1) {
    throw new UsageError(`--dataset must be a dataset id, a whole number from 1 (got "${raw}")`);
  }
  const reason = stringValue(values, 'reason')?.trim() ?? '';
  if (reason === '')
    throw new UsageError('project use needs --reason TEXT: why this dataset becomes current');
  const study = Study.open(resolveUserPath(file, ctx), { actor: currentActor(), app: CLI_APP });
  try {
    const before = pilotView(study).datasets;
    const choice = makeDatasetCurrent(study, Number(raw), reason);
    const dataset = before.find((d) => d.id === choice.datasetId);
    const previous = before.find((d) => d.role === choice.role && d.current);
    const value = {
      path: study.path,
      datasetId: choice.datasetId,
      role: choice.role,
      name: dataset?.name ?? '',
      previous: previous ? { id: previous.id, name: previous.name } : null,
      reason: choice.reason,
      decidedAt: choice.decidedAt,
      logRows: study.log.count(),
    };
    if (values.json === true) process.stdout.write(`${JSON.stringify(value)}\n`);
    else {
      process.stdout.write(
        `dataset ${value.datasetId} "${value.name}" is now the current ${value.role} data` +
          `${previous ? ` (was dataset ${previous.id} "${previous.name}")` : ''}; logged as row ${value.logRows}\n`,
      );
    }
    return 0;
  } finally {
    study.close();
  }
}
