import { z } from 'zod';
import { command } from '../define.ts';
import { EXPORT_KINDS, exportTable } from '../exports.ts';
import { id } from './schemas.ts';

/** Result tables as CSV (the decision log's own export lives with the log). */
export const exportCommands = {
  'export.table': command(
    z.object({ kind: z.enum(EXPORT_KINDS), roundId: id.optional(), datasetId: id.optional() }),
    (s, input) => exportTable(s.study, input.kind, input),
  ),
};
