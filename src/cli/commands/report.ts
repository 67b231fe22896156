import { readFileSync } from 'node:fs';
import { basename, resolve } from 'node:path';
import type { CommandDef } from './types.js';
import { loadSurveyArg } from './common.js';
import { writeAtomic, type CliIO } from '../io.js';
import { inputError } from '../../errors.js';
import type { Survey } from '../../survey/types.js';
import type { ForecastJson, PlanJson } from '../../render/types.js';

export interface ReportOptions {
  out?: string;
  figures?: string;
}

/**
 * The forecast and plan sections: hooks that take the survey and return the result object the
 * figure and report layer reads (adapt a forecast or plan result with forecastForFigures /
 * planForFigures from src/render/adapt.ts), or undefined when the section does not apply.
 * `plan` is called only when the survey file has a `plan:` section.
 */
export interface ReportSections {
  forecast?(survey: Survey): Promise<ForecastJson | undefined>;
  plan?(survey: Survey): Promise<PlanJson | undefined>;
}

/**
 * The sections the `report` command computes. The forecast (issue 4) and plan (issue 5) layers
 * join here when they land on main: forecast always (with --mocks N), plan when the file has a
 * `plan:` section. Until then the report holds the prediction only; no number is made up.
 */
export function reportSections(_opts: ReportOptions): ReportSections {
  return {};
}

/** True when the survey file as written has a `plan:` section. */
export function hasPlanSection(survey: Survey): boolean {
  const raw = survey.raw as { plan?: unknown } | null | undefined;
  return raw !== null && typeof raw === 'object' && raw.plan !== undefined && raw.plan !== null;
}

/** Build the whole report document for a survey file (as written) and its loaded survey. */
export async function buildReport(
  file: string,
  surveyText: string,
  survey: Survey,
  sections: ReportSections = {},
): Promise<{ html: string; figures: import('../../render/types.js').Figure[] }> {
  const { predict } = await import('../../counts/predict.js');
  const { drawFigures, predictionViews } = await import('../draw.js');
  const { renderReport } = await import('../../render/report.js');
  const prediction = predict(survey);
  const forecast = sections.forecast ? await sections.forecast(survey) : undefined;
  const plan = sections.plan && hasPlanSection(survey) ? await sections.plan(survey) : undefined;
  const extra: { forecast?: ForecastJson; plan?: PlanJson } = {};
  if (forecast) extra.forecast = forecast;
  if (plan) extra.plan = plan;
  const figures = await drawFigures(survey, prediction, extra);
  const { combined } = predictionViews(survey, prediction);
  const html = renderReport({
    surveyText,
    surveyTitle: survey.title,
    surveyFile: basename(file),
    prediction: combined,
    ...extra,
    figures,
  });
  return { html, figures };
}

export const reportCommand: CommandDef = {
  name: 'report',
  description: 'one self-contained HTML report: the survey, the assumed model, the tables and the figures',
  configure(cmd) {
    cmd.argument('<survey>', 'survey file (YAML)');
    cmd.option('--out <file>', 'write the HTML to this file (atomically) instead of stdout');
    cmd.option('--figures <dir>', 'also write each figure as DIR/<name>.svg (and .png when the rasteriser loads)');
  },
  async action(cmd, args, io) {
    const file = args[0] as string;
    const opts = cmd.opts() as ReportOptions;
    return runReport(io, file, opts);
  },
};

export async function runReport(io: CliIO, file: string, opts: ReportOptions, sections: ReportSections = reportSections(opts)): Promise<number> {
  const input = resolve(io.cwd, file);
  const target = opts.out === undefined ? undefined : resolve(io.cwd, opts.out);
  if (target === input) {
    throw inputError('output_exists', '', '--out', `the output file ${opts.out} is the survey file`, 'choose another --out path');
  }
  const { checkFiguresDir, saveFigures } = await import('../draw.js');
  const figuresDir = opts.figures === undefined ? undefined : checkFiguresDir(io, opts.figures);
  const survey = await loadSurveyArg(io, file);
  // The file as written (the loader has just read it; it is at most 1 MiB).
  const surveyText = readFileSync(input, 'utf8');
  const { html, figures } = await buildReport(file, surveyText, survey, sections);
  if (figuresDir) await saveFigures(io, figuresDir, figures);
  if (target) writeAtomic(target, html);
  else io.stdout(html);
  return 0;
}
