import type { z } from 'zod';
import { constructCommands } from './commands/construct.ts';
import { coreCommands } from './commands/core.ts';
import { exportCommands } from './commands/exports.ts';
import { historyCommands } from './commands/history.ts';
import { instrumentCommands } from './commands/instrument.ts';
import { itemsCommands } from './commands/items.ts';
import { pilotCommands } from './commands/pilot.ts';
import { purificationCommands } from './commands/purification.ts';
import { reviewCommands } from './commands/review.ts';
import { studyCommands } from './commands/study.ts';
import { validityCommands } from './commands/validity.ts';

/**
 * Every operation the renderer may call, one table assembled from one file per phase. The same
 * table is served over Electron IPC and over HTTP in browser mode (app/api/dispatch.ts); nothing
 * else crosses from renderer to main.
 */
export const commands = {
  ...coreCommands,
  ...studyCommands,
  ...constructCommands,
  ...itemsCommands,
  ...reviewCommands,
  ...pilotCommands,
  ...purificationCommands,
  ...validityCommands,
  ...exportCommands,
  ...instrumentCommands,
  ...historyCommands,
};

export type Commands = typeof commands;
export type CommandName = keyof Commands;
export type CommandInput<K extends CommandName> = z.input<Commands[K]['input']>;
export type CommandOutput<K extends CommandName> = Awaited<ReturnType<Commands[K]['handler']>>;
