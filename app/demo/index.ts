import { signOffPhase } from '../phases/index.ts';
import type { Study } from '../../db/study.ts';
import { fillDemoConstruct } from './construct.ts';
import { fillDemoItems } from './items.ts';
import { fillDemoPilot } from './pilot.ts';
import { fillDemoPurification } from './purification.ts';
import { fillDemoReview } from './review.ts';

/** The demo's log rows are signed by the generator, not by the person who ran it. */
export const DEMO_AUTHOR = 'Demo generator';

export const DEMO_TITLE = 'Everyday Cycling Confidence — development study (demo)';

/**
 * Fills a new study with the invented demo, every available phase worked. Deterministic: the
 * same code always writes the same study content (timestamps aside).
 */
export function fillDemoStudy(study: Study): void {
  const researcher = study.actor;
  study.actor = { user: researcher.user, name: DEMO_AUTHOR };
  try {
    fillDemoConstruct(study);
    signOffPhase(
      study,
      'construct',
      'Definition, facets and planned relations agreed by the project team (demo).',
    );
    fillDemoItems(study);
    fillDemoReview(study);
    fillDemoPilot(study);
    fillDemoPurification(study);
  } finally {
    study.actor = researcher;
  }
}
