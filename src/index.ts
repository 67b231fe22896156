/**
 * skytally as a library: load a survey, predict counts, and use the cosmology and Schechter
 * functions directly. Everything here is typed; units are in the names.
 *
 *   import { loadSurveyFile, predict } from 'skytally';
 *   const p = predict(loadSurveyFile('samples/line-search.yaml'));
 *   console.log(p.totals.count);
 */
export type { Survey } from './model/survey.js';
export type { Cosmology } from './model/cosmology.js';
export type { Detection, Completeness, Filter, TransmissionTable } from './model/detection.js';
export type { Population, SfrConversion } from './model/population.js';
export type { ZParam } from './model/zparam.js';
export { SurveyError, type ErrorCode } from './errors.js';
export { loadSurveyFile, loadSurveyText, parseSurveyObject, describeSurvey } from './survey/index.js';
export { populationByName } from './model/select.js';
export {
  predict,
  type Prediction,
  type PredictionSlice,
  type PredictionTotals,
  type PopulationPrediction,
  type ObservedBins,
  type ObservedBin,
  type RedshiftBreakdown,
  type ObservedBreakdown,
  type LuminosityDensity,
  type SfrDensity,
} from './counts/predict.js';
export { countPopulation, type SliceCount, type Histogram } from './counts/engine.js';
export { FlatCosmology } from './cosmology/flat-cosmology.js';
export { PRESETS, type CosmologyPreset } from './cosmology/presets.js';
export { resolveCosmology, resolveBackground, type CosmologyInput } from './cosmology/parameters.js';
export { distanceTable, type DistanceRow, type DistanceTable } from './cosmology/table.js';
export * as constants from './cosmology/constants.js';
export {
  schechterLuminosity,
  schechterMagnitude,
  schechterPerDex,
  numberDensityAbove,
  luminosityDensityAbove,
  totalLuminosityDensity,
  doubleSchechterLuminosity,
  doubleSchechterMagnitude,
  componentsNumberAbove,
  componentsLuminosityAbove,
  componentsTotalLuminosity,
  type SchechterComponent,
} from './population/schechter.js';
export { upperGamma } from './numerics/gamma.js';
export { madau1995Transmission, bandAveragedMadau1995 } from './selection/igm.js';
export { run, type CliIO } from './cli/index.js';
