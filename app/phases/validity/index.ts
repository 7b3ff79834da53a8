export { validityRules, acknowledgeSource, acknowledgements } from './rules.ts';
export { setMeasurementModel, modelInForce, type MeasurementModel } from './model.ts';
export { describeMeasure, describeGroups } from './settings.ts';
export {
  type PreparedCfa,
  type PreparedInvariance,
  runCfa,
  prepareCfa,
  storeCfa,
  runInvariance,
  prepareInvariance,
  storeInvariance,
} from './structure.ts';
export { runRelations } from './relations.ts';
export { runRetest } from './retest.ts';
export { validityView, validityRunDetail } from './views.ts';
