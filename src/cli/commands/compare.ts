import type { CommandDef } from './types.js';
import { addOutputOptions, loadSurveyArg, outputOptions, printWarnings } from './common.js';
import { emit } from '../io.js';

export const compareCommand: CommandDef = {
  name: 'compare',
  description: 'survey files side by side: area, window, limit, counts, uncertainties, Fisher sigmas and time, the best of each row marked',
  configure(cmd) {
    cmd.argument('<surveys...>', 'two or more survey files (YAML)');
    cmd.option('--population <name>', 'the population to compare in every file (default: the first of each)');
    cmd.option('--no-cosmic-variance', 'Fisher sigmas without cosmic variance (Poisson only)');
    addOutputOptions(cmd);
  },
  async action(cmd, args, io) {
    const files = args[0] as string[];
    const raw = cmd.opts();
    const out = outputOptions(raw);
    const surveys = [];
    for (const f of files) surveys.push(await loadSurveyArg(io, f));
    const { compare } = await import('../../planning/compare.js');
    const result = await compare(surveys, {
      ...(typeof raw.population === 'string' ? { population: raw.population } : {}),
      cosmicVariance: raw.cosmicVariance !== false,
    });
    printWarnings(io, result.warnings);
    const { compareTable, compareCsv } = await import('../../planning/render.js');
    emit(io, out, { json: () => result, table: () => compareTable(result), csv: () => compareCsv(result) }, files);
    return 0;
  },
};
