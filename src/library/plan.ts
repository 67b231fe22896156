/**
 * plan: a plan file (a survey file plus a `plan:` section) in, the designs that spend its time
 * budget and the best of them out (specs/plan.schema.json). The loader reads the section for the
 * population of interest (src/survey/plan-section.ts); the search is src/planning/plan.ts.
 */
import type { Survey } from '../model/survey.js';
import { choosePopulation } from '../model/select.js';
import { readPlanSection } from '../survey/plan-section.js';
import { planDesigns, type PlanOptions } from '../planning/plan.js';
import type { Plan } from '../model/outputs/plan.js';
import { checkOptions, checkSurvey } from '../model/arguments.js';

export async function plan(survey: Survey, opts: PlanOptions = {}): Promise<Plan> {
  checkSurvey(survey, 'plan');
  checkOptions(opts, 'plan', '{ population: "H-alpha emitters" }');
  const population = choosePopulation(survey, opts.population);
  return planDesigns(survey, population, readPlanSection(survey, population), opts);
}
