import { z } from 'zod';
import { itemStory, logRow, rerunOne, runView, storyItems } from '../../phases/history/index.ts';
import { command } from '../define.ts';
import { id, text } from './schemas.ts';

/** The study's history: an item's life story, and the stored analysis runs decisions rest on. */
export const historyCommands = {
  'history.items': command(z.object({}), (s) => storyItems(s.study)),
  'history.itemStory': command(z.object({ code: text(20).trim().min(1, 'name an item code') }), (s, input) =>
    itemStory(s.study, input.code),
  ),
  'history.row': command(z.object({ seq: id }), (s, input) => logRow(s.study, input.seq)),
  'history.run': command(z.object({ id }), (s, input) => runView(s.study, input.id)),
  /** Re-runs one stored analysis from its stored inputs and compares the results. */
  'history.rerun': command(z.object({ id }), (s, input) => rerunOne(s.study, input.id)),
};
