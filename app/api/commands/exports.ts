import { z } from 'zod';
import { command } from '../define.ts';
import { APPENDIX_FORMATS, exportAppendix } from '../../export/appendix/index.ts';
import { EXPORT_KINDS, exportTable } from '../exports.ts';
import { id } from './schemas.ts';

/** Result tables as CSV (the decision log's own export lives with the log), and the methods appendix. */
export const exportCommands = {
  'export.table': command(
    z.object({ kind: z.enum(EXPORT_KINDS), roundId: id.optional(), datasetId: id.optional() }),
    (s, input) => exportTable(s.study, input.kind, input),
  ),
  /** The methods appendix in one format, as base64 (PDF and DOCX are binary) for the screen to save. */
  'export.appendix': command(z.object({ format: z.enum(APPENDIX_FORMATS) }), async (s, input) => {
    const rendered = await exportAppendix(s.study, input.format);
    return {
      fileName: rendered.fileName,
      mediaType: rendered.mediaType,
      size: rendered.bytes.length,
      base64: Buffer.from(rendered.bytes).toString('base64'),
      head: rendered.head,
      intact: rendered.intact,
    };
  }),
};
