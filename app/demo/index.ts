import { signOffPhase } from '../phases/index.ts';
import type { Study } from '../../db/study.ts';
import { fillDemoConstruct } from './construct.ts';
import { fillDemoItems } from './items.ts';
import { fillDemoPilot } from './pilot.ts';
import { fillDemoPurification } from './purification.ts';
import { finishDemoPurification } from './purification-signoff.ts';
import { fillDemoReview } from './review.ts';
import { fillDemoValidity } from './validity.ts';

/** The demo's log rows are signed by the generator, not by the person who ran it. */
export const DEMO_AUTHOR = 'Demo generator';

export const DEMO_TITLE = 'Everyday Cycling Confidence — development study (demo)';

/**
 * How far the demo goes: `purification` leaves the purification phase open after its two rounds (a
 * study to try rounds on); `validity` (the default) also finishes purification, works the validity
 * phase and signs it off.
 */
export type DemoStage = 'purification' | 'validity';

/**
 * Fills a new study with the invented demo, every available phase worked. Deterministic: the
 * same code always writes the same study content (timestamps aside).
 */
export function fillDemoStudy(study: Study, through: DemoStage = 'validity'): void {
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
    if (through === 'validity') {
      finishDemoPurification(study);
      fillDemoValidity(study);
    }
  } finally {
    study.actor = researcher;
  }
}
