/** The review phase: its rules (checklist, gates), its actions (each write with its decision) and its views. */
export * from './actions.ts';
export * from './packet.ts';
export * from './rating-actions.ts';
export * from './round-data.ts';
export * from './rules.ts';
export * from './views.ts';
export {
  EXPERT_CODE_PATTERN,
  MAX_PREVIEW_RATINGS,
  MAX_RATINGS_FILE_BYTES,
  type RatingsPreview,
  type UnknownExpert,
} from '../../import/ratings/index.ts';
