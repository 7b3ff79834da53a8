import fs from 'node:fs';
import path from 'node:path';
import { Study } from '../../db/study.ts';
import { APPENDIX_FORMATS, type AppendixFormat, exportAppendix } from '../export/appendix/index.ts';
import { currentActor } from '../launch/user-data.ts';
import { type CliCommand, type ParsedArgs, stringValue } from './command.ts';
import { resolveUserPath } from './files.ts';
import { wrapIndented } from './table.ts';
import { type CliContext, DataError, UsageError } from './types.ts';

const CLI_APP = 'the Scalewright command line';

/**
 * Writes `bytes` to `target` through a temporary file beside it, renamed into place only when
 * complete, so that a failure never leaves half an appendix (or a clobbered old one) behind.
 */
function writeWhole(target: string, bytes: Uint8Array): void {
  const folder = path.dirname(target);
  if (!fs.existsSync(folder))
    throw new DataError(`cannot write ${target}: the folder ${folder} does not exist`);
  if (fs.existsSync(target) && fs.statSync(target).isDirectory())
    throw new DataError(
      `cannot write ${target}: it is a folder; give a file name, e.g. ${path.join(target, 'appendix.pdf')}`,
    );
  const temporary = `${target}.${process.pid}.partial`;
  try {
    fs.writeFileSync(temporary, bytes);
    fs.renameSync(temporary, target);
  } catch (error) {
    fs.rmSync(temporary, { force: true });
    const code = (error as NodeJS.ErrnoException).code ?? (error as Error).message;
    throw new DataError(`cannot write ${target}: ${code === 'EACCES' ? 'permission denied' : code}`);
  }
}

function readFormat(values: ParsedArgs): AppendixFormat {
  const format = stringValue(values, 'format');
  if (format === undefined)
    throw new UsageError(`--format is required: one of ${APPENDIX_FORMATS.join(', ')}`);
  if (!(APPENDIX_FORMATS as readonly string[]).includes(format))
    throw new UsageError(`unknown format "${format}"; choose one of ${APPENDIX_FORMATS.join(', ')}`);
  return format as AppendixFormat;
}

/** `project export FILE --format md|html|docx|pdf --out PATH`: the methods appendix. */
export const exportCommand: CliCommand = {
  name: 'project export',
  summary:
    'write the methods appendix, rendered from the study file alone (PDF needs no browser or Electron); a file that fails verification is still written, with the breaks shown in it',
  args: [{ name: 'FILE', description: 'the study file (.scalewright)' }],
  options: {
    format: {
      type: 'string',
      value: 'FORMAT',
      required: true,
      description: `the format: ${APPENDIX_FORMATS.join(', ')}`,
    },
    out: {
      type: 'string',
      value: 'PATH',
      required: true,
      description: 'the file to write (replaced if it exists)',
    },
    json: {
      type: 'boolean',
      description: 'one JSON object: {path, out, format, bytes, head, intact, warnings}',
    },
  },
  async run(values: ParsedArgs, ctx: CliContext) {
    const file = values._[0];
    if (!file) throw new UsageError('project export needs the study FILE');
    const format = readFormat(values);
    const outArg = stringValue(values, 'out');
    if (outArg === undefined || outArg.trim() === '')
      throw new UsageError('--out PATH is required: the file to write');
    const out = resolveUserPath(outArg, ctx);
    const study = Study.open(resolveUserPath(file, ctx), {
      actor: currentActor(),
      app: CLI_APP,
      mode: 'read',
    });
    try {
      const rendered = await exportAppendix(study, format);
      writeWhole(out, rendered.bytes);
      const warnings = rendered.intact
        ? []
        : [
            `${study.path} failed verification at export; the appendix shows the breaks (run project verify for details)`,
          ];
      const value = {
        path: study.path,
        out,
        format,
        bytes: rendered.bytes.length,
        head: rendered.head,
        intact: rendered.intact,
        warnings,
      };
      if (values.json === true) process.stdout.write(`${JSON.stringify(value)}\n`);
      else {
        process.stdout.write(
          `${wrapIndented(`wrote the methods appendix (${format}, ${rendered.bytes.length} bytes) to ${out}`, 2)}\n${wrapIndented(`log head ${rendered.head ?? 'none'}`, 2)}\n`,
        );
        for (const w of warnings) process.stderr.write(`warning: ${w}\n`);
      }
      return 0;
    } finally {
      study.close();
    }
  },
};
