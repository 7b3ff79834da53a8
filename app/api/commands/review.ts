import { z } from 'zod';
import {
  addExpert,
  addRound,
  blankRatingsSheet,
  decideItem,
  editExpert,
  importRatings,
  MAX_RATINGS_FILE_BYTES,
  previewRatings,
  removeExpert,
  reviewPacket,
  reviewView,
  syncRoundItems,
  updateForm,
  withdrawRatings,
} from '../../phases/review/index.ts';
import { MAX_ITEM_TEXT } from '../../phases/items/index.ts';
import { command } from '../define.ts';
import { fileBytes, uploadedFile } from './items.ts';
import { id, rationale, text } from './schemas.ts';

const roundId = id;
const expert = z.object({
  code: text(40),
  role: text(200).default(''),
  name: text(200).default(''),
  nameWithheld: z.boolean().default(false),
});

/** Phase 3: review rounds, the panel, the rating form, ratings, statistics and decisions. */
export const reviewCommands = {
  'review.get': command(z.object({}), (s) => reviewView(s.study)),
  'review.addRound': command(
    z.object({ label: text(200).default(''), scope: z.enum(['kept', 'revised']).default('kept') }),
    (s, input) => addRound(s.study, input),
  ),
  'review.syncItems': command(z.object({ roundId }), (s, input) => syncRoundItems(s.study, input.roundId)),
  'review.setForm': command(
    z.object({
      roundId,
      asksEssential: z.boolean(),
      asksFacet: z.boolean(),
      asksComment: z.boolean(),
      instructions: text(5_000),
    }),
    (s, { roundId: round, ...form }) => updateForm(s.study, round, form),
  ),
  'review.addExpert': command(expert.extend({ roundId }), (s, { roundId: round, ...input }) =>
    addExpert(s.study, round, input),
  ),
  'review.editExpert': command(expert.extend({ id }), (s, { id: expertId, ...input }) =>
    editExpert(s.study, expertId, input),
  ),
  'review.removeExpert': command(z.object({ id }), (s, input) => removeExpert(s.study, input.id)),
  'review.previewRatings': command(
    z.object({ roundId, ...uploadedFile(MAX_RATINGS_FILE_BYTES) }),
    (s, input) => previewRatings(s.study, input.roundId, fileBytes(input.content), input.fileName),
  ),
  'review.importRatings': command(
    z.object({
      roundId,
      ...uploadedFile(MAX_RATINGS_FILE_BYTES),
      /** Expert codes of the file, not on the panel, that the researcher confirms adding. */
      addExperts: z.array(text(40)).max(1000).default([]),
    }),
    (s, input) =>
      importRatings(s.study, input.roundId, fileBytes(input.content), input.fileName, {
        addExperts: input.addExperts,
      }),
  ),
  'review.withdrawRatings': command(z.object({ importId: id, rationale }), (s, input) =>
    withdrawRatings(s.study, input.importId, input.rationale),
  ),
  'review.decide': command(
    z.object({
      roundId,
      itemId: id,
      decision: z.enum(['keep', 'revise', 'retire']),
      rationale,
      newText: text(MAX_ITEM_TEXT).optional(),
    }),
    (s, input) => decideItem(s.study, input),
  ),
  'review.blankSheet': command(z.object({ roundId }), (s, input) =>
    blankRatingsSheet(s.study, input.roundId),
  ),
  'review.packet': command(z.object({ roundId }), (s, input) => reviewPacket(s.study, input.roundId)),
};
