/**
 * The decision log screen: log rows and what a verification found.
 * Declared for the interface, which imports these from here and nothing else of the main side.
 */
export type { LogEntry } from '../../../db/decision-log.ts';
export type { IntegrityBreak, VerifyReport } from '../../../db/verify.ts';
