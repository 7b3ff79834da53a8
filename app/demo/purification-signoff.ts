import type { Study } from '../../db/study.ts';
import { signOffPhase } from '../phases/index.ts';
import { decideItems, roundDetail, roundSummaries } from '../phases/purification.ts';

/**
 * Finishes the demo's purification: the items the final round flags only for a ceiling (many
 * respondents at the top category, expected for a confidence scale in a population that rides) are
 * kept with their reasons, and the phase is signed off. Items flagged for anything else would stop
 * the demo here, since the demo has a reason only for ceilings.
 */
export function finishDemoPurification(study: Study): void {
  const last = roundSummaries(study).at(-1);
  if (!last) throw new Error('the demo has no purification round to finish');
  const flagged = roundDetail(study, last.id).rows.filter((r) => r.flags.length > 0 && !r.droppedNow);
  const other = flagged.filter((r) => r.flags.some((f) => f.rule !== 'ceiling'));
  if (other.length > 0)
    throw new Error(`demo items flagged for more than a ceiling: ${other.map((r) => r.code).join(', ')}`);
  if (flagged.length > 0) {
    decideItems(study, {
      roundId: last.id,
      itemCodes: flagged.map((r) => r.code),
      action: 'keep',
      domainRationale:
        'Each item describes a situation central to its facet; many riders in this population are very confident in it, which the construct expects (demo).',
      statisticalRationale: `Flagged only for a ceiling in round ${last.number}; their item-total correlations hold and alpha would not rise without them (demo).`,
    });
  }
  signOffPhase(
    study,
    'purification',
    `Round ${last.number} is final: the off-domain item is out, the ceiling items are kept with reasons, and every facet keeps enough items (demo).`,
  );
}
