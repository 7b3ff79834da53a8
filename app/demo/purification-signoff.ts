import type { Study } from '../../db/study.ts';
import { signOffPhase } from '../phases/index.ts';
import { decideItem, decideItems, roundDetail, roundSummaries } from '../phases/purification/index.ts';
import { DEMO_DOUBLE_NEGATIVE_ITEM } from './pilot.ts';

/**
 * Finishes the demo's purification: the items the final round flags only for a ceiling (many
 * respondents at the top category, expected for a confidence scale in a population that rides) are
 * kept with their reasons; the double-negative item, whose primary loading the factor analysis finds
 * a little below the common-practice .40 (some respondents misread it), is kept with its own reason
 * and a rewording planned; and the phase is signed off. Any other flag would stop the demo here,
 * since the demo has reasons only for these.
 */
export function finishDemoPurification(study: Study): void {
  const last = roundSummaries(study).at(-1);
  if (!last) throw new Error('the demo has no purification round to finish');
  const rows = roundDetail(study, last.id).rows.filter((r) => r.flags.length > 0 && !r.droppedNow);
  const misread = rows.find(
    (r) => r.code === DEMO_DOUBLE_NEGATIVE_ITEM && r.flags.every((f) => f.rule === 'low-primary'),
  );
  const flagged = rows.filter((r) => r !== misread);
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
  if (misread) {
    decideItem(study, {
      roundId: last.id,
      itemCode: misread.code,
      action: 'keep',
      domainRationale:
        'Riding past a row of parked cars is a situation central to traffic confidence; its double negative is to be reworded before the next wave, not the situation removed (demo).',
      statisticalRationale: `In round ${last.number}’s factor analysis its ${misread.flags.map((f) => f.text).join('; ')}, just below the common-practice .40; its facet keeps its reliability with it (demo).`,
    });
  }
  signOffPhase(
    study,
    'purification',
    `Round ${last.number} is final: the off-domain and cross-loading items are out, the ceiling items and the double-negative item are kept with reasons, and every facet keeps enough items (demo).`,
  );
}
