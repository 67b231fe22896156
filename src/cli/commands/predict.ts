import type { CommandDef } from './types.js';
import { addOutputOptions, loadSurveyArg, outputOptions, printWarnings } from './common.js';
import { Outputs, renderText } from '../io.js';

export const predictCommand: CommandDef = {
  name: 'predict',
  description: 'expected counts of detected galaxies per redshift slice, with histograms',
  configure(cmd) {
    cmd.argument('<survey>', 'survey file (YAML)');
    addOutputOptions(cmd);
    cmd.option('--figures <dir>', 'also write each figure as DIR/<name>.svg (and .png when the rasteriser loads)');
  },
  async action(cmd, args, io) {
    const file = args[0] as string;
    const raw = cmd.opts();
    const opts = outputOptions(raw);
    const outputs = new Outputs(io, { out: opts.out, figures: typeof raw.figures === 'string' ? raw.figures : undefined });
    outputs.refuseInputs([file]);
    // Only a command asked to draw loads the figure layer (and, through it, vega).
    const draw = typeof raw.figures === 'string' ? { ...(await import('../figures.js')), ...(await import('../../render/draw.js')) } : undefined;
    const survey = await loadSurveyArg(io, file);
    outputs.refuseInputs(survey.inputs ?? []);
    const { predict } = await import('../../counts/predict.js');
    const { predictionTable, predictionCsv } = await import('../../render/predict-table.js');
    const p = predict(survey);
    printWarnings(io, p.warnings);
    outputs.setMain(renderText(opts, { json: () => p, table: () => predictionTable(p), csv: () => predictionCsv(p) }));
    if (draw) outputs.setFigures(await draw.figureFiles(io, await draw.drawFigures(survey, p)));
    outputs.commit();
    return 0;
  },
};
