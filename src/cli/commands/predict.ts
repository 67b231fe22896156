import type { CommandDef } from './types.js';
import { addOutputOptions, loadSurveyArg, outputOptions, printWarnings } from './common.js';
import { emit } from '../io.js';

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
    // Only a command asked to draw loads the figure layer (and, through it, vega).
    const draw = typeof raw.figures === 'string' ? await import('../draw.js') : undefined;
    const figuresDir = draw ? draw.checkFiguresDir(io, raw.figures as string) : undefined;
    const survey = await loadSurveyArg(io, file);
    const { predict } = await import('../../counts/predict.js');
    const { predictionTable, predictionCsv } = await import('../../render/predict-table.js');
    const p = predict(survey);
    printWarnings(io, p.warnings);
    const figures = draw && figuresDir ? await draw.drawFigures(survey, p) : undefined;
    emit(io, opts, { json: () => p, table: () => predictionTable(p), csv: () => predictionCsv(p) }, [file]);
    if (draw && figuresDir && figures) await draw.saveFigures(io, figuresDir, figures);
    return 0;
  },
};
