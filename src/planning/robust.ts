/**
 * Robust ranking of a plan's designs (plan.robust, docs/survey-file.md): each design's goal at the
 * pessimistic case of the population's model_uncertainty, the value 84% of the model's draws do at
 * least as well as: the 84th percentile of a sigma, the 16th of a count (percentiles linear between
 * order statistics, Hyndman & Fan 1996 type 7).
 *
 * Draws: those of predict and forecast --model-draws for the population (drawModelOffsets through
 * forecastDrawOffsets: the same seed and stream), or every row of a draws file once. A draw
 * without offsets is the design as evaluated (its goal bit for bit).
 *
 * A tier of a design under a draw [d_phi, d_c, d_alpha]: on the density grid of the plan's deepest
 * limit over 1 deg^2 (src/forecast/grid.ts, its panels up to 2 pi completeness widths: ~1e-6), the
 * tier's shallower limit and the draw's characteristic offset are one shift of ln u,
 * x = Delta + s d_c (y = t + x, as in the depth tables, src/planning/tables.ts), alpha + 1 becomes
 * alpha + 1 + d_alpha, and 10^d_phi multiplies every sum. Per draw the six Fisher sums of each
 * slice and their derivatives in x are computed on knots KNOT_STEP apart over the designs' range
 * of Delta and interpolated by cubic Hermite polynomials (error about h^4 / 384 times the fourth
 * derivative: 4e-6 of a sigma measured at h = 0.1, 3e-4 at h = 0.25), scaled by the tier's area
 * and marginalised with the tier's cosmic-variance fractions of the assumed model (the design
 * model's); the tiers' matrices add, as in search.ts.
 *
 * The knots' sums of a draw are functions of (x, d_alpha) alone: they are read from tensor
 * Chebyshev series tabulated once over the range the draws reach (src/forecast/draw-sums.ts,
 * SERIES_OPTIONS; a few hundred passes over the grid instead of one per knot per draw), unless
 * the exact passes cost fewer or the series' error estimate exceeds SERIES_TOLERANCE. The per-draw
 * sigmas then equal the exact passes' to 1e-8 relative (2.1e-12 measured,
 * test/planning/robust-series.test.ts).
 */
import type { Population } from '../model/population.js';
import type { Survey } from '../model/survey.js';
import type { PlanGoal } from '../model/plan.js';
import { percentilesOf } from '../counts/model-draws.js';
import { forecastDrawOffsets } from '../forecast/model-spread.js';
import { addSliceSums, fisherSigmaUpper, marginaliseSymmetric3 } from './sigma.js';
import { buildDensityGrid, sliceCount, type DensityGrid } from '../forecast/grid.js';
import { FlatCosmology } from '../cosmology/flat-cosmology.js';
import type { DesignModel, TierValue } from './model.js';
import { hermiteWeights, interpolateSums, knotSums } from './tables.js';
import {
  drawReach,
  drawSumsTable,
  seriesPasses,
  type DrawSumsOptions,
  type DrawSumsTable,
} from '../forecast/draw-sums.js';
import type { Evaluated } from './search.js';

/** Draws a robust plan ranks its designs over by default (a draws file: every row). */
export const ROBUST_DRAWS = 200;
/** Knot spacing in Delta (ln u) of each draw's sums. */
export const KNOT_STEP = 0.1;

export interface RobustContext {
  file: Survey;
  population: Population;
  model: DesignModel;
  goal: PlanGoal;
  parameterIndex: number;
  draws: number;
  seed: number;
  /**
   * How each draw's sums are computed: 'exact' by the draw's own passes over the grid (one per
   * knot; the reference the series are tested against), 'series' from the tabulated series,
   * 'auto' (the default) by the series where they cost fewer passes and their error estimate is
   * within SERIES_TOLERANCE.
   */
  sums?: 'auto' | 'exact' | 'series';
}

export interface RobustResult {
  draws: number;
  source: 'normal' | 'draws_file';
  /** The percentile taken: 0.84 for a sigma, 0.16 for a count. */
  percentile: number;
  /** Each design's goal at that percentile (undefined where no draw gives a value). */
  value(e: Evaluated): number | undefined;
  /** Each design's goal under every draw, in the draws' order (Infinity where a sigma has no value). */
  perDraw(e: Evaluated): Float64Array | undefined;
  /** Whether the draws' sums came from the tabulated series (drawSeries) rather than passes over the grid. */
  tabulated: boolean;
}

export function robustGoals(ctx: RobustContext, designs: readonly Evaluated[]): RobustResult {
  const { model, goal, parameterIndex } = ctx;
  const { thetas, source } = forecastDrawOffsets(ctx.file, ctx.population, ctx.draws, ctx.seed);
  const percentile = goal.kind === 'sigma' ? 0.84 : 0.16;
  const todo = designs.filter((e, k) => e.goal !== undefined && designs.indexOf(e) === k);
  const values = new Map<Evaluated, number | undefined>();
  if (todo.length === 0)
    return {
      draws: thetas.length,
      source,
      percentile,
      value: (e) => values.get(e),
      perDraw: () => undefined,
      tabulated: false,
    };

  const grid = buildDensityGrid(
    model.reference,
    ctx.population,
    new FlatCosmology(model.reference.cosmology),
    model.reference.sliceEdges,
    2 * Math.PI,
    // the same survey and population: the node-order search's counts of the design model's grid
    ctx.population === model.population ? model.hardCounts : undefined,
  );
  const s = grid.shift;
  const nS = sliceCount(grid);
  // the designs' range of Delta; per draw the sums on knots over Delta + s d_c
  const deltas = todo.flatMap((e) => e.tiers.map((t) => model.deltaAt(t.hours)));
  const dLo = Math.min(...deltas);
  const dHi = Math.max(...deltas);
  const knots = Math.max(2, Math.ceil((dHi - dLo) / KNOT_STEP - 1e-9) + 1);
  const stride = nS * 12;
  const table = new Float64Array(knots * stride);
  const sums = new Float64Array(6);
  const series = ctx.sums === 'exact' ? undefined : drawSeries(grid, thetas, dLo, knots, ctx.sums === 'series');
  const fill = (th: readonly number[]) => {
    if (series) series.fill(dLo + s * th[1]!, KNOT_STEP, knots, th[2]!, table, 0, stride);
    else for (let k = 0; k < knots; k++) knotSums(grid, dLo + k * KNOT_STEP + s * th[1]!, th[2]!, table, k * stride);
  };
  // per tier (a design's tier under every draw): its knot interval and Hermite weights in Delta,
  // its area and its cosmic-variance fractions, found once
  const places = new Map<TierValue, TierPlace>();
  const fractionCache = new Map<string, Float64Array>();
  const placeOf = (t: TierValue): TierPlace => {
    let hit = places.get(t);
    if (hit) return hit;
    const delta = model.deltaAt(t.hours);
    let j = Math.floor((delta - dLo) / KNOT_STEP);
    if (j < 0) j = 0;
    if (j > knots - 2) j = knots - 2;
    const x = Math.min(1, Math.max(0, (delta - dLo - j * KNOT_STEP) / KNOT_STEP));
    const weights = new Float64Array(4);
    hermiteWeights(x, KNOT_STEP, weights);
    const key = `${t.hours}:${t.pointings}`;
    let fractions = fractionCache.get(key);
    if (!fractions) {
      // (a Float64Array, as the design model passes its own: marginaliseCorrelated3 met a plain
      // array here after V8 had compiled it on typed arrays, and was compiled again)
      fractions = Float64Array.from(model.fractionsAt(t.hours, t.pointings));
      fractionCache.set(key, fractions);
    }
    hit = { at: j * stride, weights, area: t.areaDeg2, fractions, correlation: model.correlationAt(t.pointings) };
    places.set(t, hit);
    return hit;
  };
  const tierPlaces = todo.map((e) => e.tiers.map(placeOf));

  const perDraw = todo.map(() => new Float64Array(thetas.length));
  const scratch: DrawScratch = {
    matrix: new Float64Array(6),
    counts: new Float64Array(nS),
    b: new Float64Array(3 * nS),
    sums,
  };
  // the design's Fisher matrix under the draw: its upper triangle [f00, f01, f02, f11, f12, f22]
  const f = new Float64Array(6);
  const sigma = goal.kind === 'sigma';
  for (let i = 0; i < thetas.length; i++) {
    const th = thetas[i]!;
    const zero = th.every((v) => v === 0);
    if (!zero) fill(th);
    const factor = 10 ** th[0]!;
    for (let di = 0; di < todo.length; di++) {
      if (zero) {
        perDraw[di]![i] = todo[di]!.goal!;
        continue;
      }
      let count = 0;
      f.fill(0);
      for (const place of tierPlaces[di]!)
        count = addTierUnderDraw(table, stride, nS, place, factor, sigma, scratch, f, count);
      if (!sigma) perDraw[di]![i] = count;
      else perDraw[di]![i] = (count > 0 ? fisherSigmaUpper(f, parameterIndex) : undefined) ?? Infinity;
    }
  }
  todo.forEach((e, di) => {
    const v = percentilesOf(perDraw[di]!, [percentile])[0]!;
    values.set(e, Number.isFinite(v) ? v : undefined);
  });
  return {
    draws: thetas.length,
    source,
    percentile,
    value: (e) => values.get(e),
    perDraw: (e) => {
      const di = todo.indexOf(e);
      return di < 0 ? undefined : perDraw[di];
    },
    tabulated: series !== undefined,
  };
}

/** How often one design wins draw by draw: plan.robust.agreement (specs/plan.schema.json). */
export interface DrawAgreement {
  draws_ranked: number;
  best_fraction: number;
  near_best_fraction: number;
}

/**
 * How often `chosen` wins draw by draw among `candidates` (designs ranked by robustGoals): the
 * draws under which some candidate has a finite goal, and the fractions of those in which chosen's
 * goal is the best of them (a tie counts), and within `tolerance` of the best, judged as nearBest
 * (src/planning/search.ts) judges the assumed values: goal <= (1 + tolerance) best for a sigma,
 * >= (1 - tolerance) best for a count.
 */
export function drawAgreement(
  r: RobustResult,
  maximise: boolean,
  chosen: Evaluated,
  candidates: readonly Evaluated[],
  tolerance: number,
): DrawAgreement {
  const own = r.perDraw(chosen);
  const series = candidates.map((c) => r.perDraw(c)).filter((v): v is Float64Array => v !== undefined);
  let ranked = 0;
  let best = 0;
  let near = 0;
  for (let i = 0; i < r.draws; i++) {
    let top = maximise ? -Infinity : Infinity;
    for (const v of series) {
      const x = v[i]!;
      if (Number.isFinite(x) && (maximise ? x > top : x < top)) top = x;
    }
    if (!Number.isFinite(top)) continue;
    ranked++;
    const x = own ? own[i]! : NaN;
    if (!Number.isFinite(x)) continue;
    if (x === top) best++;
    if (maximise ? x >= (1 - tolerance) * top : x <= (1 + tolerance) * top) near++;
  }
  return {
    draws_ranked: ranked,
    best_fraction: ranked > 0 ? best / ranked : 0,
    near_best_fraction: ranked > 0 ? near / ranked : 0,
  };
}

/** A design's tier under every draw: its knot interval (the offset of its first knot) and Hermite weights in Delta, its area and its cosmic-variance fractions. */
interface TierPlace {
  at: number;
  weights: Float64Array;
  area: number;
  fractions: Float64Array;
  correlation: Float64Array;
}

/** addTierUnderDraw's scratch: a tier's Fisher matrix (its upper triangle), its slices' counts and b (3 per slice), the six interpolated sums. */
interface DrawScratch {
  matrix: Float64Array;
  counts: Float64Array;
  b: Float64Array;
  sums: Float64Array;
}

/**
 * One tier of a design under one draw: each slice's six sums interpolated between the draw's knots
 * (`table`, knots `stride` apart, 12 numbers per slice), times the draw's phi* factor and the tier's
 * area. Returns `count` plus the tier's count (slice by slice); with `sigma`, adds the tier's Fisher
 * matrix, marginalised over its slices' cosmic-variance nuisances, to f (upper triangles, as
 * marginaliseSymmetric3 holds them).
 */
function addTierUnderDraw(
  table: Float64Array,
  stride: number,
  nS: number,
  place: TierPlace,
  factor: number,
  sigma: boolean,
  s: DrawScratch,
  f: Float64Array,
  count: number,
): number {
  const { matrix, counts, b, sums } = s;
  matrix.fill(0);
  for (let sl = 0; sl < nS; sl++) {
    const a = place.at + sl * 12;
    interpolateSums(table, a, a + stride, place.weights, factor * place.area, sums);
    // (the sums are already scaled to the tier's area: a scale of 1 leaves them as they are)
    count += addSliceSums(matrix, sums, 1, counts, b, sl);
  }
  if (!sigma) return count;
  marginaliseSymmetric3(matrix, counts, b, place.fractions, place.correlation);
  // f += the tier's matrix, element by element (both upper triangles)
  for (let k = 0; k < 6; k++) f[k] = f[k]! + matrix[k]!;
  return count;
}

/** Panel widths and degrees of the draws' series (src/forecast/draw-sums.ts). */
export const SERIES_OPTIONS: DrawSumsOptions = { panelWidth: 3, degreeX: 24, panelWidthA: 0.7, degreeA: 14 };
/** Largest error estimate (relative, drawSumsTable) at which the series replace the exact sums. */
export const SERIES_TOLERANCE = 1e-10;

/**
 * The draws' sums as tabulated series over the range the draws reach (x from the first knot of the
 * lowest shift to the last knot of the highest, dA over the draws' alpha offsets), or undefined
 * where the exact passes (one per knot per draw with an offset) cost less or the series' error
 * estimate exceeds SERIES_TOLERANCE.
 */
function drawSeries(
  grid: DensityGrid,
  thetas: readonly (readonly number[])[],
  dLo: number,
  knots: number,
  always: boolean,
): DrawSumsTable | undefined {
  const reach = drawReach(grid, thetas);
  if (!reach) return undefined;
  // from the first knot at the lowest shift to the last knot at the highest
  const xRange: [number, number] = [dLo + reach.xRange[0], dLo + (knots - 1) * KNOT_STEP + reach.xRange[1]];
  const aRange = reach.aRange;
  if (!always && seriesPasses(xRange, aRange, SERIES_OPTIONS) >= reach.moved * knots) return undefined;
  const table = drawSumsTable(grid, xRange, aRange, SERIES_OPTIONS);
  // a slope error e moves a Hermite value by at most 4/27 h e (the largest |h10|, |h11|)
  const error = table.errorEstimate + (4 / 27) * KNOT_STEP * table.slopeErrorEstimate;
  return always || error <= SERIES_TOLERANCE ? table : undefined;
}
