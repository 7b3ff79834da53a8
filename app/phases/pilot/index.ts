/** The pilot phase: its rules (checklist, gates), its actions (each write with its decision) and its views. */
export * from './choice-actions.ts';
export * from './common.ts';
export * from './import-actions.ts';
export * from './preview.ts';
export * from './rules.ts';
export * from './screening-actions.ts';
export * from './views.ts';
