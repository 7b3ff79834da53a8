import type { PhaseRules } from '../types.ts';

/**
 * The appendix phase: the methods appendix is rendered from the study file whenever it is asked for
 * (app/export/appendix), so the phase stores nothing of its own; signing it off records that the
 * researcher read the appendix of the finished study.
 */
export const appendixRules: PhaseRules = {
  id: 'appendix',
  purpose: 'Render the methods appendix from the study file: Markdown, HTML, Word or PDF.',
  holds: () => [],
  checklist: () => [],
};
