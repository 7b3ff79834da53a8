/** The construct phase: its rules (checklist, gates), its actions (each write with its decision) and its views. */
export * from './actions.ts';
export * from './rules.ts';
export * from './views.ts';
