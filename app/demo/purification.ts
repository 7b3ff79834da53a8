import type { Study } from '../../db/study.ts';
import { decideItem, roundDetail, runRound } from '../phases/purification/index.ts';
import { DEMO_OFF_DOMAIN_ITEM } from './items.ts';

/** Bootstrap of the demo's rounds: resamples, and a seed per round so the demo always repeats. */
export const DEMO_PURIFICATION_RESAMPLES = 1_000;
export const DEMO_PURIFICATION_SEEDS = [20260501, 20260502] as const;

function three(x: number | null): string {
  return x === null ? 'not defined' : x.toFixed(3).replace(/^(-?)0\./, '$1.');
}

/**
 * The demo's purification: round 1 on every item the pilot data maps, the off-domain item dropped
 * with a reason about the domain and one about the statistics (taken from round 1's own numbers),
 * and round 2 on the items that remain. The phase is left open for the researcher.
 */
export function fillDemoPurification(study: Study): void {
  const first = runRound(study, {
    bootstrap: { resamples: DEMO_PURIFICATION_RESAMPLES, seed: DEMO_PURIFICATION_SEEDS[0] },
  });
  const rows = roundDetail(study, first.id).rows;
  const row = rows.find((r) => r.code === DEMO_OFF_DOMAIN_ITEM);
  if (!row) throw new Error(`demo item ${DEMO_OFF_DOMAIN_ITEM} is not in purification round 1`);
  const r = row.stats.correctedItemTotal ?? 0;
  const lowest = rows.every((other) => (other.stats.correctedItemTotal ?? 0) >= r);
  decideItem(study, {
    roundId: first.id,
    itemCode: DEMO_OFF_DOMAIN_ITEM,
    action: 'drop',
    domainRationale:
      'The item states an opinion about cars in the city centre, not the respondent’s belief in their own ability to ride among traffic; the construct excludes attitudes and beliefs about the environment (demo).',
    statisticalRationale:
      `Corrected item-total r = ${three(row.stats.correctedItemTotal)}` +
      `${lowest ? `, the lowest of the ${first.k} items` : ''}; ` +
      `alpha would rise from ${three(first.alpha)} to ${three(row.stats.alphaIfDeleted)} without it (round 1, n = ${first.n}).`,
  });
  runRound(study, {
    bootstrap: { resamples: DEMO_PURIFICATION_RESAMPLES, seed: DEMO_PURIFICATION_SEEDS[1] },
  });
}
