import { Study } from '../../db/study.ts';
import {
  ExportFolderError,
  INSTRUMENT_FILES,
  instrumentFiles,
  writeExportFolder,
} from '../export/instrument/index.ts';
import { currentActor } from '../launch/user-data.ts';
import { type CliCommand, stringValue } from './command.ts';
import { resolveUserPath } from './files.ts';
import { formatTable, wrapIndented } from './table.ts';
import { DataError, UsageError } from './types.ts';

const CLI_APP = 'the Scalewright command line';

/** `project instrument FILE --out DIR [--json]`: the final instrument's files, written all at once. */
export const instrumentCommand: CliCommand = {
  name: 'project instrument',
  summary:
    'write the final instrument into a folder: the printable questionnaire (HTML and PDF) with the retained items in the chosen order, the scoring key (CSV and JSON) and norms from the pilot sample (CSV: percentiles, z and T scores per scale and facet score)',
  args: [{ name: 'FILE', description: 'the study file (.scalewright); only read, never changed' }],
  options: {
    out: {
      type: 'string',
      value: 'DIR',
      required: true,
      description:
        'the folder to write: a new or empty one, or one holding only an earlier instrument export (replaced whole)',
    },
    json: {
      type: 'boolean',
      description:
        'one JSON object: {path, out, files: [{name, bytes, sha256}], items, logHead, verified, warnings}',
    },
  },
  notes: `The files are written into a new folder beside DIR and renamed into place, so DIR never holds half
    an export. The items are those of the final purification round (refused, exit 1, while there is
    none that includes every decision); their order, heading, instructions and scoring rule are set in
    the app (a logged decision), by default facets taking turns, mean scores, every item answered.

    Every file names the decision log's head (SEQ:HASH) and the command that checks it later (project
    verify FILE --head SEQ:HASH). A study that fails verification is still exported, so nothing is lost,
    but every file says so, and the failure is reported as a warning.

    Percentiles are mid-point percentile ranks (below plus half of equal); z uses the pilot mean and SD
    (divisor n − 1); T = 50 + 10z. Pilot norms describe the pilot sample only. A new scale is not
    validated for diagnosis, hiring, admission or other high-stakes decisions; human-subject data needs
    ethics approval and protection; defer to local regulations and licensed professional practice.`,
  async run(values, ctx) {
    const file = values._[0];
    if (!file) throw new UsageError('project instrument needs the study FILE');
    const out = stringValue(values, 'out');
    if (out === undefined || out.trim() === '') {
      throw new UsageError('--out DIR is required: the folder to write the instrument into');
    }
    const dir = resolveUserPath(out, ctx);
    const study = Study.open(resolveUserPath(file, ctx), {
      actor: currentActor(),
      app: CLI_APP,
      mode: 'read',
    });
    try {
      const { model, files } = await instrumentFiles(study);
      try {
        writeExportFolder(dir, files);
      } catch (error) {
        if (error instanceof ExportFolderError) throw new DataError(error.message);
        const reason = (error as NodeJS.ErrnoException).code ?? (error as Error).message;
        throw new DataError(`cannot write the instrument into ${dir}: ${reason}; nothing was written`);
      }
      const value = {
        path: study.path,
        out: dir,
        files: files.map((f) => ({ name: f.name, bytes: f.bytes.length, sha256: f.sha256 })),
        items: model.items.length,
        logHead: model.log.head,
        verified: model.verification.intact,
        warnings: model.warnings,
      };
      if (values.json === true) {
        process.stdout.write(`${JSON.stringify(value)}\n`);
      } else {
        for (const w of model.warnings) process.stderr.write(`warning: ${w}\n`);
        process.stdout.write(
          [
            wrapIndented(
              `wrote the final instrument (${model.items.length} items) of ${study.path} into ${dir}`,
              2,
            ),
            '',
            formatTable(
              ['file', 'bytes', 'SHA-256'],
              INSTRUMENT_FILES.map((name) => {
                const f = files.find((x) => x.name === name);
                return [name, String(f?.bytes.length ?? 0), f?.sha256 ?? ''];
              }),
              ['left', 'right', 'left'],
            ),
            '',
            wrapIndented(
              `log head ${model.log.head ?? 'none'}; check it later with: ${model.verifyCommand}`,
              2,
            ),
          ].join('\n') + '\n',
        );
      }
      return 0;
    } finally {
      study.close();
    }
  },
};
