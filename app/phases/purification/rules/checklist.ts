import { listRounds } from '../../../../db/repos/purification.ts';
import type { Study } from '../../../../db/study.ts';
import type { ReliabilityCriterion } from '../../../engine/reliability/criterion.ts';
import { currentPilotDataset } from '../../analysis-data.ts';
import type { ChecklistItem, PhaseRules } from '../../types.ts';
import { PHASE, workingSet } from '../standing.ts';
import { criterionFor, fmt, ROUND_RULES } from './flags.ts';
import { type RoundSummary, roundDetail, roundSummaries } from '../views/rounds.ts';
import { decisionViews } from '../views/decisions.ts';
import { lastDecisionBefore } from '../views/workbench.ts';

/** "meets" or "below" the criterion, with the criterion and its source, for checklist text. */
function criterionNote(summary: RoundSummary, criterion: ReliabilityCriterion): string {
  return `${summary.meetsCriterion ? 'meets' : 'below'} the ${fmt(criterion.minimum, 2)} criterion for ${criterion.useName}, ${criterion.citation}`;
}

function plural(n: number, one: string, many = `${one}s`): string {
  return `${n} ${n === 1 ? one : many}`;
}

function checklist(study: Study): ChecklistItem[] {
  const pilot = currentPilotDataset(study);
  const rounds = roundSummaries(study);
  const last = rounds.at(-1);
  const decisions = decisionViews(study);
  const out: ChecklistItem[] = [];

  out.push({
    id: 'round-on-current-data',
    label: 'At least one round on the current pilot data',
    met: last?.onCurrentData === true,
    detail: !pilot
      ? 'no pilot data imported yet'
      : !last
        ? 'no round yet'
        : last.onCurrentData
          ? `round ${last.number} on "${last.datasetName}": ${last.n} respondents analysed after ${plural(last.excluded, 'exclusion')}`
          : `round ${last.number} is out of date: ${last.outOfDate}; run a new round`,
  });

  const lastRound = listRounds(study).at(-1);
  const after = lastRound ? decisions.filter((d) => d.id > lastDecisionBefore(study, lastRound)) : [];
  const changing = after.filter((d) => d.action !== 'keep');
  out.push({
    id: 'final-round-current',
    label: 'The final round includes every drop, move and restore',
    met: last !== undefined && changing.length === 0,
    detail: !last
      ? 'no round yet'
      : changing.length === 0
        ? `round ${last.number} reflects every decision`
        : `${plural(changing.length, 'decision')} since round ${last.number} (${changing.map((d) => `${d.action} ${d.itemCode}`).join(', ')}): run round ${last.number + 1}`,
  });

  const standingDrops = decisions.filter((d) => d.action === 'drop' && d.inForce);
  const statisticsOnly = standingDrops.filter((d) => d.statisticsOnly);
  out.push({
    id: 'drops-have-domain-rationale',
    label: 'Every dropped item has a reason about the construct’s domain',
    met: statisticsOnly.length === 0,
    detail:
      standingDrops.length === 0
        ? 'no item dropped'
        : statisticsOnly.length === 0
          ? `${plural(standingDrops.length, 'item')} dropped, each with a domain rationale`
          : `dropped on statistics only: ${statisticsOnly.map((d) => `${d.itemCode} (round ${d.roundNumber})`).join(', ')}; restore and drop again with the domain reason, or keep the item`,
  });

  out.push({
    id: 'alpha-with-ci',
    label: 'The final round reports alpha with its confidence interval',
    met: last !== undefined,
    detail: last
      ? `α = ${fmt(last.alpha, 3)} (${criterionNote(last, criterionFor(study))}), ${Math.round(last.ci.level * 100)}% CI ${fmt(last.ci.lower, 3)} to ${fmt(last.ci.upper, 3)} (Feldt), n = ${last.n}, ${last.missing} deletion`
      : 'no round yet',
  });

  if (lastRound && last) {
    const detail = roundDetail(study, lastRound.id);
    const undecided = detail.rows
      .filter((row) => row.flags.length > 0 && !row.droppedNow)
      .filter((row) => !decisions.some((d) => d.itemId === row.itemId))
      .map((row) => row.code);
    out.push({
      id: 'flagged-items-decided',
      label: 'Every item flagged in the final round has a decision',
      met: undecided.length === 0,
      detail:
        undecided.length === 0
          ? 'each flagged item was kept, moved or dropped with a reason'
          : `no decision yet on ${undecided.join(', ')}`,
    });
    const thin = detail.facets.filter((f) => f.items.length < ROUND_RULES.minItemsPerFacet);
    out.push({
      id: 'facets-keep-items',
      label: `Every facet keeps at least ${ROUND_RULES.minItemsPerFacet} items (common practice)`,
      met: thin.length === 0,
      detail:
        thin.length === 0
          ? detail.facets.map((f) => `${f.name}: ${f.items.length}`).join('; ')
          : thin.map((f) => `${f.name}: ${plural(f.items.length, 'item')}`).join('; '),
    });
  } else {
    out.push({
      id: 'flagged-items-decided',
      label: 'Every item flagged in the final round has a decision',
      met: false,
      detail: 'no round yet',
    });
  }
  return out;
}

export const purificationRules: PhaseRules = {
  id: PHASE,
  purpose: 'Analyse items and reliability in rounds; keep, move or drop items with reasons.',
  holds(study) {
    const rounds = roundSummaries(study);
    const last = rounds.at(-1);
    if (!last) return [];
    const dropped = decisionViews(study).filter((d) => d.action === 'drop' && d.inForce).length;
    const retained = currentPilotDataset(study) ? workingSet(study).items.length : last.k;
    return [
      plural(rounds.length, 'round'),
      `α = ${fmt(last.alpha, 2)} in round ${last.number} (${last.meetsCriterion ? 'meets' : 'below'} the ${fmt(criterionFor(study).minimum, 2)} criterion)`,
      `${plural(retained, 'item')} retained`,
      ...(dropped > 0 ? [`${dropped} dropped`] : []),
    ];
  },
  checklist,
};
