import { DEMO_TITLE, type DemoStage, fillDemoStudy } from '../../app/demo/index.ts';
import { Study } from '../../db/study.ts';
import { TEST_ACTOR } from './tmp.ts';

/**
 * Creates a demo study in-process, worked up to `through`: `purification` leaves purification open
 * and the validity phase untouched (no validation data yet), for tests of what comes before it.
 */
export function createDemo(file: string, through: DemoStage = 'validity'): void {
  Study.create(
    file,
    { actor: TEST_ACTOR, app: 'test' },
    { title: DEMO_TITLE, init: (study) => fillDemoStudy(study, through) },
  ).close();
}
