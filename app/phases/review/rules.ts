import { listRounds } from '../../../db/repos/review.ts';
import type { Study } from '../../../db/study.ts';
import { formatRatio, MIN_PANEL_FOR_BENCHMARK } from '../../engine/content.ts';
import type { ChecklistItem, PhaseRules } from '../types.ts';
import { countWord } from './round-data.ts';
import { type RoundItemView, type RoundView, roundView } from './views.ts';

/** For each item, the latest round that rated it, and whether it was flagged there. */
function latestAssessments(study: Study) {
  const out = new Map<string, { round: RoundView; item: RoundItemView }>();
  for (const round of listRounds(study).map((r) => roundView(study, r))) {
    if (!round.report) continue;
    for (const it of round.items)
      if (it.stats?.iCvi !== null && it.stats) out.set(it.code, { round, item: it });
  }
  return out;
}

export const reviewRules: PhaseRules = {
  id: 'review',
  purpose: 'Have experts rate each item; compute content-validity statistics and decide.',
  holds(study) {
    const rounds = listRounds(study).map((r) => roundView(study, r));
    const out = [countWord(rounds.length, 'review round')];
    for (const r of rounds) {
      if (!r.report) continue;
      out.push(
        `round ${r.number}: ${countWord(r.report.experts.length, 'expert')}, ${countWord(r.items.length, 'item')}, S-CVI/Ave ${formatRatio(r.report.sCviAve)}`,
      );
    }
    const decisions = rounds.reduce((n, r) => n + r.items.filter((it) => it.decision).length, 0);
    out.push(countWord(decisions, 'decision'));
    return out;
  },
  checklist(study) {
    const rounds = listRounds(study).map((r) => roundView(study, r));
    const panelSizes = rounds.map((r) => r.report?.experts.length ?? 0);
    const largest = Math.max(0, ...panelSizes);
    const assessed = latestAssessments(study);
    const flagged = [...assessed.values()].filter(({ item }) => (item.stats?.flags.length ?? 0) > 0);
    const undecided = flagged.filter(({ item }) => item.decision === null);
    const lastRated = rounds.filter((r) => r.report).at(-1);
    const unrated = lastRated
      ? lastRated.items.filter((it) => it.stats === null || it.stats.iCvi === null)
      : [];
    const items: ChecklistItem[] = [
      {
        id: 'panel',
        label: `A round has relevance ratings from at least ${MIN_PANEL_FOR_BENCHMARK} experts (the smallest panel with an I-CVI benchmark; Lynn 1986)`,
        met: largest >= MIN_PANEL_FOR_BENCHMARK,
        detail:
          rounds.length === 0
            ? 'no review round yet'
            : largest === 0
              ? 'no ratings yet'
              : `${countWord(largest, 'expert')}`,
      },
      {
        id: 'rated',
        label: 'Every item of the latest rated round has relevance ratings',
        met: lastRated !== undefined && unrated.length === 0,
        detail: !lastRated
          ? 'no ratings yet'
          : unrated.length === 0
            ? `round ${lastRated.number}: all ${lastRated.items.length} rated`
            : `round ${lastRated.number}, not rated: ${unrated.map((it) => it.code).join(', ')}`,
      },
      {
        id: 'decided',
        label:
          'Every item flagged in its latest rating has a decision (keep, revise or retire) with a rationale',
        met: lastRated !== undefined && undecided.length === 0,
        detail: !lastRated
          ? 'no ratings yet'
          : flagged.length === 0
            ? 'no item flagged'
            : undecided.length === 0
              ? `${countWord(flagged.length, 'flagged item')}, all decided`
              : `undecided: ${undecided.map(({ item, round }) => `${item.code} (round ${round.number})`).join(', ')}`,
      },
    ];
    return items;
  },
};
