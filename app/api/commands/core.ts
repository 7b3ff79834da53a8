import { z } from 'zod';
import { PHASE_IDS } from '../../../db/repos/phase-state.ts';
import { parseHead } from '../../../db/verify.ts';
import { verifyWithReruns } from '../../phases/history/verify.ts';
import { reopenPhase, signOffPhase, studyOverview } from '../../phases/index.ts';
import { exportLogCsv } from '../../phases/log.ts';
import { lastChange, undoLastChange } from '../../phases/undo.ts';
import { command } from '../define.ts';
import { id, phase, rationale, text } from './schemas.ts';

/** What the log can be narrowed to: a phase (or the study itself), a kind, an item code, a text. */
const logFilter = z.object({
  phase: z.enum([...PHASE_IDS, 'study']).optional(),
  kind: text(60).trim().min(1).optional(),
  item: text(20).trim().min(1).optional(),
  search: text(200).optional(),
});

/** The study itself, phase sign-off, the decision log, and who is working. */
export const coreCommands = {
  'study.info': command(z.object({}), (s) => {
    const study = s.study;
    return {
      path: study.path,
      title: study.meta('title') ?? '',
      studyId: study.meta('study_id') ?? '',
      createdAt: study.meta('created_at') ?? '',
      version: study.version,
      actor: study.actor,
    };
  }),
  'study.overview': command(z.object({}), (s) => studyOverview(s.study)),

  'phase.signOff': command(z.object({ phase, rationale }), (s, input) =>
    signOffPhase(s.study, input.phase, input.rationale),
  ),
  'phase.reopen': command(z.object({ phase, rationale }), (s, input) =>
    reopenPhase(s.study, input.phase, input.rationale),
  ),

  'log.list': command(
    logFilter.extend({
      limit: z.number().int().min(1).max(1_000).default(200),
      offset: z.number().int().min(0).default(0),
    }),
    (s, input) => ({
      ...s.study.log.page(input),
      head: s.study.log.head() ?? null,
      kinds: s.study.log.kinds(),
    }),
  ),
  /** The most recent change in the log, whether undo can reverse it, and what undoing does. */
  'log.lastChange': command(z.object({}), (s) => lastChange(s.study)),
  /** Undoes the change in row `seq` (which must be the last change) by its phase's reversal. */
  'log.undo': command(z.object({ seq: id, reason: rationale }), (s, input) =>
    undoLastChange(s.study, { seq: input.seq, reason: input.reason }),
  ),
  'log.exportCsv': command(logFilter, (s, input) => exportLogCsv(s.study, input)),
  'log.verify': command(
    z.object({
      head: text(200)
        .trim()
        .refine((h) => parseHead(h) !== undefined, {
          message: 'a log head reads SEQ:HASH: the row number, a colon and the 64-hex-digit hash',
        })
        .optional(),
    }),
    (s, input) => verifyWithReruns(s.study, { head: input.head }),
  ),

  'task.status': command(z.object({ id: text(64) }), (s, input) => s.tasks.status(input.id)),
  'task.cancel': command(z.object({ id: text(64) }), (s, input) => s.tasks.cancel(input.id)),

  'settings.get': command(z.object({}), (s) => ({ actor: s.actor })),
  'settings.setDisplayName': command(
    z.object({ name: text(200).trim().min(1, 'a display name cannot be blank') }),
    (s, input) => {
      s.setDisplayName(input.name);
      return { actor: s.actor };
    },
  ),
};
