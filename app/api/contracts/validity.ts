/**
 * What the validity screens need to know besides the command table's own types: the shapes of the
 * view and its parts, the sources of evidence, and the engine's result types they draw.
 */
export type { ValidityView } from '../../phases/validity/views.ts';
export type { MeasurementModel } from '../../phases/validity/model.ts';
export type { EvidenceSourceId } from '../../phases/validity/evidence.ts';
export type {
  RelationsResults,
  HypothesisResult,
  MeasureResult,
  GroupResult,
} from '../../phases/validity/relations.ts';
export type { RetestResults } from '../../phases/validity/retest.ts';
export type { CfaJobOutput, InvarianceJobOutput, ReleaseCandidate } from '../../workers/validity.ts';
export type { CfaResult, ModificationHint } from '../../engine/cfa/fit.ts';
export { EVIDENCE_SOURCES } from '../../phases/validity/evidence.ts';
