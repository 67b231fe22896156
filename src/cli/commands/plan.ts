import { availableParallelism } from 'node:os';
import type { CommandDef } from './types.js';
import {
  addNoPngOption,
  addOutputOptions,
  loadSurveyArg,
  noteNoPngWithoutFigures,
  optionNote,
  outputOptions,
  parseWorkers,
  printWarnings,
  wantsPng,
} from './common.js';
import { Outputs, renderText } from '../io.js';
import { stageBar } from '../progress.js';

export const planCommand: CommandDef = {
  name: 'plan',
  description:
    'spend a time budget: the split of exposure per pointing against area (and tiers) that best serves a goal',
  configure(cmd) {
    cmd.argument('<plan>', 'plan file: a survey file with a plan section (YAML)');
    cmd.option('--population <name>', 'the population the goal is about (default: the first)');
    cmd.option('--no-cosmic-variance', 'leave cosmic variance out of the sigma goal (Poisson only)');
    cmd.option(
      '--workers <K>',
      'most worker threads for the depth tables (default: up to 4; threads start only when the tables are large enough to pay for them; results are identical)',
    );
    cmd.option('--figures <dir>', 'also draw the plan figure as DIR/plan.svg (and .png when the rasteriser loads)');
    addNoPngOption(cmd);
    addOutputOptions(cmd);
  },
  async action(cmd, args, io) {
    const file = args[0] as string;
    const raw = cmd.opts();
    const out = outputOptions(raw);
    const workers = parseWorkers(raw.workers, availableParallelism());
    const outputs = new Outputs(io, {
      out: out.out,
      figures: typeof raw.figures === 'string' ? raw.figures : undefined,
    });
    outputs.refuseInputs([file]);
    const draw = typeof raw.figures === 'string' ? await import('../figures.js') : undefined;
    const survey = await loadSurveyArg(io, file, typeof raw.population === 'string' ? raw.population : undefined);
    outputs.refuseInputs(survey.inputs ?? []);
    const { plan } = await import('../../library/plan.js');
    // the population named as the command line names it (the library says options.population)
    const { choosePopulation } = await import('../../model/select.js');
    choosePopulation(survey, typeof raw.population === 'string' ? raw.population : undefined, '--population');
    const result = await plan(survey, {
      ...(typeof raw.population === 'string' ? { population: raw.population } : {}),
      cosmicVariance: raw.cosmicVariance !== false,
      ...(workers ? { workers } : {}),
      ...(io.stderrIsTTY ? { onProgress: stageBar(io) } : {}),
    });
    printWarnings(io, result.warnings);
    // cosmic variance enters a plan only through a sigma goal: a count goal is the same without it
    if (raw.cosmicVariance === false && typeof result.goal === 'string')
      optionNote(
        io,
        'plan',
        '--no-cosmic-variance',
        `the goal is ${result.goal === 'count' ? 'the count' : 'the count fainter than the knee'}, which cosmic variance does not enter (only a sigma goal does)`,
      );
    noteNoPngWithoutFigures(io, 'plan', raw);
    // The tables (and cli-table3) are loaded only for the table and CSV formats.
    const tables = out.format === 'json' ? undefined : await import('../../render/plan-table.js');
    outputs.setMain(
      renderText(out, {
        json: () => result,
        table: () => tables!.planTable(result),
        csv: () => tables!.planCsv(result),
      }),
    );
    if (draw) {
      const { planFigure } = await import('../../render/figures.js');
      const fig = await planFigure(result, survey.title);
      if (fig) outputs.setFigures(await draw.figureFiles(io, [fig], wantsPng(raw)));
    }
    outputs.commit();
    return 0;
  },
};
