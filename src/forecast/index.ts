/** Public face of the forecast layer: Fisher matrices, mock surveys and requirements. */
export { forecast, choosePopulation, percentile, summariseSample, CAVEAT, type Forecast, type ForecastOptions, type FisherBlock, type MocksBlock, type MockParameterSummary } from './forecast.js';
export { buildDensityGrid, expectedCounts, type DensityGrid } from './grid.js';
export { fisherParts, fisherFromPoints, marginaliseNormalisations, summariseFisher, type FisherParts, type FisherSummary } from './fisher.js';
export { makeMockSetup, runMocks, runMockRange, type MockSetup, type MockRun } from './mocks.js';
export { fitCatalogue, extendedLogLikelihood, styLogLikelihood, type Estimator, type FitResult } from './fit.js';
export { maximise, type Evaluation, type MaximiseResult } from './optimise.js';
export { requirement, deeperSurvey, FULL_SKY_DEG2, type Requirement } from './requirement.js';
export { parameterNames, type ParameterName } from './parameters.js';
export { cosmicVarianceInput, type CosmicVarianceSource } from './cosmic-variance-input.js';
export { forecastTable, forecastCsv } from '../render/forecast-table.js';
