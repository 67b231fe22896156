import type { CommandDef } from './types.js';
import { addOutputOptions, loadSurveyArg, outputOptions, printWarnings } from './common.js';
import { Outputs, renderText } from '../io.js';
import { inputError } from '../../errors.js';

/** Most survey files one comparison may hold. */
export const MAX_COMPARE_FILES = 20;

export const compareCommand: CommandDef = {
  name: 'compare',
  description:
    'survey files side by side: area, window, limit, counts, uncertainties, Fisher sigmas and time, the best of each row marked',
  configure(cmd) {
    cmd.argument('[surveys...]', 'two or more survey files (YAML)');
    cmd.option('--population <name>', 'the population to compare in every file (default: the first of each)');
    cmd.option('--no-cosmic-variance', 'Fisher sigmas without cosmic variance (Poisson only)');
    addOutputOptions(cmd);
  },
  async action(cmd, args, io) {
    const files = (args[0] as string[] | undefined) ?? [];
    const raw = cmd.opts();
    const out = outputOptions(raw);
    if (files.length < 2) {
      throw inputError(
        'bad_option',
        '',
        'compare',
        files.length === 0
          ? 'needs survey files to compare, and none was given'
          : `needs at least two survey files to compare, and only ${files[0]} was given`,
        files.length === 0
          ? 'give two or more survey files'
          : `use skytally predict ${files[0]} for one survey, or give another file`,
      );
    }
    if (files.length > MAX_COMPARE_FILES) {
      throw inputError(
        'bad_option',
        '',
        'compare',
        `was given ${files.length} survey files, more than the ${MAX_COMPARE_FILES} one table can hold`,
        'compare fewer files at a time',
      );
    }
    const outputs = new Outputs(io, { out: out.out });
    outputs.refuseInputs(files);
    const surveys = [];
    for (const f of files) {
      const s = await loadSurveyArg(io, f, typeof raw.population === 'string' ? raw.population : undefined);
      outputs.refuseInputs(s.inputs ?? []);
      surveys.push(s);
    }
    const { compare } = await import('../../planning/compare.js');
    if (typeof raw.population === 'string') {
      // each file's population named as the command line names it (the library says
      // options.population), in the library's order: photometric redshifts, then the name
      const { populationByName, refuseScatteredRedshifts } = await import('../../model/select.js');
      for (const s of surveys) {
        refuseScatteredRedshifts(s);
        populationByName(s, raw.population, '--population');
      }
    }
    const result = await compare(surveys, {
      ...(typeof raw.population === 'string' ? { population: raw.population } : {}),
      cosmicVariance: raw.cosmicVariance !== false,
    });
    printWarnings(io, result.warnings);
    const { compareTable, compareCsv } = await import('../../render/compare-table.js');
    outputs.setMain(
      renderText(out, { json: () => result, table: () => compareTable(result), csv: () => compareCsv(result) }),
    );
    outputs.commit();
    return 0;
  },
};
