import path from 'node:path';
import { z } from 'zod';
import { StudyFileError } from '../../db/errors.ts';
import { checkWritable, Study } from '../../db/study.ts';
import type { ColumnMapping, ColumnRole } from '../import/mapping.ts';
import { type DecimalMark, type MissingCodes, parseNumber } from '../import/numbers.ts';
import { TableError } from '../import/table-error.ts';
import { currentActor } from '../launch/user-data.ts';
import {
  automaticMapping,
  checkImportable,
  checkRead,
  DATASET_ROLES,
  type ImportCheck,
  importChoice,
  type ImportRequest,
  MAX_DATASET_NAME,
  planImport,
  previewDataFile,
  respondentCount,
  storeImport,
} from '../phases/pilot/index.ts';
import { type ImportRead, readDataFile } from '../import/read-data-file.ts';
import { currentDataset } from '../phases/analysis-data.ts';
import { RuleError } from '../phases/errors.ts';
import { type CliCommand, type ParsedArgs, stringValue } from './command.ts';
import { readUserFile, resolveUserPath } from './files.ts';
import { formatTable } from './table.ts';
import { type CliContext, DataError, UsageError } from './types.ts';

/**
 * `project import FILE --data CSV --role pilot|validation|retest [--map map.json] [--json]`: reads a
 * data file (CSV, TSV or .xlsx) into the study through the same steps as the import screen: item
 * columns matched to the pool by code, id and duration columns by their usual names, the map file's
 * roles, codes and reading settings on top; declared bounds from the study's response format; one
 * transaction with its log row. A file with problems (text in a numeric column, values outside the
 * scale) is refused unless the map file says "acceptProblems": true.
 *
 * The map file (all keys optional):
 *
 *     { "name": "Spring pilot",
 *       "columns": { "resp": "id", "q1": { "item": "TR01" }, "att": { "attention": "4" },
 *                    "trips": "criterion", "district": "group", "code": "retestLink",
 *                    "secs": "duration", "notes": "ignored" },
 *       "missing": [-9, "NA"],
 *       "delimiter": ";", "encoding": "windows-1252", "decimalMark": ",", "sheet": "Responses",
 *       "acceptProblems": false }
 *
 * Whether the new dataset becomes the current one of its role (the data analyses use): `--current
 * yes|no`. Without it, an import into a role with no current dataset becomes current, and an import
 * into a role that has one leaves that one current; the output says which happened and how to change
 * it. Making it replace a current dataset needs `--reason TEXT` (logged with the choice).
 */

const CLI_APP = 'the Scalewright command line';

const SIMPLE_ROLES = ['id', 'criterion', 'group', 'retestLink', 'duration', 'ignored'] as const;

const roleSpec = z.union(
  [
    z.enum(SIMPLE_ROLES),
    z.strictObject({ item: z.string().trim().min(1) }),
    z.strictObject({ attention: z.union([z.string().trim().min(1), z.number()]) }),
    z.strictObject({ role: z.enum(SIMPLE_ROLES) }),
    z.strictObject({ role: z.literal('item'), itemCode: z.string().trim().min(1) }),
    z.strictObject({ role: z.literal('attention'), correctAnswer: z.string().trim().min(1) }),
  ],
  {
    error: `give a role: one of ${SIMPLE_ROLES.map((r) => `"${r}"`).join(', ')}, or {"item": "CODE"}, or {"attention": "CORRECT ANSWER"}`,
  },
);

const mapSchema = z.strictObject({
  name: z.string().max(MAX_DATASET_NAME).optional(),
  columns: z.record(z.string(), roleSpec).optional(),
  missing: z.array(z.union([z.string(), z.number()])).optional(),
  delimiter: z.string().min(1).optional(),
  encoding: z.string().min(1).optional(),
  decimalMark: z.enum(['.', ',']).optional(),
  sheet: z.string().min(1).optional(),
  acceptProblems: z.boolean().optional(),
});

type MapFile = z.output<typeof mapSchema>;

function toRole(spec: z.output<typeof roleSpec>): ColumnRole {
  if (typeof spec === 'string') return { role: spec };
  if ('item' in spec) return { role: 'item', itemCode: spec.item };
  if ('attention' in spec) return { role: 'attention', correctAnswer: String(spec.attention) };
  return spec;
}

/** Missing-value codes as written in the map file: numbers (or number-like text) and text codes. */
export function missingCodesOf(list: readonly (string | number)[]): MissingCodes {
  const codes: MissingCodes = { text: [], numeric: [] };
  for (const entry of list) {
    if (typeof entry === 'number') {
      codes.numeric.push(entry);
      continue;
    }
    const value = parseNumber(entry.trim(), '.');
    if (value === undefined) codes.text.push(entry);
    else codes.numeric.push(value);
  }
  return codes;
}

async function readMap(file: string, ctx: CliContext): Promise<MapFile> {
  const bytes = await readUserFile(file, 'map file', ctx);
  let raw: unknown;
  try {
    raw = JSON.parse(new TextDecoder().decode(bytes));
  } catch (error) {
    throw new UsageError(`map file "${file}" is not JSON: ${(error as Error).message}`);
  }
  const parsed = mapSchema.safeParse(raw);
  if (!parsed.success) {
    const issue = parsed.error.issues[0];
    const where = issue.path.length > 0 ? issue.path.join('.') : 'the top level';
    throw new UsageError(`map file "${file}", at ${where}: ${issue.message}`);
  }
  return parsed.data;
}

function describeColumns(check: ImportCheck): string {
  const count = (role: string) => check.columns.filter((c) => c.role === role).length;
  const some = (role: string, one: string, many: string) =>
    `${count(role)} ${count(role) === 1 ? one : many}`;
  const parts = [
    some('item', 'item', 'items'),
    count('id') > 0 ? `id '${check.columns.find((c) => c.role === 'id')?.name}'` : 'no id column',
    some('criterion', 'criterion', 'criteria'),
    some('group', 'group variable', 'group variables'),
    some('attention', 'attention check', 'attention checks'),
    count('duration') > 0 ? 'a duration' : 'no duration',
    count('retestLink') > 0 ? 'a retest link' : 'no retest link',
    `${count('ignored')} ignored`,
  ];
  return parts.join(', ');
}

/**
 * The study opened read-only for the import's checks. A study holding a change left unfinished by a
 * stopped writer is opened for writing once first, which rolls that change back: recovery, as any
 * writer does it, not a change of the user's.
 */
function inspectForImport(studyPath: string, actor: ReturnType<typeof currentActor>): Study {
  try {
    return Study.inspect(studyPath, { actor, app: CLI_APP });
  } catch (error) {
    if (!(error instanceof StudyFileError) || error.problem !== 'interrupted') throw error;
    Study.open(studyPath, { actor, app: CLI_APP }).close();
    return Study.inspect(studyPath, { actor, app: CLI_APP });
  }
}

/**
 * Runs `project import` (see the module comment): exit 0 with the stored dataset's summary, 1 when the
 * data cannot be imported (with the reason, row and column), 2 for a usage mistake or a malformed map file.
 */
async function runImport(values: ParsedArgs, ctx: CliContext): Promise<number> {
  const studyFile = values._[0];
  if (!studyFile) throw new UsageError('project import needs the study FILE');
  const data = stringValue(values, 'data');
  if (data === undefined)
    throw new UsageError('project import needs --data FILE (a CSV, TSV or .xlsx data file)');
  const role = stringValue(values, 'role');
  if (role === undefined || !(DATASET_ROLES as readonly string[]).includes(role)) {
    throw new UsageError(
      `project import needs --role pilot, validation or retest${role === undefined ? '' : ` (got "${role}")`}`,
    );
  }
  const currentRaw = stringValue(values, 'current');
  if (currentRaw !== undefined && currentRaw !== 'yes' && currentRaw !== 'no') {
    throw new UsageError(`--current must be yes or no (got "${currentRaw}")`);
  }
  const reason = stringValue(values, 'reason');
  if (reason !== undefined && currentRaw !== 'yes') {
    throw new UsageError('--reason goes with --current yes: it says why the new dataset becomes current');
  }
  const mapPath = stringValue(values, 'map');
  const map: MapFile = mapPath === undefined ? {} : await readMap(mapPath, ctx);
  const dataPath = resolveUserPath(data, ctx);
  const bytes = await readUserFile(data, 'data file', ctx);
  const fileName = path.basename(dataPath);
  const studyPath = resolveUserPath(studyFile, ctx);
  const actor = currentActor();
  const overrides: ColumnMapping = Object.fromEntries(
    Object.entries(map.columns ?? {}).map(([column, spec]) => [column, toRole(spec)]),
  );
  /** The map file's decimal mark, else the one the preview detects (set below, before any read). */
  let detectedMark: DecimalMark | undefined;
  const request = (study: Study): ImportRequest => {
    const decimalMark = map.decimalMark ?? detectedMark;
    return {
      fileName,
      role: role as (typeof DATASET_ROLES)[number],
      name: map.name,
      mapping: automaticMapping(study, overrides),
      missingCodes: missingCodesOf(map.missing ?? []),
      reading: {
        ...(map.delimiter === undefined ? {} : { delimiter: map.delimiter }),
        ...(map.encoding === undefined ? {} : { encoding: map.encoding }),
        ...(decimalMark === undefined ? {} : { decimalMark }),
        ...(map.sheet === undefined ? {} : { sheet: map.sheet }),
      },
    };
  };
  const acceptProblems = map.acceptProblems === true;
  // Every read and check runs on the study opened read-only, so that a refused import leaves the
  // study file byte for byte as it was; only a valid import opens it for writing.
  const checking = inspectForImport(studyPath, actor);
  try {
    checkWritable(studyPath);
  } catch (error) {
    checking.close();
    throw error;
  }
  let result: ImportRead;
  let check: ImportCheck;
  try {
    // The decimal mark as the import screen's preview detects it, so both read a file the same way.
    if (map.decimalMark === undefined) {
      try {
        detectedMark = (await previewDataFile(checking, bytes, fileName, request(checking).reading))
          .decimalMark;
      } catch (error) {
        if (error instanceof RuleError && error.code === 'file') throw new DataError(error.message);
        throw error;
      }
    }
    const { plan, read } = planImport(checking, bytes, request(checking));
    try {
      result = await readDataFile(read);
    } catch (error) {
      if (error instanceof TableError) throw new DataError(`${data}: ${error.message}`);
      throw error;
    }
    check = checkRead(checking, plan, result);
    const choice = importChoice(checking, plan.role);
    if (currentRaw === 'yes' && choice.current && (reason ?? '').trim() === '') {
      throw new UsageError(
        `${choice.ifMadeCurrent}: give --reason TEXT saying why (or leave out --current to keep "${choice.current.name}")`,
      );
    }
    try {
      checkImportable(plan, result, bytes, { acceptProblems });
    } catch (error) {
      if (error instanceof RuleError && error.code === 'problems') {
        throw new DataError(
          `${error.message.replace(/\. Declare missing-value codes.*$/, '')}; declare missing-value codes in the map file ("missing": [-9, "NA"]), or set "acceptProblems": true there to import the values as they are`,
        );
      }
      throw error;
    }
  } finally {
    checking.close();
  }
  const study = Study.open(studyPath, { actor, app: CLI_APP });
  try {
    // The plan again under the writer's lock: the phase may have been signed off meanwhile.
    const { plan } = planImport(study, bytes, request(study));
    const before = importChoice(study, plan.role);
    const datasetId = storeImport(study, plan, result, bytes, {
      acceptProblems,
      ...(currentRaw === undefined
        ? {}
        : { current: { makeCurrent: currentRaw === 'yes', ...(reason === undefined ? {} : { reason }) } }),
    });
    const nowCurrent = currentDataset(study, plan.role);
    const madeCurrent = nowCurrent?.id === datasetId;
    const currentNote = madeCurrent
      ? `dataset ${datasetId} is now the current ${plan.role} data${before.current ? ` (replacing dataset ${before.current.id} "${before.current.name}")` : ''}`
      : nowCurrent
        ? `dataset ${nowCurrent.id} "${nowCurrent.name}" stays the current ${plan.role} data; to use the new one: project use ${studyFile} --dataset ${datasetId} --reason TEXT`
        : `no ${plan.role} data is current; to use the new one: project use ${studyFile} --dataset ${datasetId} --reason TEXT`;
    const warnings = [
      ...(madeCurrent ? [] : [currentNote]),
      ...check.warnings,
      ...check.problems.map((p) => p.message),
      ...(check.poolItemsWithoutColumn.length > 0
        ? [`no column answers pool item(s) ${check.poolItemsWithoutColumn.join(', ')}`]
        : []),
      ...check.alreadyImported.map(
        (d) => `the same file (same SHA-256) was imported before as dataset ${d.id} "${d.name}" (${d.role})`,
      ),
    ];
    const json = {
      path: study.path,
      datasetId,
      role: check.role,
      name: check.name,
      fileName: check.fileName,
      sha256: check.sha256,
      bytes: check.byteLength,
      kind: check.kind,
      sheet: check.sheet ?? null,
      encoding: check.encoding,
      delimiter: check.delimiterName,
      decimalMark: check.decimalMark,
      respondents: check.respondents,
      excluded: 0,
      columns: check.columns,
      missingCodes: check.missingCodes,
      bounds: check.bounds,
      problemCount: check.problemCount,
      problems: check.problems,
      current: madeCurrent,
      currentDataset: nowCurrent ? { id: nowCurrent.id, name: nowCurrent.name } : null,
      logRows: study.log.count(),
      warnings,
    };
    if (values.json === true) {
      process.stdout.write(`${JSON.stringify(json)}\n`);
    } else {
      const codes = ['blank', ...check.missingCodes.numeric.map(String), ...check.missingCodes.text];
      const lines = [
        `imported ${check.role} data "${check.name}" into ${study.path} as dataset ${datasetId}`,
        currentNote,
        `file: ${check.fileName}, ${check.byteLength} bytes, SHA-256 ${check.sha256}`,
        `read as: ${check.kind === 'workbook' ? `sheet "${check.sheet}"` : `${check.encoding}, ${check.delimiterName}-separated`}, decimal ${check.decimalMark === '.' ? 'point' : 'comma'}`,
        `${respondentCount(check.respondents, 0)}; columns: ${describeColumns(check)}`,
        `missing-value codes: ${codes.join(', ')}; declared scale ${check.bounds.min} to ${check.bounds.max}`,
        '',
        formatTable(
          ['column', 'role', 'item', 'missing'],
          check.columns.map((c) => [
            c.name,
            c.role,
            c.itemCode ?? '',
            c.missing === undefined ? '' : String(c.missing),
          ]),
          ['left', 'left', 'left', 'right'],
        ),
      ];
      process.stdout.write(`${lines.join('\n')}\n`);
      for (const w of warnings) process.stderr.write(`warning: ${w}\n`);
    }
    return 0;
  } finally {
    study.close();
  }
}

export const importCommand: CliCommand = {
  name: 'project import',
  summary:
    'import a data file (CSV, TSV or .xlsx) into the study as the import screen does: item columns matched to the item pool by code, the map file on top; the Pilot data phase must be open (not signed off)',
  args: [{ name: 'FILE', description: 'the study file (.scalewright)' }],
  options: {
    data: {
      type: 'string',
      value: 'CSV',
      required: true,
      description: 'the data file: CSV, TSV or .xlsx with a header row',
    },
    role: {
      type: 'string',
      value: DATASET_ROLES.join('|'),
      required: true,
      description: 'what the data is for',
    },
    map: {
      type: 'string',
      value: 'map.json',
      description:
        'column roles, missing-value codes and reading settings (keys name, columns, missing, delimiter, encoding, decimalMark, sheet, acceptProblems; all optional)',
    },
    current: {
      type: 'string',
      value: 'yes|no',
      description:
        'whether the new dataset becomes the current one of its role (the data its analyses use). Default: yes when the role has no current dataset; otherwise no: the current one stays, and the output says how to switch with project use',
    },
    reason: {
      type: 'string',
      value: 'TEXT',
      description:
        'why the new dataset replaces the current one (needed with --current yes when the role has one)',
    },
    json: {
      type: 'boolean',
      description:
        'one JSON object (current: whether it became current; currentDataset: the current dataset of its role after the import)',
    },
  },
  run: runImport,
};
