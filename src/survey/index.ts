/** The survey loader: survey files in, checked `Survey` values (src/model/) out. */
export { loadSurveyFile, loadSurveyFileWithText, loadSurveyText, parseSurveyObject } from './load.js';
export { describeSurvey } from './describe.js';
export { compileExpression } from './expressions.js';
export { readPlanSection } from './plan-section.js';
