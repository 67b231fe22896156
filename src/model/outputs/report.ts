/* Generated from specs/report.schema.json by scripts/generate-output-types.ts: do not edit (run `npx tsx scripts/generate-output-types.ts`). */
import type { Warning } from '../../warnings.js';
import type { Prediction } from './prediction.js';
import type { Forecast } from './forecast.js';
import type { Plan } from './plan.js';

/**
 * The results the HTML report is made of, in one document: the prediction (as predict gives it), the forecast (as forecast gives it, without the per-mock fits) and, when the file has a plan section, the plan (as plan gives it). A section that cannot be made for this survey is {omitted: one sentence saying why}. Every number is finite.
 */
export interface ReportJson {
  format: 1;
  title: string;
  /**
   * The name of the survey file (without its folder).
   */
  survey_file: string;
  prediction: Prediction;
  forecast: Forecast | OmittedSection;
  /**
   * Present only when the survey file has a plan section.
   */
  plan?: Plan | OmittedSection;
  /**
   * Every section's warnings, each once (also printed on stderr, one line each); empty when there is nothing to say.
   */
  warnings: Warning[];
}
export interface OmittedSection {
  /**
   * Why the section cannot be made for this survey, in one sentence.
   */
  omitted: string;
}
