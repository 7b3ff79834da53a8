export { InputsGone, type RerunKind } from './rerun-kind.ts';
export { RERUN_KINDS } from './rerun-kinds.ts';
export {
  checkRun,
  compareResults,
  describeCheck,
  type FieldDifference,
  RERUN_TOLERANCE,
  type RerunReport,
  type RerunStatus,
  type RunCheck,
  rerunStoredRuns,
} from './rerun.ts';
export { type FullVerifyReport, verifyWithReruns } from './verify.ts';
export { type RunView, rerunOne, runView } from './run-view.ts';
export {
  type ItemStory,
  itemStory,
  logRow,
  type StoryFigure,
  type StoryStage,
  type StoryStep,
  storyItems,
} from './story.ts';
