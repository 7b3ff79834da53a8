import crypto from 'node:crypto';
import { z } from 'zod';
import {
  DATASET_ROLES,
  type DataFilePreview,
  datasetDetail,
  excludeRespondents,
  type ImportCheck,
  type ImportPlan,
  includeRespondents,
  MAX_DATASET_NAME,
  MAX_MISSING_CODES,
  MAX_REASON,
  MAX_UPLOAD_BYTES,
  checkRead,
  pilotView,
  planImport,
  previewDataFile,
  readJobInput,
  SCREENING_CHECKS,
  screenDataset,
  screeningView,
  storeImport,
  makeDatasetCurrent,
  withdrawDataset,
} from '../../phases/pilot/index.ts';
import type { ImportRead, ReadSettings } from '../../import/read-data-file.ts';
import { RuleError } from '../../phases/errors.ts';
import { command } from '../define.ts';
import { LongJob } from '../long-job.ts';
import type { Session } from '../session.ts';
import { fileBytes, uploadedFile } from './items.ts';
import { id, text } from './schemas.ts';

/**
 * The file a session is importing, held in memory (never in the study) from the moment it is chosen
 * until it is stored or discarded: its bytes, how far the reading has got, and the checked read
 * waiting for the researcher's confirmation. One file at a time per session.
 */
interface Staged {
  id: string;
  studyPath: string;
  fileName: string;
  bytes: Uint8Array;
  /** The last read, checked and waiting to be confirmed. */
  checked?: { id: string; plan: ImportPlan; read: ImportRead };
}

const staging = new WeakMap<Session, Staged>();

/** Whole-file reads run in a worker; each remembers the file it reads and the confirmed plan. */
const reads = new LongJob<'import.read', { stageId: string; plan: ImportPlan }>('import.read', {
  notFound: (taskId) => `no file is being read as task ${taskId}`,
  refused: ['file'],
});

function stagedFile(session: Session, stageId: string): Staged {
  const staged = staging.get(session);
  if (!staged || staged.id !== stageId) {
    throw new RuleError('that file is no longer waiting to be imported; choose it again', 'not-found');
  }
  if (staged.studyPath !== session.study.path) {
    staging.delete(session);
    throw new RuleError('another study was opened since the file was chosen; choose it again', 'not-found');
  }
  return staged;
}

const reading = z.object({
  delimiter: text(8).min(1).optional(),
  encoding: text(40).min(1).optional(),
  decimalMark: z.enum(['.', ',']).optional(),
  sheet: text(200).min(1).optional(),
});

function settings(input: z.output<typeof reading> | undefined): ReadSettings {
  const out: ReadSettings = {};
  if (input?.delimiter !== undefined) out.delimiter = input.delimiter;
  if (input?.encoding !== undefined) out.encoding = input.encoding;
  if (input?.decimalMark !== undefined) out.decimalMark = input.decimalMark;
  if (input?.sheet !== undefined) out.sheet = input.sheet;
  return out;
}

const columnRole = z.discriminatedUnion('role', [
  z.object({ role: z.literal('id') }),
  z.object({
    role: z.literal('item'),
    itemCode: text(40).trim().min(1, 'an item column needs its item code'),
  }),
  z.object({ role: z.literal('criterion') }),
  z.object({ role: z.literal('group') }),
  z.object({ role: z.literal('retestLink') }),
  z.object({ role: z.literal('duration') }),
  z.object({
    role: z.literal('attention'),
    correctAnswer: text(100).trim().min(1, 'an attention check needs its correct answer'),
  }),
  z.object({ role: z.literal('ignored') }),
]);

const missingCodes = z.object({
  text: z.array(text(40)).max(MAX_MISSING_CODES).default([]),
  numeric: z.array(z.number().finite()).max(MAX_MISSING_CODES).default([]),
});

const reason = text(MAX_REASON).trim().min(1, 'a reason is required');
const positions = z.array(z.number().int().min(0)).max(10_000_000);

/** The check of a read, with the id that confirms it. */
export type ReadCheck = ImportCheck & { readId: string };

/** Phase 4: data files into the study (preview, read in a worker, confirm), screening, exclusions. */
export const pilotCommands = {
  'pilot.view': command(z.object({}), (s) => pilotView(s.study)),
  'pilot.dataset': command(z.object({ datasetId: id }), (s, input) =>
    datasetDetail(s.study, input.datasetId),
  ),

  /** Holds a chosen file in memory and previews its start; nothing is written. */
  'pilot.stage': command(
    z.object({ ...uploadedFile(MAX_UPLOAD_BYTES), reading: reading.optional() }),
    async (s, input): Promise<{ stageId: string; preview: DataFilePreview }> => {
      const bytes = fileBytes(input.content);
      const preview = await previewDataFile(s.study, bytes, input.fileName, settings(input.reading));
      const staged: Staged = {
        id: crypto.randomUUID(),
        studyPath: s.study.path,
        fileName: input.fileName,
        bytes,
      };
      staging.set(s, staged);
      return { stageId: staged.id, preview };
    },
  ),

  /** Previews the held file again, read another way (delimiter, encoding, decimal mark, sheet). */
  'pilot.preview': command(z.object({ stageId: text(64), reading: reading.optional() }), (s, input) => {
    const staged = stagedFile(s, input.stageId);
    return previewDataFile(s.study, staged.bytes, staged.fileName, settings(input.reading));
  }),

  /** Starts reading the whole held file in a worker with the confirmed mapping; follow with task.status. */
  'pilot.startRead': command(
    z.object({
      stageId: text(64),
      role: z.enum(DATASET_ROLES),
      name: text(MAX_DATASET_NAME).default(''),
      mapping: z.record(z.string().max(500), columnRole),
      missingCodes,
      reading: reading.optional(),
    }),
    (s, input) => {
      const staged = stagedFile(s, input.stageId);
      const { plan, read } = planImport(s.study, staged.bytes, {
        fileName: staged.fileName,
        role: input.role,
        name: input.name,
        mapping: input.mapping,
        missingCodes: input.missingCodes,
        reading: settings(input.reading),
      });
      const taskId = reads.start(s, readJobInput(read), { stageId: staged.id, plan });
      staged.checked = undefined;
      return { taskId, bytes: staged.bytes.length };
    },
  ),

  /** Waits for a started read and returns its check (counts, columns, problems by row and column). */
  'pilot.collectRead': command(z.object({ taskId: text(64) }), (s, input) =>
    reads.collect(s, input.taskId, (read, { stageId, plan }): ReadCheck => {
      const staged = staging.get(s);
      if (staged?.id !== stageId) {
        throw new RuleError(`no file is being read as task ${input.taskId}`, 'not-found');
      }
      const readId = crypto.randomUUID();
      staged.checked = { id: readId, plan, read };
      return { ...checkRead(s.study, plan, read), readId };
    }),
  ),

  /** Stores the checked read in one transaction with its log row. */
  'pilot.confirmImport': command(
    z.object({
      readId: text(64),
      acceptProblems: z.boolean().default(false),
      name: text(MAX_DATASET_NAME).trim().optional(),
      /** Whether the new dataset becomes current for its role; absent, only when the role has none. */
      current: z.object({ makeCurrent: z.boolean(), reason: text(MAX_REASON).optional() }).optional(),
    }),
    (s, input) => {
      const staged = staging.get(s);
      const checked = staged?.checked;
      if (!staged || !checked || checked.id !== input.readId) {
        throw new RuleError(
          'that read is no longer waiting for confirmation; read the file again',
          'not-found',
        );
      }
      stagedFile(s, staged.id);
      const plan = input.name ? { ...checked.plan, name: input.name } : checked.plan;
      const datasetId = storeImport(s.study, plan, checked.read, staged.bytes, {
        acceptProblems: input.acceptProblems,
        ...(input.current ? { current: input.current } : {}),
      });
      staging.delete(s);
      return { datasetId, name: plan.name, role: plan.role, respondents: checked.read.dataset.n };
    },
  ),

  /** Forgets the held file and any read of it; the study is not touched. */
  'pilot.discard': command(z.object({}), (s) => {
    const staged = staging.get(s);
    if (staged) {
      for (const [taskId, read] of reads.running(s)) if (read.stageId === staged.id) reads.abandon(s, taskId);
    }
    staging.delete(s);
    return { discarded: staged !== undefined };
  }),

  /** Makes a dataset the one its role's analyses use (a logged decision with a reason). */
  'pilot.makeCurrent': command(z.object({ datasetId: id, reason }), (s, input) =>
    makeDatasetCurrent(s.study, input.datasetId, input.reason),
  ),
  /** Withdraws the current dataset of its role (a logged decision; reversed by making it current again). */
  'pilot.withdraw': command(z.object({ datasetId: id, reason }), (s, input) =>
    withdrawDataset(s.study, input.datasetId, input.reason),
  ),

  'pilot.screen': command(
    z.object({
      datasetId: id,
      longstringShare: z.number().gt(0).max(1).optional(),
      mahalanobisAlpha: z.number().gt(0).lt(1).optional(),
      speederFraction: z.number().gt(0).lt(1).optional(),
      maxMissingShare: z.number().min(0).lt(1).optional(),
    }),
    (s, { datasetId, ...options }) => {
      const runId = screenDataset(s.study, datasetId, options);
      return { runId };
    },
  ),
  'pilot.screening': command(z.object({ datasetId: id }), (s, input) =>
    screeningView(s.study, input.datasetId),
  ),

  'pilot.exclude': command(
    z.object({
      datasetId: id,
      respondents: positions.optional(),
      checks: z.array(z.enum(SCREENING_CHECKS)).optional(),
      reason,
    }),
    (s, input) =>
      excludeRespondents(s.study, input.datasetId, {
        respondents: input.respondents,
        checks: input.checks,
        reason: input.reason,
      }),
  ),
  'pilot.include': command(z.object({ datasetId: id, respondents: positions, reason }), (s, input) =>
    includeRespondents(s.study, input.datasetId, input),
  ),
};
