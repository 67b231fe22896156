/**
 * skytally as a library: everything the command line does, as functions of plain values. Load a
 * survey, then predict, forecast, plan, compare, tabulate distances and clustering, draw figures
 * (SVG strings) and build the HTML report. Units are in the names; every result has the type of
 * its JSON output (src/model/outputs/, generated from specs/).
 *
 *   import { loadSurveyFile, predict } from 'skytally';
 *   const p = predict(loadSurveyFile('samples/halpha-narrowband.yaml'));
 *   console.log(p.totals.count);
 *
 * The command line (src/cli/) is a thin layer over these and is not part of this surface.
 */

// The domain model.
export type { Survey, InputFile } from './model/survey.js';
export type { Cosmology, BackgroundCosmology } from './model/cosmology.js';
export type { Detection, DetectionKind, Completeness, Filter, TransmissionTable } from './model/detection.js';
export type { Population, SfrConversion, ComponentParams, ParameterName } from './model/population.js';
export type { ZParam } from './model/zparam.js';
export { populationByName, choosePopulation, surveyForPopulation } from './model/select.js';
export { FULL_SKY_DEG2, SR_PER_DEG2 } from './model/sky.js';

// Every output's type.
export type * from './model/outputs/prediction.js';
export type * from './model/outputs/forecast.js';
export type * from './model/outputs/plan.js';
export type * from './model/outputs/compare.js';
export type * from './model/outputs/distances.js';
export type * from './model/outputs/clustering.js';
export type * from './model/outputs/check.js';
export type * from './model/outputs/report.js';
export type * from './model/outputs/shared.js';
export type { Warning, WarningCode } from './warnings.js';
export { WARNING_CODES } from './warnings.js';
export { SurveyError, type ErrorCode } from './errors.js';

// Loading survey files.
export { loadSurveyFile, loadSurveyText, parseSurveyObject } from './survey/load.js';
export { describeSurvey } from './survey/describe.js';

// Computations.
export { predict, type PredictOptions } from './counts/predict.js';
export { forecast, type ForecastOptions } from './forecast/forecast.js';
export { plan } from './library/plan.js';
export type { PlanOptions } from './planning/plan.js';
export { compare, type CompareOptions } from './planning/compare.js';
export { distanceTable } from './cosmology/table.js';
export { clusteringTable } from './uncertainty/table.js';
export type { TransferForm } from './uncertainty/power-spectrum.js';

// Presentation: figures (SVG strings), the report (an HTML string), tables and CSV.
export { drawFigures } from './render/draw.js';
export { forecastFigure, planFigure, renderSvg } from './render/figures.js';
export type { Figure } from './render/types.js';
export { buildReport, type BuildReportOptions } from './library/report.js';
export { explorePage } from './library/explore/page.js';
export { exploreControls, settingsText, exposureDesign } from './library/explore/settings.js';
export { exploreCompute } from './library/explore/engine.js';
export type { ControlSpec, ExposureControl, ExploreResult, ExploreOutput, ExploreSliceRow } from './model/explore.js';
export { predictionTable, predictionCsv } from './render/predict-table.js';
export { forecastTable, forecastCsv } from './render/forecast-table.js';
export { planTable, planCsv } from './render/plan-table.js';
export { compareTable, compareCsv } from './render/compare-table.js';

// Cosmology and the Schechter function on their own.
export { FlatCosmology, type FlatCosmologyParams } from './cosmology/flat-cosmology.js';
export {
  resolveCosmology,
  resolveBackground,
  COSMOLOGY_DEFAULTS,
  type CosmologyInput,
} from './cosmology/parameters.js';
export { PRESETS, type CosmologyPreset } from './cosmology/presets.js';
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
