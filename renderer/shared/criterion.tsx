import { bounded } from '../../app/api/format.ts';
import type { ReliabilityCriterion } from '../../app/api/contracts/purification.ts';

/** "criterion .80 for basic research", the short name of a study's reliability criterion. */
export function criterionName(criterion: ReliabilityCriterion): string {
  return `${bounded(criterion.minimum, 2)} for ${criterion.useName}`;
}

/**
 * Beside a coefficient: whether it reaches the study's criterion, with a footnote mark. The note
 * itself (`CriterionFootnote`) sits once under the table or panel.
 */
export function CriterionMark({
  value,
  criterion,
}: {
  value: number | null | undefined;
  criterion: ReliabilityCriterion;
}) {
  if (value === null || value === undefined || !Number.isFinite(value))
    return <span className="muted">–</span>;
  const meets = value >= criterion.minimum;
  return (
    <span className={meets ? 'criterion criterion-met' : 'criterion criterion-below'}>
      {meets ? 'meets' : 'below'} {bounded(criterion.minimum, 2)}
      <sup>*</sup>
    </span>
  );
}

/** The footnote-style source note of the criterion: its rule, why it applies, and the reference. */
export function CriterionFootnote({ criterion }: { criterion: ReliabilityCriterion }) {
  return (
    <p className="hint criterion-note" data-testid="criterion-note">
      <sup>*</sup> Criterion {criterionName(criterion)}: {criterion.wording} {criterion.reason} A criterion is
      a point of reference, not a verdict on the items. Source: {criterion.reference}
    </p>
  );
}
