/** What the history screens receive: an item's life story, a stored analysis run, a re-run. */
export type {
  FieldDifference,
  FullVerifyReport,
  ItemStory,
  RerunStatus,
  RunCheck,
  RunView,
  StoryFigure,
  StoryStage,
  StoryStep,
} from '../../phases/history/index.ts';
export type { LogEntry } from '../../../db/decision-log.ts';
