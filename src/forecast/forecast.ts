/**
 * forecast: a Survey in, a Forecast (the JSON of specs/forecast.schema.json) out.
 *
 * 1. The density of detected sources of the chosen population is tabulated (grid.ts).
 * 2. Fisher matrix (fisher.ts), Poisson-only and with the per-slice cosmic-variance nuisances
 *    marginalised (unless switched off, when "fisher" is the Poisson-only result).
 * 3. Optionally mock surveys fitted by maximum likelihood (mocks.ts) and the area / limit that
 *    reaches target sigmas (requirement.ts).
 */
import { cosmologyJsonOf } from '../model/cosmology-json.js';
import { FlatCosmology } from '../cosmology/flat-cosmology.js';
import type { Survey } from '../model/survey.js';
import { describeModel } from '../population/describe.js';
import type {
  FisherBlock,
  Forecast,
  ForecastSlice,
  MockParameterSummary,
  RequirementAtModel,
} from '../model/outputs/forecast.js';
import { choosePopulation, surveyForPopulation } from '../model/select.js';
import { otherKneeHint } from '../model/population.js';
import { MAX_MOCKS, MAX_SEED } from '../model/limits.js';
import { MAX_MODEL_DRAWS } from '../model/model-uncertainty.js';
import { assertWholeOption, inputError } from '../errors.js';
import { assertConvergent } from '../counts/engine.js';
import { buildDensityGrid, densityFisherParts, quadratureWarnings, type DensityGrid } from './grid.js';
import type { FisherSumsMemo } from './grid-memo.js';
import {
  fisherParts,
  marginaliseCorrelated,
  priorFactorOf,
  type CosmicVariancePrior,
  summariseFisher,
  type FisherParts,
  type FisherSummary,
} from './fisher.js';
import { parameterNames, parameterValuesAt } from './parameters.js';
import {
  cosmicVarianceCorrelation,
  cosmicVarianceInput,
  type CosmicVarianceCorrelationSource,
  type CosmicVarianceSource,
} from './cosmic-variance-input.js';
import { makeMockSetup, runMocks } from './mocks.js';
import { defaultWorkers } from '../parallel/blocks.js';
import type { Estimator } from './fit.js';
import { requirement } from './requirement.js';
import { removingSelectionHint } from '../selection/describe.js';
import { drawnFisher, forecastDrawOffsets, spreadBlock, type DrawnFisher } from './model-spread.js';
import { DEFAULT_MODEL_SEED } from '../counts/model-draws.js';
import { mergeWarnings, type Warning } from '../warnings.js';
import { surveyWarnings } from '../population/warnings.js';
import { predictionWarnings } from '../counts/predict.js';
import { checkOptions, checkSurvey } from '../model/arguments.js';

/** Mean sources per mock below which an offset of the mock fits is put down to the fit's small-sample bias. */
const SMALL_SAMPLE_SOURCES = 1000;

export const CAVEAT =
  'A forecast is only as good as the luminosity function assumed: these uncertainties hold if the population follows the model above; a different faint-end slope or knee changes them.';

export interface ForecastOptions {
  /** Population of interest by name (default: the first). */
  population?: string;
  /** Include the cosmic-variance nuisances (default true). */
  cosmicVariance?: boolean;
  /** Where per-slice cosmic-variance fractions come from (default: the adapter). */
  cosmicVarianceSource?: CosmicVarianceSource;
  /**
   * Where the correlation of the slices' nuisances comes from (default: the boxes of one field,
   * cosmicVarianceCorrelation of src/forecast/cosmic-variance-input.ts).
   */
  cosmicVarianceCorrelation?: CosmicVarianceCorrelationSource;
  /** Number of mock surveys (0 or absent: none). */
  mocks?: number;
  seed?: number;
  /** Most worker threads for the mocks (default up to 4; threads start only beyond the break-even of src/parallel/blocks.ts; results are identical). */
  workers?: number;
  estimator?: Estimator;
  /** Target sigmas by parameter name. */
  targets?: Record<string, number>;
  /**
   * Draws of the population's model_uncertainty (0 or absent: none): the sigmas' percentiles across
   * them (`model_spread`) and, with targets, the area and limit at the draws' p50 and p84. Seeded
   * with `seed` (default 1); a draws file uses each row once whatever the number.
   */
  modelDraws?: number;
  /** Keep every converged mock fit in `mocks.fits` (the report scatters them; default false). */
  keepFits?: boolean;
  onProgress?: (done: number, total: number) => void;
  /**
   * Where the Fisher sums of earlier forecasts are kept (the explore page's updates): read from
   * there for the same inputs at any area, when neither mocks, model draws nor targets need the
   * grid itself.
   */
  fisherSums?: FisherSumsMemo;
}

function block(names: readonly string[], s: FisherSummary): FisherBlock {
  const sigma: Record<string, number> = {};
  names.forEach((n, i) => (sigma[n] = s.sigma[i]!));
  return { sigma, correlation: s.correlation, covariance: s.covariance };
}

/** Percentile with linear interpolation between order statistics (Hyndman & Fan 1996, type 7). */
export function percentile(sorted: readonly number[], p: number): number {
  const h = (sorted.length - 1) * p;
  const lo = Math.floor(h);
  const hi = Math.min(sorted.length - 1, lo + 1);
  return sorted[lo]! + (h - lo) * (sorted[hi]! - sorted[lo]!);
}

export function summariseSample(values: readonly number[], input: number): MockParameterSummary | undefined {
  const n = values.length;
  if (n < 2) return undefined;
  let mean = 0;
  for (const v of values) mean += v;
  mean /= n;
  let ss = 0;
  for (const v of values) ss += (v - mean) ** 2;
  const std = Math.sqrt(ss / (n - 1));
  const sorted = [...values].sort((a, b) => a - b);
  const bias = mean - input;
  return {
    mean,
    std,
    p16: percentile(sorted, 0.16),
    p50: percentile(sorted, 0.5),
    p84: percentile(sorted, 0.84),
    bias,
    bias_in_standard_errors: std > 0 ? bias / (std / Math.sqrt(n)) : 0,
  };
}

/**
 * The options a script passes, refused as the command line refuses its flags: a count of mocks or
 * draws that is not a whole number in range, a seed outside 0 to 2^32 - 1, a target that names no
 * parameter of the population or is not a positive number (which gave "sigma(alpha) = NaN" notes
 * and a null target in the JSON).
 */
function checkForecastOptions(opts: ForecastOptions, names: readonly string[]): void {
  assertWholeOption(opts.mocks, 'mocks', 0, MAX_MOCKS);
  assertWholeOption(opts.seed, 'seed', 0, MAX_SEED);
  // (report --draws reaches MAX_MODEL_DRAWS; forecast --model-draws keeps its own smaller cap)
  assertWholeOption(opts.modelDraws, 'modelDraws', 0, MAX_MODEL_DRAWS);
  for (const [name, sigma] of Object.entries(opts.targets ?? {})) {
    if (!names.includes(name)) {
      throw inputError(
        'bad_option',
        '',
        `targets.${name}`,
        `"${name}" is not a parameter of this population${otherKneeHint(name, names)}`,
        `use one of ${names.join(', ')}`,
      );
    }
    if (!(typeof sigma === 'number' && Number.isFinite(sigma) && sigma > 0)) {
      throw inputError(
        'bad_option',
        '',
        `targets.${name}`,
        `the target sigma of ${name} is ${String(sigma)}, not a positive number`,
        'give a positive number',
      );
    }
  }
}

export async function forecast(file: Survey, opts: ForecastOptions = {}): Promise<Forecast> {
  checkSurvey(file, 'forecast');
  checkOptions(opts, 'forecast', '{ mocks: 200, seed: 1 }');
  const population = choosePopulation(file, opts.population);
  checkForecastOptions(opts, parameterNames(population));
  // The population's own window and slices: the forecast a file holding it alone would give.
  const survey = surveyForPopulation(file, population);
  const cosmo = new FlatCosmology(survey.cosmology);
  const edges = survey.sliceEdges;
  // (refused before anything is counted, with or without cosmic variance, as predict and plan refuse it)
  assertConvergent(survey, population, edges);
  const names = parameterNames(population);
  const useCv = opts.cosmicVariance !== false;
  const cvSource = useCv ? (opts.cosmicVarianceSource ?? cosmicVarianceInput) : undefined;
  const correlationOf = opts.cosmicVarianceCorrelation ?? cosmicVarianceCorrelation;

  let built: DensityGrid | undefined;
  const gridOf = (): DensityGrid => (built ??= buildDensityGrid(survey, population, cosmo, edges));
  const needsGrid =
    (opts.mocks ?? 0) > 0 || (opts.modelDraws ?? 0) > 0 || (opts.targets && Object.keys(opts.targets).length > 0);
  // Without mocks, draws or targets the grid's arrays are not needed: its Fisher sums are made as
  // the points are (densityFisherParts, the same sums bit for bit: test/forecast/grid-sums.test.ts)
  const parts = needsGrid
    ? fisherParts(gridOf())
    : opts.fisherSums
      ? opts.fisherSums.parts(survey, population, cosmo, edges)
      : densityFisherParts(survey, population, cosmo, edges);
  if (!(parts.count > 0)) {
    throw inputError(
      'no_sources',
      survey.file,
      'detection.limit',
      `no source of "${population.name}" is expected above the limit, so nothing can be measured`,
      `choose a fainter limit or a larger area${removingSelectionHint(file, [population], 'or check the selection')}`,
    );
  }
  const poisson = summariseFisher(parts.matrix);
  if (!poisson) {
    throw inputError(
      'singular_fisher',
      survey.file,
      'population',
      `the Fisher matrix of "${population.name}" is singular (${parts.count.toPrecision(3)} sources expected)`,
      'choose a fainter limit or a larger area',
    );
  }
  const cvWarnings: Warning[] = [];
  // (the grid's own per-slice counts: the cosmic-variance input does not count the slices again)
  const counts = parts.slices.map((s) => s.count);
  const fractions = cvSource ? cvSource(survey, edges, population, counts, cvWarnings) : undefined;
  const prior: CosmicVariancePrior | undefined = fractions
    ? { fractions, correlation: correlationOf(survey, edges) }
    : undefined;
  let withCv = poisson;
  if (prior) {
    const s = summariseFisher(marginaliseCorrelated(parts.matrix, parts.slices, prior));
    if (!s)
      throw inputError(
        'singular_fisher',
        survey.file,
        'population',
        'the Fisher matrix with cosmic variance is singular',
        'check the survey',
      );
    withCv = s;
  }
  const zMid = 0.5 * (population.window.min + population.window.max);
  const values = parameterValuesAt(population, zMid);
  const center: Record<string, number> = {};
  names.forEach((n, i) => (center[n] = values[i]!));
  const slices: ForecastSlice[] = parts.slices.map((s, i) => {
    const o: ForecastSlice = { z_min: edges[i]!, z_max: edges[i + 1]!, count: s.count };
    if (fractions) o.cosmic_variance_fraction = fractions[i]!;
    return o;
  });
  const fisherBlock = block(names, withCv);
  const out: Forecast = {
    format: 1,
    title: survey.title,
    cosmology: cosmologyJsonOf(survey.cosmology),
    model: describeModel(survey, population),
    caveat: CAVEAT,
    area_deg2: survey.areaDeg2,
    redshift: { min: survey.redshift.min, max: survey.redshift.max },
    parameters: names,
    center,
    count: parts.count,
    cosmic_variance: useCv,
    slices,
    fisher: fisherBlock,
    covariance: fisherBlock.covariance,
    fisher_poisson_only: block(names, poisson),
    warnings: mergeWarnings(
      surveyWarnings(survey),
      predictionWarnings(survey, [population]),
      cvWarnings,
      quadratureWarnings(population.name, edges, parts.quadratureMissed),
    ),
  };
  // A file of several populations forecast without choosing one: the first is; name the others.
  if (opts.population === undefined && file.populations.length > 1)
    out.populations_left_out = file.populations.filter((q) => q !== population).map((q) => q.name);

  let drawn: { thetas: number[][]; fisher: DrawnFisher } | undefined;
  if (opts.modelDraws && opts.modelDraws > 0) {
    const seed = opts.seed ?? DEFAULT_MODEL_SEED;
    const { thetas, source } = forecastDrawOffsets(file, population, opts.modelDraws, seed);
    const fisher = drawnFisher(gridOf(), parts, thetas, prior);
    drawn = { thetas, fisher };
    const block = spreadBlock(names, fisher, { draws: opts.modelDraws, seed, source, cosmicVariance: !!fractions });
    if (block) out.model_spread = block;
  }

  if (opts.mocks && opts.mocks > 0) {
    const estimator = opts.estimator ?? 'ml';
    const seed = opts.seed ?? 1;
    const cvSigma = fractions ?? parts.slices.map(() => 0);
    const run = await runMocks(
      makeMockSetup(gridOf(), cvSigma, estimator, seed, prior && priorFactorOf(prior)),
      opts.mocks,
      {
        workers: opts.workers ?? defaultWorkers(),
        ...(opts.onProgress ? { onProgress: opts.onProgress } : {}),
      },
    );
    let failed = 0;
    let sources = 0;
    for (let i = 0; i < run.count; i++) {
      if (!run.ok[i]) failed++;
      sources += run.sources[i]!;
    }
    const parameters: Record<string, MockParameterSummary> = {};
    const notConstrained: string[] = estimator === 'sty' ? [names[0]] : [];
    names.forEach((n, j) => {
      if (notConstrained.includes(n)) return;
      const vals: number[] = [];
      for (let i = 0; i < run.count; i++) if (run.ok[i]) vals.push(values[j]! + run.theta[3 * i + j]!);
      const s = summariseSample(vals, values[j]!);
      if (s) parameters[n] = s;
    });
    const notes: string[] = [];
    if (estimator === 'sty') {
      notes.push(
        'The STY estimator (Sandage, Tammann & Yahil 1979) uses the shape of the distribution at each redshift only; it does not constrain phi*, which is not reported. ' +
          "The Fisher sigmas beside its fits are the extended likelihood's, which also uses how many sources lie at each redshift, so the STY fits spread more than they do (6 % more in alpha for a 3,000-source UV field at z = 3-5).",
      );
    }
    for (const [n, sp] of Object.entries(parameters)) {
      if (Math.abs(sp.bias_in_standard_errors) <= 4) continue;
      let why = '';
      if (n === 'log10_phi_star' && fractions) {
        why =
          '; with cosmic variance this is expected: the per-slice normalisation nuisances enter multiplicatively, so the fitted normalisation is biased at the order of the squared cosmic-variance fractions, beyond the first order of the Fisher matrix';
      } else if (sources / run.count < SMALL_SAMPLE_SOURCES) {
        why = `; with about ${Math.round(sources / run.count)} sources per mock this is expected: a maximum-likelihood fit of few sources is biased at the order of 1/N (common practice), and the offset shrinks as the survey grows`;
      }
      notes.push(
        `${n}: the mean of the fits differs from the input by ${sp.bias.toPrecision(3)} (${sp.bias_in_standard_errors.toFixed(1)} standard errors of the mean)${why}.`,
      );
    }
    if (failed > 0) notes.push(`${failed} of ${run.count} fits did not converge and are left out of the statistics.`);
    out.mocks = {
      count: run.count,
      seed,
      estimator: estimator === 'sty' ? 'sty' : 'extended_likelihood',
      parameters,
      not_constrained: notConstrained,
      failed_fits: failed,
      mean_sources: sources / run.count,
      notes,
    };
    if (opts.keepFits) {
      const fits: (number | null)[][] = [];
      for (let i = 0; i < run.count; i++) {
        if (!run.ok[i]) continue;
        fits.push(names.map((n, j) => (notConstrained.includes(n) ? null : values[j]! + run.theta[3 * i + j]!)));
      }
      out.mocks.fits = fits;
    }
  }

  if (opts.targets && Object.keys(opts.targets).length > 0) {
    const ctx = {
      survey,
      population,
      cosmo,
      names,
      parts,
      ...(cvSource ? { cosmicVariance: cvSource, cosmicVarianceCorrelation: correlationOf } : {}),
    };
    out.requirement = requirement(ctx, opts.targets);
    if (drawn && out.model_spread) {
      const depthParts = new Map<number, { plain: FisherParts; list: readonly FisherParts[] }>();
      const at = (probability: number): RequirementAtModel => {
        const r = requirement(
          { ...ctx, spread: { thetas: drawn.thetas, parts: drawn.fisher.parts, probability, depthParts } },
          opts.targets!,
        );
        return { area_deg2: r.area_deg2, limit: r.limit, by_parameter: r.by_parameter, notes: r.notes };
      };
      out.requirement.model = { draws: drawn.thetas.length, p50: at(0.5), p84: at(0.84) };
    }
  }
  return out;
}
