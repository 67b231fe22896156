/** The `report` command: its options, then the report as the library builds it (src/library/report.ts). */
import { resolve } from 'node:path';
import { Option } from 'commander';
import type { CommandDef } from './types.js';
import {
  addNoPngOption,
  modelDrawing,
  noteNoPngWithoutFigures,
  optionNote,
  printWarnings,
  refuseDrawsWithoutModel,
  refuseHtmlOnTerminal,
  unseededModel,
} from './common.js';
import { Outputs, toJsonText, type CliIO } from '../io.js';
import { mockOptions } from './forecast.js';
import { mockProgressBar } from '../progress.js';
import { modelDrawOptions } from './predict.js';
import { DEFAULT_MODEL_DRAWS, MAX_MODEL_DRAWS } from '../../model/model-uncertainty.js';
import type { ReportSections } from '../../library/report.js';

/** The report as HTML (the default) or as JSON: the same sections' results, for scripts. */
export type ReportFormat = 'html' | 'json';
export const REPORT_FORMATS: readonly ReportFormat[] = ['html', 'json'];

export interface ReportOptions {
  out?: string;
  figures?: string;
  /** html (default) or json. */
  format?: ReportFormat;
  /** --mocks N as given on the command line (checked by mockOptions). */
  mocks?: string;
  /** --seed S as given on the command line (the mock surveys' and the model draws'). */
  seed?: string;
  /** --draws N as given on the command line (checked as predict's). */
  draws?: string;
  /** false with --no-png: --figures writes SVG only. */
  png?: boolean;
}

export const reportCommand: CommandDef = {
  name: 'report',
  description:
    'one self-contained HTML report: the survey, the assumed model, the tables and the figures (or, with --format json, the results of every section)',
  configure(cmd) {
    cmd.argument('<survey>', 'survey file (YAML)');
    cmd.addOption(
      new Option(
        '--format <format>',
        'html: the report document; json: the prediction, forecast and plan results in one document (specs/report.schema.json)',
      )
        .choices([...REPORT_FORMATS])
        .default('html'),
    );
    cmd.option('--out <file>', 'write the report to this file (atomically; - for standard output) instead of stdout');
    cmd.option('--figures <dir>', 'also write each figure as DIR/<name>.svg (and .png when the rasteriser loads)');
    addNoPngOption(cmd);
    cmd.option(
      '--mocks <N>',
      'also draw N mock surveys for the forecast, fit each and scatter the fits over the Fisher ellipses',
    );
    cmd.option(
      '--draws <N>',
      `draws of the populations' model_uncertainty, for the prediction and the forecast's sigmas across the model (1 to ${MAX_MODEL_DRAWS}; default ${DEFAULT_MODEL_DRAWS}; refused on a file without model_uncertainty)`,
    );
    cmd.option('--seed <S>', 'seed of the mock surveys and the model draws (integer 0 to 4294967295; default 1)');
  },
  async action(cmd, args, io) {
    const file = args[0] as string;
    const opts = cmd.opts<ReportOptions>();
    return runReport(io, file, opts);
  },
};

/** The sections the command computes: the forecast (with --mocks N mock surveys), and the plan of a plan file. */
export async function commandSections(opts: ReportOptions, io: CliIO): Promise<ReportSections> {
  const { reportSections } = await import('../../library/report.js');
  const { mocks, seed } = mockOptions(opts);
  const { draws } = modelDrawOptions(opts);
  return reportSections({ mocks, seed, draws, ...(io.stderrIsTTY ? { onProgress: mockProgressBar(io) } : {}) });
}

export async function runReport(
  io: CliIO,
  file: string,
  opts: ReportOptions,
  sections?: ReportSections,
): Promise<number> {
  const input = resolve(io.cwd, file);
  if ((opts.format ?? 'html') === 'html')
    refuseHtmlOnTerminal(io, opts.out, 'report', 'the report as one HTML document');
  // the model's draws as predict makes them (--draws N, --seed S), checked before any work
  const model = modelDrawOptions(opts);
  const { computeReport, reportFigures, reportHtml, reportJson } = await import('../../library/report.js');
  const outputs = new Outputs(io, { out: opts.out, figures: opts.figures });
  outputs.refuseInputs([file]);
  const { figureFiles } = await import('../figures.js');
  const { loadSurveyFileWithText } = await import('../../survey/load.js');
  // The survey and the file as written (read once, through the loader's checks).
  const { survey, text: surveyText } = loadSurveyFileWithText(input);
  outputs.refuseInputs(survey.inputs ?? []);
  if (opts.draws !== undefined) refuseDrawsWithoutModel(survey);
  const format: ReportFormat = opts.format ?? 'html';
  const results = await computeReport(file, survey, sections ?? (await commandSections(opts, io)), model);
  printWarnings(io, results.warnings);
  // the seed draws the mock surveys and the model: with neither drawn it changes nothing
  if (opts.seed !== undefined && mockOptions(opts).mocks === 0 && modelDrawing(survey) !== 'seeded')
    optionNote(io, 'report', '--seed', `nothing is drawn at random (no --mocks, and ${unseededModel(survey)})`);
  noteNoPngWithoutFigures(io, 'report', { ...opts });
  // Figures are drawn for the HTML, and for --figures whatever the format.
  const figures = format === 'html' || opts.figures !== undefined ? await reportFigures(results) : [];
  outputs.setMain(format === 'json' ? toJsonText(reportJson(results)) : await reportHtml(results, surveyText, figures));
  if (opts.figures !== undefined) outputs.setFigures(await figureFiles(io, figures, opts.png !== false));
  outputs.commit();
  return 0;
}
