import type { RegistryEntry } from './types.ts';
import { NUNNALLY_BERNSTEIN_1994 } from './references.ts';

/**
 * Reliability criteria that depend on what the scores will be used for. One criterion applies to a
 * study, chosen from the intended use stated in the construct phase; the screens and the command
 * line show it with its source beside each alpha, as a point of reference rather than a verdict.
 */
export const CRITERIA_METHODS: RegistryEntry[] = [
  {
    kind: 'rule',
    id: 'reliability.criterion.early-research',
    name: 'Reliability for early-stage research',
    wording:
      'In the early stages of research on a construct, a reliability of about .70 is enough; more would spend effort better put into the construct itself.',
    thresholds: { minimum: 0.7 },
    references: [NUNNALLY_BERNSTEIN_1994],
  },
  {
    kind: 'rule',
    id: 'reliability.criterion.basic-research',
    name: 'Reliability for basic research',
    wording:
      'For basic research, where scores describe and compare groups, a reliability of .80 is the aim; beyond it, gains attenuate correlations little.',
    thresholds: { minimum: 0.8 },
    references: [NUNNALLY_BERNSTEIN_1994],
  },
  {
    kind: 'rule',
    id: 'reliability.criterion.individual-decisions',
    name: 'Reliability where scores inform decisions about individuals',
    wording:
      'Where scores inform important decisions about individuals, a reliability of .90 is the least to accept and .95 the desirable standard.',
    thresholds: { minimum: 0.9, desirable: 0.95 },
    references: [NUNNALLY_BERNSTEIN_1994],
  },
];
