/**
 * Long jobs as the progress bar sees them.
 * Declared for the interface, which imports these from here and nothing else of the main side.
 */
export type { TaskStatus } from '../../workers/tasks.ts';
