/**
 * Counts in slices of measured (photometric) redshift (docs/survey-file.md, "Photometric redshifts").
 *
 * A source at true redshift z is measured at z + N(0, sigma (1 + z)) with probability 1 - f, and
 * with probability f anywhere in the window [zmin, zmax] with equal probability. The probability
 * that it is measured in [a, b] is
 *
 *   P(a, b | z) = (1 - f) [Phi((b - z) / s) - Phi((a - z) / s)] + f |[a, b] cut by the window| / (zmax - zmin),
 *
 * s = sigma (1 + z), Phi the standard normal distribution (a, b may be -inf, +inf). Detection (the
 * limit, the completeness, the histogram's magnitudes) depends on the true z only. The count of
 * a measured slice is area int dz dV/dz n(z) P(slice | z) over the true range of
 * src/model/photo-z.ts (6 sigma beyond the window: a source further away reaches it with
 * probability below 1e-9); every source in that range is an outlier with probability f.
 *
 * The integral runs on the count engine's nodes over pieces of the true range split at every
 * slice edge and, within 8 s of one, no wider than s, so that P is smooth over each piece
 * (further away it is constant to 1e-15). The engine counts the pieces once, node by node
 * (its nodeDetail option: each node's count, histogram row and luminosities); each measured slice
 * weights the nodes by P of the slice, and their plain sum is the count by true redshift. So
 * each row of the migration matrix (true bin by measured bin; bins [below the window,
 * slices..., above the window]) sums to its true count to rounding, since the P of the bins sum
 * to 1, and the grand total is conserved. Sigma 0 without outliers is the plain prediction itself.
 */
import erfc from '@stdlib/math-base-special-erfc';
import type { FlatCosmology } from '../cosmology/flat-cosmology.js';
import type { Population } from '../model/population.js';
import type { Survey } from '../model/survey.js';
import { photoZIsExact, photoZTrueRange, type PhotoZ } from '../model/photo-z.js';
import { makeObserver } from '../selection/observe.js';
import { populationAt, type ParameterOffsets } from '../population/model.js';
import type { Histogram, NodeDetail, RedshiftProfile, SliceCount } from './engine.js';
import { countWith, type CountMemo } from './count-memo.js';

/** Widest piece of the true range near a measured edge, in units of sigma (1 + z) at its low end. */
const PIECE_SIGMAS = 1;
/** How far from a measured edge pieces are kept that narrow, in sigma (1 + z): 1 - Phi(8) = 6e-16. */
const PIECE_ZONE = 8;

/** The migration of one population (or of several summed): what the prediction's photo_z block holds. */
export interface PhotoZMigration {
  sigma: number;
  outlierFraction: number;
  trueRange: { min: number; max: number };
  /** [true range min, first edge], the slices, [last edge, true range max]. */
  trueBins: { min: number; max: number }[];
  /** [-inf, first edge], the slices, [last edge, +inf] (null: unbounded). */
  measuredBins: { min: number | null; max: number | null }[];
  /** matrix[i][j]: expected sources in true bin i measured in bin j. */
  matrix: number[][];
  /** Row sums: the counts by true redshift of the true bins. */
  trueCounts: number[];
  /** Column sums: the counts by measured redshift of the measured bins. */
  measuredCounts: number[];
}

export interface PhotoZCount {
  /** The slices by measured redshift (count, histogram, luminosity and profile of the sources measured in each). */
  slices: SliceCount[];
  /** Per slice, the count of sources whose true redshift lies in it. */
  trueCounts: number[];
  migration: PhotoZMigration;
}

/** Phi(x) - Phi(y) for x >= y, accurate in both tails. */
function normalBetween(x: number, y: number): number {
  if (y >= 0) return 0.5 * (erfc(y / Math.SQRT2) - erfc(x / Math.SQRT2));
  if (x <= 0) return 0.5 * (erfc(-x / Math.SQRT2) - erfc(-y / Math.SQRT2));
  return 1 - 0.5 * (erfc(x / Math.SQRT2) + erfc(-y / Math.SQRT2));
}

/** P(measured in [a, b] | true z) for the window [zmin, zmax]. */
export function measuredProbability(
  pz: PhotoZ,
  window: { min: number; max: number },
  a: number,
  b: number,
  z: number,
): number {
  let g: number;
  if (pz.sigma > 0) {
    const s = pz.sigma * (1 + z);
    g = normalBetween((b - z) / s, (a - z) / s);
  } else g = z >= a && (z < b || (b === window.max && z === b)) ? 1 : 0;
  if (pz.outlierFraction === 0) return g;
  const overlap = Math.max(0, Math.min(b, window.max) - Math.max(a, window.min));
  return (1 - pz.outlierFraction) * g + (pz.outlierFraction * overlap) / (window.max - window.min);
}

/**
 * The pieces of [lo, hi]: split at the cuts and, within PIECE_ZONE standard deviations of each
 * measured edge (where P varies), no wider than PIECE_SIGMAS sigma (1 + z). Beyond that P is
 * constant to 1e-15 and the engine's own nodes take the piece whole.
 */
function pieces(lo: number, hi: number, cuts: readonly number[], edges: readonly number[], sigma: number): number[] {
  // the cuts are kept exactly (they bound the true bins); the zone points give way to them
  const points: { z: number; cut: boolean }[] = [lo, hi, ...cuts.filter((c) => c > lo && c < hi)].map((z) => ({
    z,
    cut: true,
  }));
  if (sigma > 0) {
    const r = PIECE_ZONE * sigma;
    for (const e of edges) {
      const from = Math.max(lo, (e - r) / (1 + r));
      const to = Math.min(hi, (e + r) / (1 - r));
      for (let z = from; z < to; z += PIECE_SIGMAS * sigma * (1 + z)) points.push({ z, cut: false });
    }
  }
  points.sort((x, y) => x.z - y.z || Number(y.cut) - Number(x.cut));
  const out: { z: number; cut: boolean }[] = [];
  for (const p of points) {
    const last = out[out.length - 1];
    // no piece narrower than a tenth of a step (or 1e-12)
    const minGap = Math.max(1e-12, 0.1 * PIECE_SIGMAS * sigma * (1 + p.z));
    if (!last || p.z - last.z > minGap) out.push(p);
    else if (p.cut && !last.cut) out[out.length - 1] = p;
    else if (p.cut && p.z !== last.z) out.push(p); // two cuts closer than the gap: keep both
  }
  return out.map((p) => p.z);
}

function sumHistograms(hs: Histogram[], width: number, variable: Histogram['variable']): Histogram {
  let kMin = Infinity;
  let kMax = -Infinity;
  for (const h of hs) {
    if (!h.counts.some((c) => c > 0)) continue;
    kMin = Math.min(kMin, Math.round(h.edges[0]! / width));
    kMax = Math.max(kMax, Math.round(h.edges[h.edges.length - 1]! / width));
  }
  if (!Number.isFinite(kMin)) {
    const h = hs.find((x) => x.edges.length > 1);
    return {
      variable,
      edges: h ? [...h.edges] : [0, width],
      counts: new Array<number>(h ? h.edges.length - 1 : 1).fill(0),
    };
  }
  const edges: number[] = [];
  for (let k = kMin; k <= kMax; k++) edges.push(Number((k * width).toPrecision(12)));
  const counts = new Array<number>(kMax - kMin).fill(0);
  for (const h of hs) {
    if (!h.counts.some((c) => c > 0)) continue;
    const off = Math.round(h.edges[0]! / width) - kMin;
    h.counts.forEach((c, i) => (counts[off + i]! += c));
  }
  return { variable, edges, counts };
}

export interface PhotoZOptions {
  offsets?: ParameterOffsets;
  noHistogram?: boolean;
  profile?: boolean;
  /** Where the engine's results of earlier counts are kept (predict's countMemo). */
  memo?: CountMemo;
}

/**
 * Count a population of a survey with photometric redshifts over the slice edges (measured
 * redshift). The survey's detection must have photoZ.
 */
export function countPhotoZ(
  survey: Survey,
  population: Population,
  cosmo: FlatCosmology,
  edges: readonly number[],
  options: PhotoZOptions = {},
): PhotoZCount {
  const d = survey.detection;
  const pz = d.kind === 'line_flux' ? undefined : d.photoZ;
  if (!pz) throw new Error('countPhotoZ needs a detection with photo_z');
  const window = population.window;
  const range = photoZTrueRange(window, pz);
  const e0 = edges[0]!;
  const eN = edges[edges.length - 1]!;
  const nSlices = edges.length - 1;
  const trueBins = [
    { min: Math.min(range.min, e0), max: e0 },
    ...edges.slice(0, -1).map((a, i) => ({ min: a, max: edges[i + 1]! })),
    { min: eN, max: Math.max(range.max, eN) },
  ];
  const measuredBins: PhotoZMigration['measuredBins'] = [
    { min: null, max: e0 },
    ...trueBins.slice(1, -1),
    { min: eN, max: null },
  ];
  const engine = { offsets: options.offsets };
  const count = countWith(options.memo);

  if (photoZIsExact(pz)) {
    // measured = true: the plain prediction, a diagonal matrix
    const slices = count(survey, population, cosmo, edges, {
      ...engine,
      noHistogram: options.noHistogram,
      profile: options.profile,
    });
    const counts = slices.map((s) => s.count);
    const trueCounts = [0, ...counts, 0];
    const matrix = trueCounts.map((c, i) => trueCounts.map((_, j) => (i === j ? c : 0)));
    return {
      slices,
      trueCounts: counts,
      migration: {
        sigma: pz.sigma,
        outlierFraction: pz.outlierFraction,
        trueRange: range,
        trueBins,
        measuredBins,
        matrix,
        trueCounts,
        measuredCounts: [...trueCounts],
      },
    };
  }

  // The population over the whole true range; the pieces in true redshift.
  const wide: Population = {
    ...population,
    window: { min: Math.min(range.min, window.min), max: Math.max(range.max, window.max) },
  };
  const fine = pieces(wide.window.min, wide.window.max, [...edges, window.min, window.max], edges, pz.sigma);
  const binOf = (zMid: number): number => {
    if (zMid < e0) return 0;
    if (zMid > eN) return nSlices + 1;
    let i = 1;
    while (i < nSlices && zMid > edges[i]!) i++;
    return i;
  };
  const pieceBin = fine.slice(0, -1).map((a, k) => binOf(0.5 * (a + fine[k + 1]!)));

  // One run over the pieces, node by node; each measured bin weights the nodes by P(bin | z).
  const run = count(survey, wide, cosmo, fine, { ...engine, nodeDetail: true });
  const trueCounts = new Array<number>(nSlices + 2).fill(0);
  const matrix = trueBins.map(() => new Array<number>(nSlices + 2).fill(0));
  run.forEach((p, k) => {
    for (const c of p.nodes!.count) trueCounts[pieceBin[k]!]! += c;
  });
  const slices: SliceCount[] = [];
  measuredBins.forEach((mb, j) => {
    const a = mb.min ?? -Infinity;
    const b = mb.max ?? Infinity;
    const weights = run.map((p) => p.nodes!.z.map((z) => measuredProbability(pz, window, a, b, z)));
    run.forEach((p, k) => {
      const w = weights[k]!;
      let sum = 0;
      p.nodes!.count.forEach((c, i) => (sum += w[i]! * c));
      matrix[pieceBin[k]!]![j]! += sum;
    });
    if (j >= 1 && j <= nSlices) slices.push(measuredSlice(survey, population, cosmo, a, b, run, weights, options));
  });
  // a piece of true redshift whose quadrature did not converge: said of the slice it lies in (or the
  // nearest, beyond the edges), the share its own
  run.forEach((p, k) => {
    const m = p.quadratureMissed;
    if (!m) return;
    const sl = slices[Math.min(nSlices, Math.max(1, pieceBin[k]!)) - 1]!;
    if (!sl.quadratureMissed || sl.quadratureMissed.share < m.share) sl.quadratureMissed = m;
  });
  const measuredCounts = measuredBins.map((_, j) => matrix.reduce((s, row) => s + row[j]!, 0));
  return {
    slices,
    trueCounts: trueCounts.slice(1, -1),
    migration: {
      sigma: pz.sigma,
      outlierFraction: pz.outlierFraction,
      trueRange: range,
      trueBins,
      measuredBins,
      matrix,
      trueCounts,
      measuredCounts,
    },
  };
}

/** A measured slice's sums over its pieces' nodes (total: undefined once some node's diverges). */
interface PieceSums {
  count: number;
  detected: number;
  total: number | undefined;
}

/** A measured slice's redshift profile as addPiece fills it: one entry per node of every piece. */
interface ProfileArrays {
  z: Float64Array;
  count: Float64Array;
  volumeMpc3: Float64Array;
  selected: Float64Array;
}

/**
 * One piece's nodes weighted by w into a measured slice's sums, histogram counts and profile (from
 * index `at`), in node order; returns the index after its last node. A function of its own, not a
 * closure made per piece and slice: each closure would be compiled by V8's optimising compiler
 * afresh (four times in a cold predict of the photo-z sample). The counts and the profile are typed
 * arrays (copied to plain ones once the slice is summed): plain arrays made empty per slice start
 * as small integers and turn into doubles at their first value, so code compiled on one slice's
 * arrays met another kind at the next ("wrong map") and was compiled again.
 */
function addPiece(
  nd: NodeDetail,
  w: readonly number[],
  counts: Float64Array,
  sums: PieceSums,
  profile: ProfileArrays,
  at: number,
): number {
  const n = nd.count.length;
  for (let i = 0; i < n; i++, at++) {
    const c = nd.count[i]!;
    const wi = w[i]!;
    sums.count += wi * c;
    sums.detected += wi * nd.detected[i]!;
    if (sums.total !== undefined) sums.total = nd.total ? sums.total + wi * nd.total[i]! : undefined;
    const row = nd.bins[i]!;
    for (let b = 0; b < row.length; b++) counts[b]! += wi * row[b]!;
    profile.z[at] = nd.z[i]!;
    profile.count[at] = wi * c;
    profile.volumeMpc3[at] = nd.volumeMpc3[i]!;
    profile.selected[at] = wi;
  }
  return at;
}

/** One measured slice: the pieces' nodes weighted by the probability of being measured in it. */
function measuredSlice(
  survey: Survey,
  population: Population,
  cosmo: FlatCosmology,
  zMin: number,
  zMax: number,
  run: SliceCount[],
  weights: number[][],
  options: PhotoZOptions,
): SliceCount {
  const observer = makeObserver(survey.detection, population, cosmo);
  const zCenter = Math.min(Math.max(0.5 * (zMin + zMax), population.window.min), population.window.max);
  const limitAtCenter = observer.at(
    zCenter,
    populationAt(population, zCenter, options.offsets).characteristic,
  ).limitInVariable;
  const width = survey.histogramWidth;
  const sums: PieceSums = { count: 0, detected: 0, total: 0 };
  let nodes = 0;
  for (const p of run) nodes += p.nodes!.count.length;
  const arrays: ProfileArrays = {
    z: new Float64Array(nodes),
    count: new Float64Array(nodes),
    volumeMpc3: new Float64Array(nodes),
    selected: new Float64Array(nodes),
  };
  // the pieces' histograms on one grid of multiples of the width
  const pieceHistograms: Histogram[] = [];
  let at = 0;
  for (let k = 0; k < run.length; k++) {
    const p = run[k]!;
    const counts = new Float64Array(p.histogram.counts.length);
    at = addPiece(p.nodes!, weights[k]!, counts, sums, arrays, at);
    pieceHistograms.push({ variable: p.histogram.variable, edges: p.histogram.edges, counts: Array.from(counts) });
  }
  const profile: Required<RedshiftProfile> = {
    z: Array.from(arrays.z),
    count: Array.from(arrays.count),
    volumeMpc3: Array.from(arrays.volumeMpc3),
    selected: Array.from(arrays.selected),
  };
  const { count, detected, total } = sums;
  const out: SliceCount = {
    zMin,
    zMax,
    volumeMpc3: survey.areaSr * cosmo.comovingVolumeBetweenMpc3Sr(zMin, zMax),
    count,
    limitAtCenter,
    histogram: options.noHistogram
      ? { variable: observer.variable, edges: [], counts: [] }
      : sumHistograms(pieceHistograms, width, observer.variable),
  };
  if (!options.noHistogram) out.luminosity = total === undefined ? { detected } : { detected, total };
  if (options.profile) out.profile = profile;
  return out;
}

/** The migration of several populations counted on the same edges over the same window: the sum. */
export function sumMigrations(ms: readonly PhotoZMigration[]): PhotoZMigration {
  const first = ms[0]!;
  const add = (rows: (m: PhotoZMigration) => number[]): number[] =>
    rows(first).map((_, i) => ms.reduce((s, m) => s + rows(m)[i]!, 0));
  return {
    ...first,
    matrix: first.matrix.map((row, i) => row.map((_, j) => ms.reduce((s, m) => s + m.matrix[i]![j]!, 0))),
    trueCounts: add((m) => m.trueCounts),
    measuredCounts: add((m) => m.measuredCounts),
  };
}
