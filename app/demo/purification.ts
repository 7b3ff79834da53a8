import type { Study } from '../../db/study.ts';
import { decideItem, roundDetail, runRound } from '../phases/purification/index.ts';
import { DEMO_OFF_DOMAIN_ITEM } from './items.ts';
import { DEMO_CROSS_LOADING_ITEM } from './pilot.ts';

/** Bootstrap of the demo's rounds: resamples, and a seed per round so the demo always repeats. */
export const DEMO_PURIFICATION_RESAMPLES = 1_000;
export const DEMO_PURIFICATION_SEEDS = [20260501, 20260502] as const;

function three(x: number | null): string {
  return x === null ? 'not defined' : x.toFixed(3).replace(/^(-?)0\./, '$1.');
}

/**
 * The demo's purification: round 1 on every item the pilot data maps (with its factor analysis at the
 * default settings: as many factors as facets), the off-domain item dropped with a reason about the
 * domain and one about the statistics (taken from round 1's own numbers), the planted cross-loading
 * item dropped with the loadings the factor analysis found, and round 2 on the items that remain.
 * The phase is left open for the researcher.
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
  const cross = roundDetail(study, first.id).factor?.solution?.rows.find(
    (r) => r.code === DEMO_CROSS_LOADING_ITEM,
  );
  const crossFlag = cross?.flags.find((f) => f.rule === 'cross-loading');
  if (!cross || !crossFlag) {
    throw new Error(`demo item ${DEMO_CROSS_LOADING_ITEM} is not flagged as cross-loading in round 1`);
  }
  decideItem(study, {
    roundId: first.id,
    itemCode: DEMO_CROSS_LOADING_ITEM,
    action: 'drop',
    domainRationale:
      'Getting home after a breakdown depends as much on finding another way as on fixing the bike; the item mixes two facets, so neither facet’s score would mean what its definition says (demo).',
    statisticalRationale: `In round 1’s factor analysis (${cross.loadings.length} factors) it ${crossFlag.text} (n = ${first.n}).`,
  });
  runRound(study, {
    bootstrap: { resamples: DEMO_PURIFICATION_RESAMPLES, seed: DEMO_PURIFICATION_SEEDS[1] },
  });
}
