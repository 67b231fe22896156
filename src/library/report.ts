/**
 * The report, assembled from the library alone: predict, then the forecast section and (for a
 * file with a `plan:` section) the plan section, each as its command computes it or replaced by
 * one sentence saying why it cannot be made; then the JSON document (specs/report.schema.json)
 * or the figures and the HTML document (src/render/report.ts). The `report` command
 * (src/cli/commands/report.ts) only parses its options and writes the result.
 */
import { basename } from 'node:path';
import { assertWholeOption, SurveyError } from '../errors.js';
import type { Survey } from '../model/survey.js';
import type { Prediction } from '../model/outputs/prediction.js';
import type { Forecast } from '../model/outputs/forecast.js';
import type { Plan } from '../model/outputs/plan.js';
import type { OmittedSection, ReportJson } from '../model/outputs/report.js';
import type { Figure } from '../render/types.js';
import { mergeWarnings, type Warning } from '../warnings.js';
import { DEFAULT_MODEL_DRAWS, DEFAULT_MODEL_SEED, MAX_MODEL_DRAWS } from '../model/model-uncertainty.js';
import { MAX_MOCKS, MAX_SEED } from '../model/limits.js';
import { checkOptions, checkSurvey } from '../model/arguments.js';

export type { OmittedSection };

export type SectionResult<T> = T | OmittedSection | undefined;

export function isOmitted(x: unknown): x is OmittedSection {
  return typeof x === 'object' && x !== null && typeof (x as { omitted?: unknown }).omitted === 'string';
}

/**
 * The forecast and plan sections: hooks that take the survey and return the result of the
 * forecast or plan (as the `forecast` and `plan` commands compute it; the report draws and
 * tabulates it, and writes it whole in its JSON form),
 * `{omitted: sentence}` when the section cannot be computed for this survey (the report says why
 * instead), or undefined when it does not apply. `plan` is called only when the survey file has
 * a `plan:` section.
 */
export interface ReportSections {
  forecast?(survey: Survey): Promise<SectionResult<Forecast>>;
  plan?(survey: Survey): Promise<SectionResult<Plan>>;
}

/**
 * Why a section that varies phi*, L* (or M*) and alpha of a single Schechter function cannot be
 * made for this survey's first population, as one sentence; undefined when it can.
 */
function shapeObstacle(survey: Survey, what: 'forecast' | 'plan'): string | undefined {
  const p = survey.populations[0]!;
  if (p.shape === 'schechter') return undefined;
  const shape = 'a double Schechter function';
  const who = survey.populations.length > 1 ? `the first population, "${p.name}",` : `the population "${p.name}"`;
  const head =
    what === 'forecast'
      ? `No forecast: a forecast varies phi*, L* (or M*) and alpha of a single Schechter function, and ${who} is ${shape}`
      : `No plan: a plan weighs designs by the counts and Fisher matrix of a single Schechter function, and ${who} is ${shape}`;
  const other = survey.populations.find((q) => q.shape === 'schechter');
  return other
    ? `${head}; \`skytally ${what} FILE --population "${other.name}"\` makes one for a single-Schechter population of the file.`
    : `${head}.`;
}

/** A SurveyError met while computing a section that was well formed: its sentence, prefixed. */
function computeFailure(what: 'forecast' | 'plan', e: unknown): OmittedSection {
  if (e instanceof SurveyError)
    return { omitted: `No ${what}: it cannot be computed for this survey (${e.message.replace(/\.$/, '')}).` };
  throw e;
}

/** What the forecast section of a report draws (plain numbers, as `forecast` takes them). */
export interface SectionOptions {
  /** Mock surveys for the forecast (default 0: the Fisher matrix only). */
  mocks?: number;
  /** Seed of the mock surveys and of the model's draws (default 1, as `predict` and `forecast`). */
  seed?: number;
  /**
   * Draws of the population's model_uncertainty (default 1000, as `predict --draws`): the
   * prediction's model percentiles and, when the forecast's population has model_uncertainty, the
   * spread of its Fisher sigmas across the model (as `forecast --model-draws N --seed S`).
   */
  draws?: number;
  /** Called as the mock surveys are drawn. */
  onProgress?: (done: number, total: number) => void;
}

/**
 * The options refused as `report` refuses its flags (--mocks, --seed, --draws): a count that is
 * not a whole number in range would otherwise reach the forecast, whose refusal the report shows
 * as a forecast that "cannot be computed for this survey".
 */
function checkSectionOptions(opts: SectionOptions): void {
  assertWholeOption(opts.mocks, 'mocks', 0, MAX_MOCKS);
  assertWholeOption(opts.seed, 'seed', 0, MAX_SEED);
  assertWholeOption(opts.draws, 'draws', 0, MAX_MODEL_DRAWS);
}

/**
 * The sections the `report` command computes: the forecast always (the Fisher matrix; mock
 * surveys too with --mocks N, fitted and scattered over the ellipses), the plan when the file
 * has a `plan:` section. A section that cannot be computed for this survey (a double Schechter
 * population for the forecast; a threshold survey, whose limit no exposure time sets, for the
 * plan) is replaced by a sentence saying why; a malformed plan section is still bad input.
 */
export function reportSections(opts: SectionOptions = {}): ReportSections {
  checkSectionOptions(opts);
  const mocks = opts.mocks ?? 0;
  const seed = opts.seed ?? DEFAULT_MODEL_SEED;
  const draws = opts.draws ?? DEFAULT_MODEL_DRAWS;
  return {
    forecast: async (survey) => {
      const why = shapeObstacle(survey, 'forecast');
      if (why) return { omitted: why };
      const { forecast } = await import('../forecast/forecast.js');
      let result;
      try {
        result = await forecast(survey, {
          mocks,
          seed,
          keepFits: true,
          // the sigmas across the model, as forecast --model-draws computes them (same draws, same seed)
          ...(survey.populations[0]!.modelUncertainty ? { modelDraws: draws } : {}),
          ...(mocks > 0 && opts.onProgress ? { onProgress: opts.onProgress } : {}),
        });
      } catch (e) {
        return computeFailure('forecast', e);
      }
      return result;
    },
    plan: async (survey) => {
      const { planDesigns } = await import('../planning/plan.js');
      const { readPlanSection } = await import('../survey/plan-section.js');
      // The section as written is checked first: a malformed section is bad input (exit 2).
      // Only what makes a well-formed plan impossible for this survey becomes a sentence.
      let spec;
      try {
        spec = readPlanSection(survey, survey.populations[0]!);
      } catch (e) {
        if (e instanceof SurveyError && e.code === 'kind_mismatch' && survey.detection.kind === 'threshold') {
          return {
            omitted:
              'No plan: a plan turns exposure time into a detection limit, but this survey selects its sources by a threshold in a quantity (detection.kind: threshold), which no exposure time sets.',
          };
        }
        throw e;
      }
      const why = shapeObstacle(survey, 'plan');
      if (why) return { omitted: why };
      let result;
      try {
        result = await planDesigns(survey, survey.populations[0]!, spec);
      } catch (e) {
        return computeFailure('plan', e);
      }
      return result;
    },
  };
}

/** True when the survey file as written has a `plan:` section. */
export function hasPlanSection(survey: Survey): boolean {
  const raw = survey.raw as { plan?: unknown } | null | undefined;
  return raw !== null && typeof raw === 'object' && raw.plan !== undefined && raw.plan !== null;
}

/** What the report computes: the prediction, and the forecast and plan sections. */
export interface ReportResults {
  file: string;
  survey: Survey;
  prediction: Prediction;
  forecast: SectionResult<Forecast>;
  plan: SectionResult<Plan>;
  /** Every section's warnings, each once. */
  warnings: Warning[];
  /** Seed of the model's draws (the figures' model bands draw with it). */
  modelSeed: number;
}

/** The draws of the population's model_uncertainty the report's prediction makes (as `predict --draws N --seed S`). */
export interface ReportModelDraws {
  /** Number of draws (default 1000). */
  draws?: number;
  /** Their seed (default 1). */
  seed?: number;
}

/** Compute every section of the report (nothing is drawn). */
export async function computeReport(
  file: string,
  survey: Survey,
  sections: ReportSections = {},
  model: ReportModelDraws = {},
): Promise<ReportResults> {
  const { predict } = await import('../counts/predict.js');
  const modelSeed = model.seed ?? DEFAULT_MODEL_SEED;
  const prediction = predict(survey, {
    model: { ...(model.draws !== undefined ? { draws: model.draws } : {}), seed: modelSeed },
  });
  const forecast = sections.forecast ? await sections.forecast(survey) : undefined;
  const plan = sections.plan && hasPlanSection(survey) ? await sections.plan(survey) : undefined;
  const sectionWarnings = (x: SectionResult<Forecast | Plan>) => (x && !isOmitted(x) ? x.warnings : undefined);
  const warnings = mergeWarnings(prediction.warnings, sectionWarnings(forecast), sectionWarnings(plan));
  return { file, survey, prediction, forecast, plan, warnings, modelSeed };
}

/** The results as one JSON document (specs/report.schema.json); the forecast's per-mock fits (kept for the figure) are left out. */
export function reportJson(r: ReportResults): ReportJson {
  const forecast: Forecast | OmittedSection = r.forecast ?? { omitted: 'No forecast: none was asked for.' };
  let shownForecast = forecast;
  if (!isOmitted(forecast) && forecast.mocks?.fits) {
    const { fits: _fits, ...mocks } = forecast.mocks;
    shownForecast = { ...forecast, mocks };
  }
  const out: ReportJson = {
    format: 1,
    title: r.survey.title,
    survey_file: basename(r.file),
    prediction: r.prediction,
    forecast: shownForecast,
    warnings: r.warnings,
  };
  if (r.plan) out.plan = r.plan;
  return out;
}

/** The forecast and plan results the figures and tables draw (none for an omitted section). */
function drawnSections(r: ReportResults): { forecast?: Forecast; plan?: Plan } {
  const extra: { forecast?: Forecast; plan?: Plan } = {};
  if (r.forecast && !isOmitted(r.forecast)) extra.forecast = r.forecast;
  if (r.plan && !isOmitted(r.plan)) extra.plan = r.plan;
  return extra;
}

type Views = ReturnType<(typeof import('../render/draw.js'))['predictionViews']>;
const viewsMade = new WeakMap<ReportResults, { of: [Survey, Prediction, number]; views: Views }>();

/**
 * The prediction as the figures and the HTML read it (src/render/draw.ts predictionViews), made
 * once per results: the luminosity function of each slice with its band over the model's draws
 * costs as much as drawing a figure, and the figures and the document read the same views.
 */
async function viewsOf(r: ReportResults): Promise<Views> {
  const made = viewsMade.get(r);
  if (made && made.of[0] === r.survey && made.of[1] === r.prediction && made.of[2] === r.modelSeed) return made.views;
  const { predictionViews } = await import('../render/draw.js');
  const views = predictionViews(r.survey, r.prediction, r.modelSeed);
  viewsMade.set(r, { of: [r.survey, r.prediction, r.modelSeed], views });
  return views;
}

/** Draw every figure of the results. */
export async function reportFigures(r: ReportResults): Promise<Figure[]> {
  const { drawViews } = await import('../render/draw.js');
  return drawViews(r.prediction, await viewsOf(r), drawnSections(r));
}

/** The HTML document of the results (figures already drawn). */
export async function reportHtml(r: ReportResults, surveyText: string, figures: Figure[]): Promise<string> {
  const { renderReport } = await import('../render/report.js');
  const { combined } = await viewsOf(r);
  return renderReport({
    surveyText,
    surveyTitle: r.survey.title,
    surveyFile: basename(r.file),
    prediction: combined,
    ...drawnSections(r),
    ...(isOmitted(r.forecast) ? { forecastOmitted: r.forecast.omitted } : {}),
    ...(isOmitted(r.plan) ? { planOmitted: r.plan.omitted } : {}),
    warnings: r.warnings,
    figures,
  });
}

export interface BuildReportOptions extends SectionOptions {
  /** The survey file as written, shown in the report (default: the file the survey was loaded from, as read by the loader). */
  surveyText?: string;
}

/**
 * The whole report of a survey as one self-contained HTML document: predict, the forecast (with
 * `mocks` mock surveys), the plan of a plan file, every figure and the file as written.
 */
export async function buildReport(
  survey: Survey,
  options: BuildReportOptions = {},
): Promise<{ html: string; figures: Figure[]; results: ReportResults }> {
  checkSurvey(survey, 'buildReport');
  checkOptions(options, 'buildReport', '{ mocks: 100 }');
  // (reportSections checks the options before anything is computed)
  const results = await computeReport(survey.file, survey, reportSections(options), {
    ...(options.draws !== undefined ? { draws: options.draws } : {}),
    ...(options.seed !== undefined ? { seed: options.seed } : {}),
  });
  const figures = await reportFigures(results);
  const surveyText =
    options.surveyText ?? (survey.file ? (await import('../survey/load.js')).readSurveyText(survey.file).text : '');
  return { html: await reportHtml(results, surveyText, figures), figures, results };
}
