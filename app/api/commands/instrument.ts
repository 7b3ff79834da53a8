import { z } from 'zod';
import { instrumentFiles } from '../../export/instrument/index.ts';
import { RuleError } from '../../phases/errors.ts';
import { instrumentForm, setInstrumentForm } from '../../phases/appendix/instrument-form.ts';
import { command } from '../define.ts';
import { rationale, text } from './schemas.ts';

/** The final instrument: its form (order, heading, instructions, scoring rule) and its files. */
export const instrumentCommands = {
  /** The form as it stands, or why there is no instrument yet (no retained item set). */
  'instrument.view': command(z.object({}), (s) => {
    try {
      const form = instrumentForm(s.study);
      return {
        available: true as const,
        reason: null,
        items: form.items.map((it) => ({
          code: it.code,
          text: it.text,
          facetName: it.facetName,
          keying: it.keying,
        })),
        title: form.title,
        instructions: form.instructions,
        rule: form.rule,
        minAnsweredShare: form.minAnsweredShare,
        chosen: form.chosen,
        round: form.round.number,
        warnings: form.warnings,
      };
    } catch (error) {
      if (error instanceof RuleError && error.code === 'no-retained-set') {
        return { available: false as const, reason: error.message };
      }
      throw error;
    }
  }),
  'instrument.setForm': command(
    z.object({
      order: z.array(text(20)).max(2_000).optional(),
      title: text(300).optional(),
      instructions: text(5_000).optional(),
      rule: z.enum(['sum', 'mean']).optional(),
      minAnsweredShare: z.number().gt(0).lte(1).optional(),
      reason: rationale,
    }),
    (s, input) => {
      setInstrumentForm(s.study, input);
      return null;
    },
  ),
  /** Every file of the final instrument with its SHA-256 (bytes as base64), for the screen to offer. */
  'instrument.files': command(z.object({}), async (s) => {
    const { model, files } = await instrumentFiles(s.study);
    return {
      files: files.map((f) => ({
        name: f.name,
        mime: f.mime,
        sha256: f.sha256,
        base64: f.bytes.toString('base64'),
      })),
      items: model.items.length,
      logHead: model.log.head,
      verified: model.verification.intact,
      warnings: model.warnings,
    };
  }),
};
