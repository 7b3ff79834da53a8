/**
 * The purification phase: rounds of item analysis on the pilot data, the researcher's decisions on
 * items and facets, and what the workbench reads. `rules/` holds the flags and the checklist,
 * `actions/` every write (each with its logged decision), `views/` the read models.
 */
export * from './actions/decisions.ts';
export * from './actions/facets.ts';
export * from './actions/rounds.ts';
export * from './rules/checklist.ts';
export * from './rules/factor.ts';
export * from './rules/flags.ts';
export type { ItemStanding } from './standing.ts';
export * from './views/decisions.ts';
export * from './views/factor.ts';
export * from './views/rounds.ts';
export * from './views/workbench.ts';
