import { getRelation, listRelations, type RelationRecord } from '../../../db/repos/construct.ts';
import { currentValidityDecisions, insertValidityDecision } from '../../../db/repos/validity.ts';
import type { Study } from '../../../db/study.ts';
import type { CriterionTiming } from '../../engine/validity/correlation.ts';
import { changeInPhase } from '../change.ts';
import { RuleError } from '../errors.ts';
import { PHASE, sideColumns, validationDataset } from './data.ts';

/** How a numeric column of the validation data is read: which planned relation it answers, and when it was measured. */
export interface MeasureSetting {
  relationId: number | null;
  /** `predictive`: measured later than the scale; `concurrent`: at the same time. */
  timing: CriterionTiming;
  /** The measure's own reliability (for the correction for attenuation), when known. */
  reliability: number | null;
}

/** How a group column answers a known-groups relation: which level is expected to score higher. */
export interface GroupSetting {
  relationId: number | null;
  higher: string;
  lower: string;
}

export function measureSettings(study: Study): Map<string, MeasureSetting & { rationale: string }> {
  const out = new Map<string, MeasureSetting & { rationale: string }>();
  for (const [column, d] of currentValidityDecisions<MeasureSetting>(study, 'measure'))
    out.set(column, { ...d.body, rationale: d.rationale });
  return out;
}

export function groupSettings(study: Study): Map<string, GroupSetting & { rationale: string }> {
  const out = new Map<string, GroupSetting & { rationale: string }>();
  for (const [column, d] of currentValidityDecisions<GroupSetting>(study, 'groups'))
    out.set(column, { ...d.body, rationale: d.rationale });
  return out;
}

function activeRelation(
  study: Study,
  id: number | null,
  kinds: RelationRecord['kind'][],
): RelationRecord | null {
  if (id === null) return null;
  const r = getRelation(study, id);
  if (!r || r.retiredAt)
    throw new RuleError(`planned relation ${id} does not exist or was withdrawn`, 'not-found');
  if (!kinds.includes(r.kind))
    throw new RuleError(
      `the relation to "${r.otherConstruct}" is a ${r.kind} relation; it cannot be answered by this column`,
    );
  return r;
}

function takenBy(study: Study, relationId: number | null, column: string): string | null {
  if (relationId === null) return null;
  for (const [other, s] of [...measureSettings(study), ...groupSettings(study)])
    if (other !== column && s.relationId === relationId) return other;
  return null;
}

/**
 * Records how a criterion or other-measure column is read: the planned relation it answers
 * (convergent, discriminant or criterion), whether it was measured at the same time or later, and
 * its reliability. Logged with the reason; the latest setting of a column is the one in force.
 */
export function describeMeasure(
  study: Study,
  column: string,
  setting: MeasureSetting,
  rationale: string,
): number {
  const side = sideColumns(study, validationDataset(study).id);
  if (!side.measures.has(column)) {
    throw new RuleError(
      `the validation data has no criterion column "${column}"${side.measures.size ? `; its criterion columns: ${[...side.measures.keys()].join(', ')}` : ''}`,
    );
  }
  if (setting.timing !== 'concurrent' && setting.timing !== 'predictive')
    throw new RuleError(
      'say whether the measure was taken at the same time (concurrent) or later (predictive)',
    );
  if (setting.reliability !== null && !(setting.reliability > 0 && setting.reliability <= 1))
    throw new RuleError(`a reliability lies above 0 and at most 1 (got ${setting.reliability})`);
  const relation = activeRelation(study, setting.relationId, ['convergent', 'discriminant', 'criterion']);
  const other = takenBy(study, setting.relationId, column);
  if (other && relation)
    throw new RuleError(
      `the relation to "${relation.otherConstruct}" is already answered by column "${other}"`,
    );
  if (rationale.trim() === '') throw new RuleError(`say why column "${column}" is read this way`);
  return changeInPhase(
    study,
    {
      phase: PHASE,
      kind: 'measure-described',
      target: `column "${column}"`,
      rationale: rationale.trim(),
      detail: { column, ...setting, relation: relation?.otherConstruct ?? null },
    },
    () =>
      insertValidityDecision(study, {
        kind: 'measure',
        subject: column,
        body: setting,
        rationale: rationale.trim(),
      }),
  );
}

/** Records which levels of a group column a known-groups relation compares, higher first. */
export function describeGroups(
  study: Study,
  column: string,
  setting: GroupSetting,
  rationale: string,
): number {
  const side = sideColumns(study, validationDataset(study).id);
  const labels = side.groups.get(column);
  if (!labels) {
    throw new RuleError(
      `the validation data has no group column "${column}"${side.groups.size ? `; its group columns: ${[...side.groups.keys()].join(', ')}` : ''}`,
    );
  }
  const levels = new Set(labels.map((l) => l.trim()).filter((l) => l !== ''));
  for (const level of [setting.higher, setting.lower])
    if (!levels.has(level))
      throw new RuleError(
        `column "${column}" has no group "${level}"; its groups: ${[...levels].join(', ')}`,
      );
  if (setting.higher === setting.lower) throw new RuleError('compare two different groups');
  const relation = activeRelation(study, setting.relationId, ['known-groups']);
  const other = takenBy(study, setting.relationId, column);
  if (other && relation)
    throw new RuleError(
      `the relation to "${relation.otherConstruct}" is already answered by column "${other}"`,
    );
  if (rationale.trim() === '') throw new RuleError(`say why the groups of "${column}" are compared this way`);
  return changeInPhase(
    study,
    {
      phase: PHASE,
      kind: 'groups-described',
      target: `column "${column}"`,
      rationale: rationale.trim(),
      detail: { column, ...setting, relation: relation?.otherConstruct ?? null },
    },
    () =>
      insertValidityDecision(study, {
        kind: 'groups',
        subject: column,
        body: setting,
        rationale: rationale.trim(),
      }),
  );
}

/** The planned relations in force (not withdrawn), in the order they were planned. */
export function plannedRelations(study: Study): RelationRecord[] {
  return listRelations(study);
}
