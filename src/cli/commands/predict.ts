import type { CommandDef } from './types.js';
import {
  addNoPngOption,
  addOutputOptions,
  loadSurveyArg,
  modelDrawing,
  noteNoPngWithoutFigures,
  optionNote,
  optionText,
  outputOptions,
  parseInteger,
  printWarnings,
  refuseDrawsWithoutModel,
  unseededModel,
  wantsPng,
} from './common.js';
import { DEFAULT_MODEL_DRAWS, DEFAULT_MODEL_SEED, MAX_MODEL_DRAWS } from '../../model/model-uncertainty.js';
import { MAX_SEED } from '../../model/limits.js';
import { Outputs, renderText } from '../io.js';

export const predictCommand: CommandDef = {
  name: 'predict',
  description: 'expected counts of detected galaxies per redshift slice, with histograms',
  configure(cmd) {
    cmd.argument('<survey>', 'survey file (YAML)');
    addOutputOptions(cmd);
    cmd.option('--figures <dir>', 'also write each figure as DIR/<name>.svg (and .png when the rasteriser loads)');
    addNoPngOption(cmd);
    cmd.option(
      '--draws <N>',
      `draws of the populations' model_uncertainty (1 to ${MAX_MODEL_DRAWS}; default ${DEFAULT_MODEL_DRAWS}; refused on a file without one)`,
    );
    cmd.option('--seed <S>', 'seed of those draws (integer 0 to 4294967295; default 1)');
  },
  async action(cmd, args, io) {
    const file = args[0] as string;
    const raw = cmd.opts();
    const opts = outputOptions(raw);
    const model = modelDrawOptions(raw);
    const outputs = new Outputs(io, {
      out: opts.out,
      figures: typeof raw.figures === 'string' ? raw.figures : undefined,
    });
    outputs.refuseInputs([file]);
    // Only a command asked to draw loads the figure layer (and, through it, vega).
    const draw =
      typeof raw.figures === 'string'
        ? { ...(await import('../figures.js')), ...(await import('../../render/draw.js')) }
        : undefined;
    const survey = await loadSurveyArg(io, file);
    outputs.refuseInputs(survey.inputs ?? []);
    if (raw.draws !== undefined) refuseDrawsWithoutModel(survey);
    const { predict } = await import('../../counts/predict.js');
    // The table and the CSV show the model's draws of the counts only (slices and totals), the same
    // numbers with or without the rest: the draws of the histograms' bins and of the densities, about
    // a third of a cold predict with model_uncertainty, are made only for the JSON and the figures.
    const countsOnly = opts.format !== 'json' && !draw;
    const p = predict(survey, { model: countsOnly ? { ...model, counts: true } : model });
    printWarnings(io, p.warnings);
    if (raw.seed !== undefined && modelDrawing(survey) !== 'seeded')
      optionNote(io, 'predict', '--seed', `nothing is drawn at random (${unseededModel(survey)})`);
    noteNoPngWithoutFigures(io, 'predict', raw);
    // The tables (and cli-table3) are loaded only for the table and CSV formats.
    const tables = opts.format === 'json' ? undefined : await import('../../render/predict-table.js');
    outputs.setMain(
      renderText(opts, { json: () => p, table: () => tables!.predictionTable(p), csv: () => tables!.predictionCsv(p) }),
    );
    if (draw)
      outputs.setFigures(
        await draw.figureFiles(io, await draw.drawFigures(survey, p, { modelSeed: model.seed }), wantsPng(raw)),
      );
    outputs.commit();
    return 0;
  },
};

/** --draws N (1 to MAX_MODEL_DRAWS; default 1000) and --seed S (0 to 4294967295; default 1) of the model's draws. */
export function modelDrawOptions(raw: { draws?: unknown; seed?: unknown }): { draws?: number; seed: number } {
  const seed = raw.seed === undefined ? DEFAULT_MODEL_SEED : parseInteger(optionText(raw.seed), '--seed', 0, MAX_SEED);
  // left out when not given: the library draws its default, and refuses a count on a file with nothing to draw
  if (raw.draws === undefined) return { seed };
  return { draws: parseInteger(optionText(raw.draws), '--draws', 1, MAX_MODEL_DRAWS), seed };
}
