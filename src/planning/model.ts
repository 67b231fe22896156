/**
 * One design's numbers from the depth tables (tables.ts) and the cosmic-variance tables:
 * a tier of `pointings` pointings of `hours` each gives
 *   area = pointings x field of view,  limit = depth law (hours),
 *   count, count fainter than L* (or M*), and the Fisher matrix of the forecast
 *   (src/forecast/fisher.ts: Poisson information with one normalisation nuisance per slice,
 *   marginalised; the nuisance prior is the slice's cosmic-variance fraction).
 *
 * Cosmic-variance fraction of a slice = bias x sigma_matter / sqrt(field count), as in every
 * prediction (src/uncertainty/prediction.ts): the bias depends on the depth (abundance matching
 * of the slice's number density when the bias is "auto"), sigma_matter on the area only. Both are
 * tabulated (bias on knots 0.25 apart in Delta; ln sigma_matter on knots at most 0.35 apart in
 * ln area) and interpolated by natural cubic splines with one extra knot beyond each end of the
 * range used. The pointings of a plan share the survey's `field` (aspect, count): the area grows
 * as one contiguous field per field count.
 */
import { FlatCosmology } from '../cosmology/flat-cosmology.js';
import type { Population } from '../model/population.js';
import type { Survey } from '../model/survey.js';
import { SR_PER_DEG2, FULL_SKY_DEG2 } from '../model/sky.js';
import { buildDensityGrid, sliceCount, type DensityGrid } from '../forecast/grid.js';
import { summariseFisher } from '../forecast/fisher.js';
import { addSliceSums, marginaliseSymmetric3 } from './sigma.js';
import { uncertaintyContext, populationBias, matterSigma, slicesCorrelation } from '../uncertainty/prediction.js';
import { naturalCubicSpline, naturalCubicSplines, type Interpolant } from '../numerics/interpolate.js';
import { inputError } from '../errors.js';
import { depthOfLimit, limitOfDepth, type DepthModel, type LimitKind } from './depth.js';
import { interpolateSlice, tabulateDepth, type DepthTables } from './tables.js';
import { defaultWorkers } from '../parallel/blocks.js';

const LN10 = Math.LN10;
const BIAS_STEP = 0.25;
const AREA_STEP = 0.35;

/** One tier: its numbers at a given exposure and number of pointings. */
export interface TierValue {
  hours: number;
  pointings: number;
  areaDeg2: number;
  limit: number;
  count: number;
  faintCount: number;
  /** Fisher matrix (3 x 3), with cosmic variance marginalised unless switched off. */
  fisher: number[][];
}

export interface DesignModelOptions {
  cosmicVariance?: boolean;
  /** Most worker threads for the depth tables (default up to 4; threads start only beyond the break-even of src/parallel/blocks.ts). */
  workers?: number;
  onProgress?: (done: number, total: number) => void;
}

export interface DesignModel {
  population: Population;
  limitKind: LimitKind;
  fieldOfViewDeg2: number;
  /** Largest number of pointings (whole sky). */
  maxPointings: number;
  depth: DepthModel;
  tables: DepthTables;
  grid: DensityGrid;
  /** Depth range covered, as exposure hours. */
  hoursRange: [number, number];
  tier(hours: number, pointings: number): TierValue;
  /**
   * The same tier's count, faint count and Fisher matrix (row-major) written to `out` from `at`
   * (TIER_VALUES numbers, equal to those of `tier`), without allocating anything.
   */
  tierInto(hours: number, pointings: number, out: Float64Array, at: number): void;
  /** The survey the grid tabulates: the deepest limit of the plan, over 1 deg^2. */
  reference: Survey;
  /** How much shallower than the grid's (deepest) limit `hours` reach, as a shift of ln u (the tables' Delta). */
  deltaAt(hours: number): number;
  /** The per-slice cosmic-variance fractions the tier's Fisher matrix marginalises (all 0 without cosmic variance). */
  fractionsAt(hours: number, pointings: number): number[];
  /** The correlation of the slices' nuisances (n x n, row-major) at the tier's area: it depends on the area only. */
  correlationAt(pointings: number): Float64Array;
  /**
   * The node-order search's hard-limit counts by z of `reference` (buildDensityGrid's hardCounts),
   * for another grid of the same survey and population (the robust ranking's coarser panels pick
   * the same redshift nodes).
   */
  hardCounts: Map<number, number>;
}

/** Numbers `tierInto` writes: count, faint count, the 3 x 3 Fisher matrix row by row. */
export const TIER_VALUES = 11;

/** The survey with its detection limit set to `limit` and its completeness curve moved with it. */
export function surveyAtLimit(survey: Survey, limit: number, areaDeg2 = survey.areaDeg2): Survey {
  const d = survey.detection;
  const base = { ...survey, areaDeg2, areaSr: areaDeg2 * SR_PER_DEG2 };
  if (d.kind === 'threshold') throw new Error('surveyAtLimit: a threshold survey has no exposure-time limit');
  const kind = d.kind;
  const old = kind === 'magnitude' ? d.limitMag : d.limitCgs;
  const dx = depthOfLimit(kind, limit) - depthOfLimit(kind, old); // completeness variable moves deeper by dx
  // (a moved magnitude limit is no longer the flux density the file gave, if it gave one)
  const det =
    kind === 'magnitude'
      ? { ...d, limitMag: limit, limitGivenJy: undefined }
      : { ...d, limitCgs: limit, limitGivenJyKms: undefined };
  if (d.completeness) {
    const c = d.completeness;
    det.completeness = c.model === 'logistic' ? { ...c, half: c.half + dx } : { ...c, x: c.x.map((v) => v + dx) };
  }
  return { ...base, detection: det };
}

function splineWithMargin(
  x0: number,
  x1: number,
  step: number,
  f: (x: number) => number,
): Interpolant | ((x: number) => number) {
  const xs = knotsWithMargin(x0, x1, step);
  if (!xs) {
    const v = f(x0);
    return () => v;
  }
  return naturalCubicSpline(xs, xs.map(f));
}

/** splineWithMargin's knots on [x0, x1], or undefined where the range is a point (a constant). */
function knotsWithMargin(x0: number, x1: number, step: number): number[] | undefined {
  if (!(x1 - x0 > 1e-9)) return undefined;
  const n = Math.max(3, Math.ceil((x1 - x0) / step) + 1);
  const h = (x1 - x0) / (n - 1);
  const xs: number[] = [];
  for (let i = -1; i <= n; i++) xs.push(x0 + i * h);
  return xs;
}

export async function buildDesignModel(
  survey: Survey,
  population: Population,
  spec: { limitKind: LimitKind; depth: DepthModel; fieldOfViewDeg2: number },
  hoursRange: [number, number],
  pointingsRange: [number, number],
  opts: DesignModelOptions = {},
): Promise<DesignModel> {
  const { depth, limitKind } = spec;
  const [h0, h1] = hoursRange;
  const range = depth.depthRange(h0, h1);
  const dRef = range.deepest;
  const slope = limitKind === 'magnitude' ? 2.5 : 1;
  const deltaOf = (hours: number): number => Math.max(0, (LN10 * (dRef - depth.depthAt(hours))) / slope);
  const maxDelta = Math.max(0, (LN10 * (dRef - range.shallowest)) / slope);

  // Reference survey: the deepest limit, 1 deg^2 (everything below scales with the area).
  const ref = surveyAtLimit(survey, limitOfDepth(limitKind, dRef), 1);
  const cosmo = new FlatCosmology(survey.cosmology);
  const hardCounts = new Map<number, number>();
  const grid = buildDensityGrid(ref, population, cosmo, ref.sliceEdges, 1, hardCounts);
  const workers = opts.workers ?? defaultWorkers();
  const tables = await tabulateDepth(grid, maxDelta, {
    workers,
    ...(opts.onProgress ? { onProgress: opts.onProgress } : {}),
  });
  const nS = sliceCount(grid);
  const edges = ref.sliceEdges;
  const useCv = opts.cosmicVariance !== false;

  // Cosmic-variance tables.
  let biasOf: ((sl: number, delta: number) => number) | undefined;
  let sigmaOf: ((sl: number, lnArea: number) => number) | undefined;
  let correlationInto: ((lnArea: number, out: Float64Array) => void) | undefined;
  if (useCv) {
    const ctx = uncertaintyContext(ref, cosmo);
    // each slice's volume as the count engine gives it (src/counts/engine.ts countPopulation), without counting
    const volumes = Array.from(
      { length: nS },
      (_, sl) => ref.areaSr * cosmo.comovingVolumeBetweenMpc3Sr(edges[sl]!, edges[sl + 1]!),
    );
    const tmp = new Float64Array(7);
    const zc = (sl: number) => 0.5 * (edges[sl]! + edges[sl + 1]!);
    const countAt = (sl: number, delta: number) => {
      interpolateSlice(tables, sl, delta, tmp);
      return tmp[0]!;
    };
    const biasSplines = Array.from({ length: nS }, (_, sl) => {
      if (population.bias !== 'auto') {
        const b = populationBias(ctx, population, zc(sl), 1, 1).bias;
        return () => b;
      }
      const vol = volumes[sl]!;
      return splineWithMargin(0, maxDelta, BIAS_STEP, (delta) => {
        const n = countAt(sl, Math.max(0, Math.min(maxDelta, delta)));
        return n > 0 && vol > 0 ? populationBias(ctx, population, zc(sl), n, vol).bias : 0;
      });
    });
    biasOf = (sl, delta) => biasSplines[sl]!(delta);
    const lnA0 = Math.log(Math.max(1e-12, pointingsRange[0] * spec.fieldOfViewDeg2));
    const lnA1 = Math.log(Math.min(FULL_SKY_DEG2, pointingsRange[1] * spec.fieldOfViewDeg2));
    const sigmaSplines = Array.from({ length: nS }, (_, sl) =>
      splineWithMargin(lnA0, Math.max(lnA0, lnA1), AREA_STEP, (lnA) => {
        const a = Math.min(FULL_SKY_DEG2, Math.exp(lnA));
        const c = { ...ctx, survey: { ...ref, areaDeg2: a, areaSr: a * SR_PER_DEG2 } };
        return Math.log(matterSigma(c, edges[sl]!, edges[sl + 1]!, zc(sl)));
      }),
    );
    sigmaOf = (sl, lnA) => Math.exp(sigmaSplines[sl]!(lnA));
    // the slices' correlation (src/uncertainty/box-covariance.ts), a spline per pair on the same knots
    if (nS > 1) {
      const byArea = new Map<number, number[][]>();
      const correlationAtKnot = (lnA: number): number[][] => {
        let r = byArea.get(lnA);
        if (!r) {
          const a = Math.min(FULL_SKY_DEG2, Math.exp(lnA));
          byArea.set(
            lnA,
            (r = slicesCorrelation({ ...ctx, survey: { ...ref, areaDeg2: a, areaSr: a * SR_PER_DEG2 } }, edges)),
          );
        }
        return r;
      };
      // every pair's spline on splineWithMargin's knots, evaluated together (naturalCubicSplines:
      // the same numbers as one naturalCubicSpline per pair, with one knot search per design rather
      // than one per pair; n^2 / 2 pairs at every design's area)
      const pairs = (nS * (nS - 1)) / 2;
      const values = new Float64Array(pairs);
      let pairsAt: (lnA: number, out: Float64Array) => void;
      const knots = knotsWithMargin(lnA0, Math.max(lnA0, lnA1), AREA_STEP);
      if (!knots) {
        const r = correlationAtKnot(lnA0);
        for (let i = 0, p = 0; i < nS; i++) for (let j = i + 1; j < nS; j++) values[p++] = r[i]![j]!;
        pairsAt = () => {};
      } else {
        const byKnot = knots.map(correlationAtKnot);
        const rows: number[][] = [];
        for (let i = 0; i < nS; i++) for (let j = i + 1; j < nS; j++) rows.push(byKnot.map((r) => r[i]![j]!));
        pairsAt = naturalCubicSplines(knots, rows);
      }
      correlationInto = (lnA, out) => {
        pairsAt(lnA, values);
        for (let i = 0, p = 0; i < nS; i++)
          for (let j = i + 1; j < nS; j++, p++) {
            // (a spline's overshoot held within [-1, 1])
            const r = Math.max(-1, Math.min(1, values[p]!));
            out[i * nS + j] = r;
            out[j * nS + i] = r;
          }
      };
    }
  }
  const fieldNorm = 1 / Math.sqrt(survey.field.count);
  const shiftLn = grid.shift; // unused directly; the sums already carry it
  void shiftLn;

  // One evaluation writes its numbers into scratch space (no allocation), so that a search over
  // tens of thousands of designs (search.ts) leaves no garbage behind; `tier` copies them out.
  const tmp = new Float64Array(7);
  const sliceN = new Float64Array(nS);
  const sliceB = new Float64Array(3 * nS);
  const fractions = new Float64Array(nS);
  const correlation = new Float64Array(nS * nS);
  for (let i = 0; i < nS; i++) correlation[i * nS + i] = 1;
  const upper = new Float64Array(6);
  const matrix = [
    [0, 0, 0],
    [0, 0, 0],
    [0, 0, 0],
  ];
  let count = 0;
  let faint = 0;
  let areaDeg2 = 0;
  const evaluate = (hours: number, pointings: number): void => {
    areaDeg2 = Math.min(FULL_SKY_DEG2, pointings * spec.fieldOfViewDeg2);
    const delta = deltaOf(hours);
    // the matrix's upper triangle summed slice after slice
    upper.fill(0);
    count = 0;
    faint = 0;
    const lnA = Math.log(areaDeg2);
    for (let sl = 0; sl < nS; sl++) {
      interpolateSlice(tables, sl, delta, tmp);
      const n = addSliceSums(upper, tmp, areaDeg2, sliceN, sliceB, sl);
      count += n;
      faint += tmp[6]! * areaDeg2;
      fractions[sl] = biasOf && sigmaOf && n > 0 ? Math.max(0, biasOf(sl, delta)) * sigmaOf(sl, lnA) * fieldNorm : 0;
    }
    if (useCv) {
      correlationInto?.(lnA, correlation);
      marginaliseSymmetric3(upper, sliceN, sliceB, fractions, correlation);
    }
    // the full matrix, its lower triangle the mirror of the upper
    const r0 = matrix[0]!;
    const r1 = matrix[1]!;
    const r2 = matrix[2]!;
    r0[0] = upper[0]!;
    r0[1] = upper[1]!;
    r0[2] = upper[2]!;
    r1[0] = upper[1]!;
    r1[1] = upper[3]!;
    r1[2] = upper[4]!;
    r2[0] = upper[2]!;
    r2[1] = upper[4]!;
    r2[2] = upper[5]!;
  };
  const tier = (hours: number, pointings: number): TierValue => {
    evaluate(hours, pointings);
    return {
      hours,
      pointings,
      areaDeg2,
      limit: depth.limitAt(hours),
      count,
      faintCount: Math.max(0, Math.min(faint, count)),
      fisher: matrix.map((r) => [...r]),
    };
  };
  const tierInto = (hours: number, pointings: number, out: Float64Array, at: number): void => {
    evaluate(hours, pointings);
    out[at] = count;
    out[at + 1] = Math.max(0, Math.min(faint, count));
    out[at + 2] = upper[0]!;
    out[at + 3] = upper[1]!;
    out[at + 4] = upper[2]!;
    out[at + 5] = upper[1]!;
    out[at + 6] = upper[3]!;
    out[at + 7] = upper[4]!;
    out[at + 8] = upper[2]!;
    out[at + 9] = upper[4]!;
    out[at + 10] = upper[5]!;
  };

  const fractionsAt = (hours: number, pointings: number): number[] => {
    evaluate(hours, pointings);
    return Array.from(fractions);
  };
  const correlationAt = (pointings: number): Float64Array => {
    const out = Float64Array.from(correlation);
    correlationInto?.(Math.log(Math.min(FULL_SKY_DEG2, pointings * spec.fieldOfViewDeg2)), out);
    return out;
  };

  return {
    reference: ref,
    hardCounts,
    deltaAt: deltaOf,
    fractionsAt,
    correlationAt,
    population,
    limitKind,
    fieldOfViewDeg2: spec.fieldOfViewDeg2,
    maxPointings: Math.max(1, Math.floor(FULL_SKY_DEG2 / spec.fieldOfViewDeg2 + 1e-9)),
    depth,
    tables,
    grid,
    hoursRange: [h0, h1],
    tier,
    tierInto,
  };
}

/** Standard deviations from a Fisher matrix (forecast's summariseFisher); undefined if singular. */
export function sigmasOf(fisher: number[][]): number[] | undefined {
  return summariseFisher(fisher)?.sigma;
}

/** Check that a design model can count something at all. */
export function assertCounts(model: DesignModel, file: string, selectionHint = ''): void {
  const v = model.tier(model.hoursRange[1], 1);
  if (!(v.count > 0)) {
    throw inputError(
      'no_sources',
      file,
      'plan',
      `no source of "${model.population.name}" is expected even at the deepest exposure of the grid`,
      `check the population, the window and plan.reference${selectionHint}`,
    );
  }
}
