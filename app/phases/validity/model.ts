import {
  currentValidityDecisions,
  insertValidityDecision,
  type ValidityDecision,
} from '../../../db/repos/validity.ts';
import type { Study } from '../../../db/study.ts';
import { EngineError } from '../../engine/errors.ts';
import { modelItems } from '../../engine/cfa/model.ts';
import { changeInPhase } from '../change.ts';
import { RuleError } from '../errors.ts';
import { PHASE, retainedItems } from './data.ts';

/** The measurement model the confirmatory factor analysis fits. */
export interface MeasurementModel {
  factors: { name: string; items: string[] }[];
  /** Fix every factor correlation at zero. */
  orthogonal: boolean;
  /** Residual covariances freed, each with the reason the researcher gave for it. */
  residualCovariances: { a: string; b: string; rationale: string }[];
}

export interface ModelInForce {
  model: MeasurementModel;
  /** `purification`: built from the retained items and their facets; `decision`: set with a reason. */
  source: 'purification' | 'decision';
  decision: ValidityDecision<MeasurementModel> | null;
  /** Retained items with no facet, which the built model leaves out. */
  withoutFacet: string[];
}

const MODEL_SUBJECT = 'measurement model';

/** One factor per facet, holding the retained items of that facet in purification's order. */
export function modelFromPurification(study: Study): { model: MeasurementModel; withoutFacet: string[] } {
  const { items } = retainedItems(study);
  const factors: { name: string; items: string[] }[] = [];
  const withoutFacet: string[] = [];
  for (const item of items) {
    if (item.facetName === null) {
      withoutFacet.push(item.code);
      continue;
    }
    const factor = factors.find((f) => f.name === item.facetName);
    if (factor) factor.items.push(item.code);
    else factors.push({ name: item.facetName, items: [item.code] });
  }
  return { model: { factors, orthogonal: false, residualCovariances: [] }, withoutFacet };
}

/** The model in force: the latest one set with a reason, else the one built from purification. */
export function modelInForce(study: Study): ModelInForce {
  const decision = currentValidityDecisions<MeasurementModel>(study, 'model').get(MODEL_SUBJECT) ?? null;
  const built = modelFromPurification(study);
  if (decision) return { model: decision.body, source: 'decision', decision, withoutFacet: [] };
  return { model: built.model, source: 'purification', decision: null, withoutFacet: built.withoutFacet };
}

function pairKey(a: string, b: string): string {
  return a < b ? `${a}~${b}` : `${b}~${a}`;
}

/**
 * Checks a model against the retained items: named factors, each retained item at most once, every
 * item one that purification kept, and a reason for each residual covariance. Returns it tidied.
 */
export function checkModel(study: Study, model: MeasurementModel): MeasurementModel {
  const retained = new Set(retainedItems(study).items.map((it) => it.code));
  const factors = model.factors.map((f) => ({ name: f.name.trim(), items: f.items.map((i) => i.trim()) }));
  const names = new Set<string>();
  const placed = new Map<string, string>();
  for (const f of factors) {
    if (f.name === '') throw new RuleError('every factor needs a name');
    if (names.has(f.name.toLowerCase())) throw new RuleError(`two factors are named "${f.name}"`);
    names.add(f.name.toLowerCase());
    if (f.items.length < 2)
      throw new RuleError(`factor "${f.name}" has ${f.items.length} item(s); give it at least two`);
    for (const code of f.items) {
      if (!retained.has(code))
        throw new RuleError(`item ${code} (factor "${f.name}") is not among the items purification kept`);
      const other = placed.get(code);
      if (other) throw new RuleError(`item ${code} is placed on both "${other}" and "${f.name}"`);
      placed.set(code, f.name);
    }
  }
  const seen = new Set<string>();
  const residualCovariances = model.residualCovariances.map((rc, i) => {
    const a = rc.a.trim();
    const b = rc.b.trim();
    const where = `residual covariance ${i + 1} (${a} with ${b})`;
    if (!placed.has(a) || !placed.has(b))
      throw new RuleError(`${where} names an item that is not in the model`);
    if (a === b) throw new RuleError(`${where} pairs an item with itself`);
    if (seen.has(pairKey(a, b))) throw new RuleError(`${where} is listed twice`);
    seen.add(pairKey(a, b));
    if (rc.rationale.trim() === '')
      throw new RuleError(`${where} needs a reason: a residual covariance is freed only with a rationale`);
    return { a, b, rationale: rc.rationale.trim() };
  });
  const out = { factors, orthogonal: model.orthogonal, residualCovariances };
  try {
    modelItems(out);
  } catch (error) {
    if (error instanceof EngineError) throw new RuleError(error.message);
    throw error;
  }
  return out;
}

/** What changed between two models, in words, for the log. */
function modelChanges(before: MeasurementModel, after: MeasurementModel): string[] {
  const out: string[] = [];
  const where = (m: MeasurementModel) => new Map(m.factors.flatMap((f) => f.items.map((i) => [i, f.name])));
  const wb = where(before);
  const wa = where(after);
  for (const [item, f] of wa) if (wb.get(item) !== f) out.push(`${item} on ${f}`);
  for (const [item] of wb) if (!wa.has(item)) out.push(`${item} left out`);
  if (before.orthogonal !== after.orthogonal)
    out.push(after.orthogonal ? 'factors uncorrelated' : 'factors correlated');
  const rb = new Set(before.residualCovariances.map((r) => pairKey(r.a, r.b)));
  const ra = new Set(after.residualCovariances.map((r) => pairKey(r.a, r.b)));
  for (const r of after.residualCovariances)
    if (!rb.has(pairKey(r.a, r.b))) out.push(`residual covariance ${r.a} with ${r.b} freed`);
  for (const r of before.residualCovariances)
    if (!ra.has(pairKey(r.a, r.b))) out.push(`residual covariance ${r.a} with ${r.b} fixed at zero again`);
  return out;
}

/**
 * Sets the measurement model with the reason for the change, logged with the model before and
 * after. Refuses a signed-off phase, a model that does not fit the retained items, a residual
 * covariance without its own rationale, and a change that changes nothing.
 */
export function setMeasurementModel(
  study: Study,
  model: MeasurementModel,
  rationale: string,
  options: { reversesRow?: number } = {},
): number {
  const checked = checkModel(study, model);
  if (rationale.trim() === '') throw new RuleError('say why the measurement model changes');
  const before = modelInForce(study).model;
  const changes = modelChanges(before, checked);
  if (changes.length === 0) throw new RuleError('the model is the same as the one in force; nothing changes');
  return changeInPhase(
    study,
    {
      phase: PHASE,
      kind: 'model-set',
      target: 'measurement model',
      rationale: rationale.trim(),
      detail: {
        changes,
        before,
        after: checked,
        ...(options.reversesRow === undefined ? {} : { reverses: options.reversesRow }),
      },
    },
    () =>
      insertValidityDecision(study, {
        kind: 'model',
        subject: MODEL_SUBJECT,
        body: checked,
        rationale: rationale.trim(),
      }),
  );
}

/** The engine's form of the model. */
export function engineModel(model: MeasurementModel) {
  return {
    factors: model.factors,
    orthogonal: model.orthogonal,
    residualCovariances: model.residualCovariances,
  };
}
