/**
 * The forecast under the assumed model's own uncertainty (a population's model_uncertainty,
 * docs/survey-file.md; forecast --model-draws): the Fisher sigmas recomputed at each of N draws of
 * the parameters and summarised by their 16th, 50th and 84th percentiles.
 *
 * - Draws: those predict makes for the population (src/counts/model-draws.ts, drawModelOffsets:
 *   the same seed and stream, so the forecast's draw i is predict's draw i), or every row of a
 *   draws file once. A draw is the offsets [d log10 phi*, d characteristic, d alpha] of the
 *   forecast's own parameters (src/forecast/parameters.ts).
 * - Each draw's Fisher matrix on the one density grid of the survey (fisherPartsAt: the grid's
 *   points keep their observed values, only the density and its derivatives change; for many
 *   draws its sums read from series tabulated once, drawnFisher), with the
 *   cosmic-variance nuisances of the assumed model (the fractions are not asked again per draw:
 *   their bias, by abundance matching, moves with the draw's count at second order in the sigmas).
 * - A draw without offsets is the plain forecast itself (its sigmas bit for bit); a draw whose
 *   Fisher matrix is singular is left out and counted.
 * - Percentiles: linear between order statistics (Hyndman & Fan 1996, type 7; percentilesOf).
 */
import type { Population } from '../model/population.js';
import type { Survey } from '../model/survey.js';
import type { ForecastModelSpread, SigmaPercentiles } from '../model/outputs/forecast.js';
import { inputError } from '../errors.js';
import { drawModelOffsets, percentilesOf } from '../counts/model-draws.js';
import type { DensityGrid } from './grid.js';
import { sliceCount } from './grid.js';
import {
  fisherPartsAt,
  marginaliseCorrelated,
  type CosmicVariancePrior,
  summariseFisher,
  type FisherParts,
  type FisherSummary,
} from './fisher.js';
import { zeros } from '../numerics/linalg.js';
import { addSliceSums } from './slice-sums.js';
import { drawReach, drawSumsTable, seriesPasses, type DrawSumsOptions } from './draw-sums.js';

export const SPREAD_PERCENTILES = [0.16, 0.5, 0.84] as const;

/** The draws' offsets of the forecast's three parameters for `population` of `file`. */
export function forecastDrawOffsets(
  file: Survey,
  population: Population,
  draws: number,
  seed: number,
): { thetas: number[][]; source: 'normal' | 'draws_file' } {
  const mu = population.modelUncertainty;
  if (!mu) {
    throw inputError(
      'bad_option',
      file.file,
      '--model-draws',
      `population "${population.name}" has no model_uncertainty block, so there is no model spread to draw`,
      'add model_uncertainty to the population (docs/survey-file.md) or leave out --model-draws',
    );
  }
  // the population's place in the file: predict's stream for it, so that the draws are predict's
  const stream = Math.max(0, file.populations.indexOf(population));
  const offsets = drawModelOffsets(mu, population.components.length, draws, seed, stream);
  return {
    thetas: offsets.map((o) => [o.log10PhiStar[0]!, o.characteristic, o.alpha[0]!]),
    source: mu.kind === 'draws' ? 'draws_file' : 'normal',
  };
}

export interface DrawnFisher {
  /** Each draw's parts at the survey's own area and depth (the plain parts for a draw without offsets). */
  parts: FisherParts[];
  /** Each draw's summary with the cosmic-variance nuisances (when fractions are given) and Poisson only; undefined when singular. */
  withCv: (FisherSummary | undefined)[];
  poisson: (FisherSummary | undefined)[];
  /** Whether the draws' sums came from the tabulated series rather than one pass per draw. */
  tabulated: boolean;
}

/**
 * Panel widths and degrees of the draws' series (src/forecast/draw-sums.ts): a forecast's draws
 * shift x = s d_c only, over a narrower range than a plan's knots.
 */
export const SPREAD_SERIES: DrawSumsOptions = { panelWidth: 1.5, degreeX: 12, panelWidthA: 0.8, degreeA: 14 };
/** Largest error estimate (relative, drawSumsTable) at which the series replace the exact passes. */
export const SPREAD_SERIES_TOLERANCE = 1e-10;

/**
 * The Fisher matrices of every draw on the grid: by one pass over the grid per draw (fisherPartsAt;
 * `sums` 'exact'), or from the six sums of each slice read from tensor Chebyshev series in
 * (s d_c, d_alpha) tabulated once over the draws' range (drawSumsTable; 'series'), times 10^d_phi.
 * 'auto' (the default) takes the series where they cost fewer passes than the draws and their
 * error estimate is within SPREAD_SERIES_TOLERANCE; every draw's sigmas then equal the exact
 * passes' to 1e-8 relative (test/forecast/draw-sums.test.ts).
 */
export function drawnFisher(
  grid: DensityGrid,
  plain: FisherParts,
  thetas: readonly (readonly number[])[],
  prior: CosmicVariancePrior | undefined,
  sums: 'auto' | 'exact' | 'series' = 'auto',
): DrawnFisher {
  const parts: FisherParts[] = [];
  const withCv: (FisherSummary | undefined)[] = [];
  const poisson: (FisherSummary | undefined)[] = [];
  const series = sums === 'exact' ? undefined : spreadSeries(grid, thetas, sums === 'series');
  for (const th of thetas) {
    const p = th.every((v) => v === 0) ? plain : series ? series(th) : fisherPartsAt(grid, th);
    parts.push(p);
    const po = p.count > 0 ? summariseFisher(p.matrix) : undefined;
    poisson.push(po);
    withCv.push(prior && po ? summariseFisher(marginaliseCorrelated(p.matrix, p.slices, prior)) : po);
  }
  return { parts, withCv, poisson, tabulated: series !== undefined };
}

/**
 * The parts of a draw from the series (undefined where the exact passes cost fewer or the series'
 * error estimate is too large): fisherPartsAt's matrix and slices from the six sums of each slice.
 */
function spreadSeries(
  grid: DensityGrid,
  thetas: readonly (readonly number[])[],
  always: boolean,
): ((th: readonly number[]) => FisherParts) | undefined {
  const reach = drawReach(grid, thetas);
  if (!reach) return undefined;
  const { xRange, aRange } = reach;
  const s = grid.shift;
  if (!always && seriesPasses(xRange, aRange, SPREAD_SERIES) >= reach.moved) return undefined;
  const table = drawSumsTable(grid, xRange, aRange, SPREAD_SERIES);
  if (!always && table.errorEstimate > SPREAD_SERIES_TOLERANCE) return undefined;
  const nS = sliceCount(grid);
  const out = new Float64Array(12 * nS);
  return (th) => {
    table.fill(s * th[1]!, 0, 1, th[2]!, out, 0, 12 * nS);
    const factor = 10 ** th[0]!;
    const parts: FisherParts = { matrix: zeros(3), slices: [], count: 0 };
    for (let sl = 0; sl < nS; sl++) {
      const o = 12 * sl;
      const n = factor * out[o]!;
      const bc = factor * out[o + 1]!;
      const ba = factor * out[o + 2]!;
      const fcc = factor * out[o + 3]!;
      const fca = factor * out[o + 4]!;
      const faa = factor * out[o + 5]!;
      addSliceSums(parts, n, bc, ba, fcc, fca, faa);
    }
    return parts;
  };
}

function percentilesBy(
  names: readonly string[],
  summaries: (FisherSummary | undefined)[],
): Record<string, SigmaPercentiles> {
  const out: Record<string, SigmaPercentiles> = {};
  const ok = summaries.filter((s): s is FisherSummary => s !== undefined);
  names.forEach((n, j) => {
    const [p16, p50, p84] = percentilesOf(
      ok.map((s) => s.sigma[j]!),
      SPREAD_PERCENTILES,
    ) as [number, number, number];
    out[n] = { p16, p50, p84 };
  });
  return out;
}

/** The model_spread block of a forecast. */
export function spreadBlock(
  names: readonly string[],
  drawn: DrawnFisher,
  settings: { draws: number; seed: number; source: 'normal' | 'draws_file'; cosmicVariance: boolean },
): ForecastModelSpread | undefined {
  const ok = drawn.withCv.filter((s) => s !== undefined).length;
  if (ok === 0) return undefined;
  const failed = drawn.withCv.length - ok;
  const notes: string[] = [];
  if (settings.source === 'draws_file')
    notes.push(`Every row of the draws file is one draw (${drawn.withCv.length} rows); --model-draws does not apply.`);
  if (settings.cosmicVariance)
    notes.push("The cosmic-variance fractions are the assumed model's: they are not recomputed for each draw.");
  if (failed > 0)
    notes.push(`${failed} of ${drawn.withCv.length} draws gave a singular Fisher matrix and are left out.`);
  return {
    draws: drawn.withCv.length,
    seed: settings.seed,
    source: settings.source,
    sigma: percentilesBy(names, drawn.withCv),
    sigma_poisson_only: percentilesBy(names, drawn.poisson),
    failed_draws: failed,
    notes,
  };
}
