import type { CommandDef } from './types.js';
import { addOutputOptions, loadSurveyArg, outputOptions } from './common.js';
import { emit } from '../io.js';

export const predictCommand: CommandDef = {
  name: 'predict',
  description: 'expected counts of detected galaxies per redshift slice, with histograms',
  configure(cmd) {
    cmd.argument('<survey>', 'survey file (YAML)');
    addOutputOptions(cmd);
  },
  async action(cmd, args, io) {
    const file = args[0] as string;
    const opts = outputOptions(cmd.opts());
    const survey = await loadSurveyArg(io, file);
    const { predict } = await import('../../counts/predict.js');
    const { predictionTable, predictionCsv } = await import('../../render/predict-table.js');
    const p = predict(survey);
    for (const w of p.warnings) io.stderr(`skytally: warning: ${w}\n`);
    emit(io, opts, { json: () => p, table: () => predictionTable(p), csv: () => predictionCsv(p) }, [file]);
    return 0;
  },
};
