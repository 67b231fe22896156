/** The survey loader's public surface. */
export { loadSurveyFile, loadSurveyText, parseSurveyObject } from './load.js';
export { describeSurvey, describeParam } from './describe.js';
export { compileExpression } from './expressions.js';
export { populationByName } from '../model/select.js';
export { readTransmissionFile } from './transmission-file.js';
export { parseQuantity, FULL_SKY_DEG2, SR_PER_DEG2 } from './units.js';
export type * from '../model/survey.js';
