import { availableParallelism } from 'node:os';
import { Option } from 'commander';
import type { CommandDef } from './types.js';
import {
  addNoPngOption,
  wantsPng,
  addOutputOptions,
  decimalNumber,
  loadSurveyArg,
  noteNoPngWithoutFigures,
  optionNote,
  optionText,
  outputOptions,
  parseInteger,
  parseWorkers,
  printWarnings,
} from './common.js';
import { Outputs, renderText } from '../io.js';
import { mockProgressBar } from '../progress.js';
import { inputError } from '../../errors.js';
import { MAX_FORECAST_MODEL_DRAWS, MAX_MOCKS, MAX_SEED } from '../../model/limits.js';
import { otherKneeHint } from '../../model/population.js';
export { MAX_FORECAST_MODEL_DRAWS, MAX_MOCKS };

export const forecastCommand: CommandDef = {
  name: 'forecast',
  description:
    'how well the survey measures phi*, L* (or M*) and alpha: Fisher matrix, mock surveys, area or depth for a target',
  configure(cmd) {
    cmd.argument('<survey>', 'survey file (YAML)');
    cmd.option('--mocks <N>', 'also draw N mock surveys and fit each by maximum likelihood');
    cmd.option('--seed <S>', 'seed of the mock surveys and model draws (integer 0 to 4294967295; default 1)');
    cmd.option(
      '--model-draws <N>',
      `recompute the sigmas at N draws of the population's model_uncertainty (1 to ${MAX_FORECAST_MODEL_DRAWS}) and report their p16, p50 and p84 (with --target, the area and limit at p50 and p84)`,
    );
    cmd.option(
      '--target <list>',
      'target sigmas, e.g. alpha=0.1 or alpha=0.1,log10_l_star=0.05: report the area and the limit that reach them',
    );
    cmd.option('--no-cosmic-variance', 'leave out the cosmic-variance normalisation of each slice (Poisson only)');
    cmd.option(
      '--workers <K>',
      'most worker threads for the mocks (default: up to 4; threads start only when the mocks are long enough to pay for them; results are identical)',
    );
    cmd.option('--population <name>', 'the population to forecast (default: the first)');
    cmd.option(
      '--list-mock-fits',
      'with --mocks: list the fitted parameters of every converged mock survey in the JSON (mocks.fits)',
    );
    cmd.option(
      '--figures <dir>',
      'also draw the forecast figure as DIR/forecast.svg (and .png when the rasteriser loads)',
    );
    addNoPngOption(cmd);
    cmd.addOption(
      new Option('--estimator <name>', 'mock fits: ml (extended likelihood) or sty (shape only; no phi*)')
        .choices(['ml', 'sty'])
        .default('ml'),
    );
    addOutputOptions(cmd);
  },
  async action(cmd, args, io) {
    const file = args[0] as string;
    const raw = cmd.opts();
    const out = outputOptions(raw);
    const { mocks, seed } = mockOptions(raw);
    // options of the mock surveys' fits, given without mocks, would change nothing
    for (const [key, flag] of [
      ['listMockFits', '--list-mock-fits'],
      ['estimator', '--estimator'],
    ] as const) {
      if (mocks === 0 && cmd.getOptionValueSource(key) === 'cli')
        throw inputError(
          'bad_option',
          '',
          flag,
          'applies to the fits of mock surveys, but none are drawn',
          `add --mocks N (e.g. --mocks 200), or leave ${flag} out`,
        );
    }
    const modelDraws =
      raw.modelDraws === undefined
        ? 0
        : parseInteger(optionText(raw.modelDraws), '--model-draws', 1, MAX_FORECAST_MODEL_DRAWS);
    const workers = parseWorkers(raw.workers, availableParallelism());
    const outputs = new Outputs(io, {
      out: out.out,
      figures: typeof raw.figures === 'string' ? raw.figures : undefined,
    });
    outputs.refuseInputs([file]);
    const draw = typeof raw.figures === 'string' ? await import('../figures.js') : undefined;
    const keepFits = raw.listMockFits === true;
    const survey = await loadSurveyArg(io, file, typeof raw.population === 'string' ? raw.population : undefined);
    outputs.refuseInputs(survey.inputs ?? []);
    const { forecast } = await import('../../forecast/forecast.js');
    const { choosePopulation } = await import('../../model/select.js');
    const { parameterNames } = await import('../../forecast/parameters.js');
    const chosen = typeof raw.population === 'string' ? raw.population : undefined;
    const population = choosePopulation(survey, chosen, '--population');
    const targets = raw.target === undefined ? undefined : parseTargets(String(raw.target), parameterNames(population));
    const progress = mocks > 0 && io.stderrIsTTY ? mockProgressBar(io) : undefined;
    const result = await forecast(survey, {
      // (absent without --population: the result then names the populations left out)
      ...(chosen !== undefined ? { population: chosen } : {}),
      cosmicVariance: raw.cosmicVariance !== false,
      mocks,
      seed,
      ...(workers ? { workers } : {}),
      estimator: raw.estimator === 'sty' ? 'sty' : 'ml',
      modelDraws,
      ...(targets ? { targets } : {}),
      // the figure scatters the mock fits; the JSON lists them only with --list-mock-fits
      ...(keepFits || draw ? { keepFits: true } : {}),
      ...(progress ? { onProgress: progress } : {}),
    });
    printWarnings(io, result.warnings);
    // the seed draws the mock surveys and the model's draws (not a draws file's rows, each taken once)
    if (raw.seed !== undefined && mocks === 0 && !(modelDraws > 0 && population.modelUncertainty?.kind === 'gaussian'))
      optionNote(
        io,
        'forecast',
        '--seed',
        `nothing is drawn at random (no --mocks, and ${modelDraws > 0 ? `the model's draws are the rows of the draws_file of "${population.name}"` : 'no --model-draws'})`,
      );
    noteNoPngWithoutFigures(io, 'forecast', raw);
    const shown = keepFits || !result.mocks?.fits ? result : { ...result, mocks: withoutFits(result.mocks) };
    // The tables (and cli-table3) are loaded only for the table and CSV formats.
    const tables = out.format === 'json' ? undefined : await import('../../render/forecast-table.js');
    outputs.setMain(
      renderText(out, {
        json: () => shown,
        table: () => withPopulationNote(tables!.forecastTable(shown), population, shown.populations_left_out),
        csv: () => tables!.forecastCsv(shown),
      }),
    );
    if (draw) {
      const { forecastFigure } = await import('../../render/figures.js');
      const fig = await forecastFigure(result, survey.title);
      if (fig) outputs.setFigures(await draw.figureFiles(io, [fig], wantsPng(raw)));
      else io.stderr(`skytally: no forecast figure: the forecast has no alpha against L* (or M*) to draw.\n`);
    }
    outputs.commit();
    return 0;
  },
};

/**
 * The table with, under its model line, a note when a file of several populations is forecast
 * without --population: only the first is, and the others (the JSON's `populations_left_out`) are
 * named.
 */
function withPopulationNote(table: string, chosen: { name: string }, leftOut: readonly string[] | undefined): string {
  if (!leftOut) return table;
  const others = leftOut.map((name) => `"${name}"`);
  const note = `Population: the file holds ${leftOut.length + 1}; only the first, "${chosen.name}", is forecast (counted over its own window), without ${others.join(', ')}; choose one with --population NAME.`;
  const lines = table.split('\n');
  const at = lines.findIndex((l) => l.startsWith('Assumed model:'));
  lines.splice(at < 0 ? lines.length : at + 1, 0, note);
  return lines.join('\n');
}

/** The mocks block without its per-mock fits. */
function withoutFits<T extends { fits?: unknown }>(m: T): Omit<T, 'fits'> {
  const { fits: _fits, ...rest } = m;
  return rest;
}

/**
 * --mocks N (1 to MAX_MOCKS; absent: 0, no mocks) and --seed S (0 to 4294967295; default 1),
 * checked as `forecast` checks them. Shared with `report`.
 */
export function mockOptions(raw: { mocks?: unknown; seed?: unknown }): { mocks: number; seed: number } {
  const mocks = raw.mocks === undefined ? 0 : parseInteger(optionText(raw.mocks), '--mocks', 1, MAX_MOCKS);
  const seed = raw.seed === undefined ? 1 : parseInteger(optionText(raw.seed), '--seed', 0, MAX_SEED);
  return { mocks, seed };
}

/** "alpha=0.1,log10_l_star=0.05" -> {alpha: 0.1, log10_l_star: 0.05}; names must be the population's parameters. */
export function parseTargets(text: string, names: readonly string[]): Record<string, number> {
  const out: Record<string, number> = {};
  const items = text
    .split(',')
    .map((s) => s.trim())
    .filter((s) => s.length > 0);
  if (items.length === 0)
    throw inputError(
      'bad_option',
      '',
      '--target',
      'is empty',
      `give name=sigma pairs such as --target alpha=0.1 (names: ${names.join(', ')})`,
    );
  for (const item of items) {
    const eq = item.indexOf('=');
    const name = eq < 0 ? item : item.slice(0, eq).trim();
    if (eq < 0)
      throw inputError(
        'bad_option',
        '',
        '--target',
        `"${item}" is not of the form name=sigma`,
        `write it as ${names.includes(name) ? name : 'alpha'}=0.1`,
      );
    if (!names.includes(name))
      throw inputError(
        'bad_option',
        '',
        '--target',
        `"${name}" is not a parameter of this population${otherKneeHint(name, names)}`,
        `use one of ${names.join(', ')}`,
      );
    const vText = item.slice(eq + 1).trim();
    const v = decimalNumber(vText) ?? NaN;
    if (!(v > 0))
      throw inputError(
        'bad_option',
        '',
        '--target',
        `the target sigma of ${name} must be a positive number, not "${vText}"`,
        `give e.g. ${name}=0.1`,
      );
    if (name in out)
      throw inputError('bad_option', '', '--target', `${name} is given twice`, 'give each parameter once');
    out[name] = v;
  }
  return out;
}
