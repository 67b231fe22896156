/**
 * Counts and Fisher information of one population as functions of the survey's depth, tabulated
 * once per plan so that every design costs microseconds.
 *
 * A deeper exposure moves the detection limit and the completeness curve together (the curve
 * given in the file is taken to belong to the file's limit and keeps its shape). Then, with
 * s = ln u measured at the DEEPEST limit of the plan (the reference, tabulated once by the
 * forecast's density grid, src/forecast/grid.ts), a design shallower by Delta (in ln u) has the
 * density
 *
 *   lambda(z, s) = V phi* exp((alpha+1) t - e^t) c_ref(obs(s)),   t = s + Delta,   s >= s_lim(z)
 *
 * on the SAME quadrature points: the limit and the completeness curve are fixed in s, only the
 * Schechter factor moves. Delta = ln 10 (d_ref - d) / |slope|, where d is the depth (magnitude or
 * -log10 line flux) and slope is 2.5 (magnitudes) or 1 (line flux).
 *
 * For each slice the tabulated numbers are the Poisson Fisher sums of src/forecast/fisher.ts
 * (count N, b_c = sum g dc, b_a = sum g t, F_cc, F_ca, F_aa with dc = shift (alpha+1-u)), their exact
 * derivatives in Delta, and the count fainter than the characteristic luminosity (u < 1, i.e.
 * t < 0) with its derivative. Values between knots come from cubic Hermite interpolation on knots
 * 0.05 apart in Delta (interpolation error ~ h^4 f''''/384, below 1e-6 relative; checked against
 * direct evaluation in test/planning/tables.test.ts).
 *
 * Knots are independent: with workers > 1 they are split among worker threads, and every knot is
 * computed by the same function, so the tables are identical whatever the number of workers
 * (the worker entry, src/worker.ts, names `knotBlocks` as the job 'plan-depth-tables').
 */
import type { DensityGrid } from '../forecast/grid.js';
import { sliceCount } from '../forecast/grid.js';
import { gaussLegendreRule } from '../numerics/quadrature.js';
import { completenessBreaks, completenessFunction } from '../selection/completeness.js';
import { runBlocks, type BlockFunction } from '../parallel/blocks.js';
import type { WorkerJob } from '../worker.js';

const LN10 = Math.LN10;
/** Knot spacing in Delta (ln u). */
export const KNOT_STEP = 0.05;
/** Numbers per slice per knot: 6 sums, 6 derivatives, faint count and its derivative. */
export const PER_SLICE = 14;
const PANEL_POINTS = 8;
const MAX_PANEL = 0.3;

export interface DepthTables {
  slices: number;
  knots: number;
  step: number;
  /** knots x slices x PER_SLICE numbers. */
  data: Float64Array;
}

/** The numbers of every slice at one Delta >= 0, written into out[offset ...]: knotSums, then the faint count. */
export function knotValues(
  grid: DensityGrid,
  delta: number,
  out: Float64Array,
  offset: number,
  faint: FaintCounter = faintCounter(grid),
): void {
  knotSums(grid, delta, 0, out, offset, PER_SLICE);
  for (let sl = 0; sl < sliceCount(grid); sl++) faint(sl, delta, out, offset + sl * PER_SLICE + 12);
}

/**
 * The six Fisher sums of every slice (N, b_c, b_a, F_cc, F_ca, F_aa of src/forecast/fisher.ts) and
 * their derivatives in x at shift x and alpha offset dA, into out[offset + stride sl ...] (the sums,
 * then the derivatives): g = exp(logW + a y - u), y = t + x, u = e^y, a = alpha + 1 + dA,
 * d ln g / dx = a - u, d dc / dx = -s u, dy / dx = 1.
 */
export function knotSums(
  grid: DensityGrid,
  x: number,
  dA: number,
  out: Float64Array,
  offset: number,
  stride = 12,
): void {
  const eX = Math.exp(x);
  const { nodePointStart, sliceNodeStart } = grid;
  for (let sl = 0; sl < sliceCount(grid); sl++) {
    const q0 = nodePointStart[sliceNodeStart[sl]!]!;
    const q1 = nodePointStart[sliceNodeStart[sl + 1]!]!;
    sliceKnotSums(grid, q0, q1, x, eX, dA, out, offset + stride * sl);
  }
}

/**
 * knotSums of one slice (its points q0 to q1) into out[o ..], in a function of its own for the
 * reason sliceFisherSums (src/forecast/draw-sums.ts) is: as knotSums' inner loop, V8 compiled it
 * while it ran and threw the code away at the unfed code after it.
 */
function sliceKnotSums(
  grid: DensityGrid,
  q0: number,
  q1: number,
  x: number,
  eX: number,
  dA: number,
  out: Float64Array,
  o: number,
): void {
  const s = grid.shift;
  const { pointT, pointExpT, pointLogW, pointA1 } = grid;
  let n = 0,
    bc = 0,
    ba = 0,
    fcc = 0,
    fca = 0,
    faa = 0,
    dn = 0,
    dbc = 0,
    dba = 0,
    dfcc = 0,
    dfca = 0,
    dfaa = 0;
  for (let q = q0; q < q1; q++) {
    const a = pointA1[q]! + dA;
    const y = pointT[q]! + x;
    const u = pointExpT[q]! * eX;
    const g = Math.exp(pointLogW[q]! + a * y - u);
    const dc = s * (a - u);
    const k = a - u;
    const su = s * u;
    n += g;
    bc += g * dc;
    ba += g * y;
    fcc += g * dc * dc;
    fca += g * dc * y;
    faa += g * y * y;
    dn += g * k;
    dbc += g * (k * dc - su);
    dba += g * (k * y + 1);
    dfcc += g * (k * dc * dc - 2 * su * dc);
    dfca += g * (k * dc * y - su * y + dc);
    dfaa += g * (k * y * y + 2 * y);
  }
  out[o] = n;
  out[o + 1] = bc;
  out[o + 2] = ba;
  out[o + 3] = fcc;
  out[o + 4] = fca;
  out[o + 5] = faa;
  out[o + 6] = dn;
  out[o + 7] = dbc;
  out[o + 8] = dba;
  out[o + 9] = dfcc;
  out[o + 10] = dfca;
  out[o + 11] = dfaa;
}

/**
 * Count of slice `sl` fainter than the characteristic value (u < 1) at Delta, and its derivative
 * in Delta: per redshift node, integral over s from s_lim to -Delta of exp(a1 (s+Delta) - e^(s+Delta))
 * c(obs(s)) ds (Gauss-Legendre panels no wider than 0.3, split at completeness break points, as
 * in the density grid); d/dDelta adds the integral of the integrand times (a1 - u) and subtracts
 * the integrand at the upper end (u = 1).
 */
export function faintCount(grid: DensityGrid, sl: number, delta: number): { count: number; derivative: number } {
  const out = new Float64Array(2);
  faintCounter(grid)(sl, delta, out, 0);
  return { count: out[0]!, derivative: out[1]! };
}

/** faintCount of one grid: slice `sl` at Delta, the count into out[at] and its derivative into out[at + 1]. */
export type FaintCounter = (sl: number, delta: number, out: Float64Array, at: number) => void;

/** A piece of a node's range between two cuts that Delta does not move: its nodes s and weights times completeness. */
interface FixedPiece {
  s: Float64Array;
  wc: Float64Array;
  count: number;
}

/**
 * faintCount for one grid, Delta after Delta (the depth tables' knots), with the same arithmetic
 * in the same order. A node's range [s_lim, -Delta] is cut at the completeness break points
 * inside it; only the last piece ends at -Delta, so the pieces before it have the same nodes,
 * weights and completeness at every Delta: those are made once per node and piece and kept (the
 * completeness was most of faintCount's time, one exponential per node per knot).
 */
export function faintCounter(grid: DensityGrid): FaintCounter {
  const comp = grid.completeness;
  const cfn = comp ? completenessFunction(comp, grid.kind, grid.variable) : undefined;
  const breaks = comp ? completenessBreaks(comp, grid.kind) : undefined;
  const slope = grid.slope;
  const maxStep = Math.min(
    MAX_PANEL,
    breaks && Number.isFinite(breaks.scale) ? (breaks.scale * LN10) / Math.abs(slope) : MAX_PANEL,
  );
  const { nodes, weights } = gaussLegendreRule(PANEL_POINTS);
  const nodeCount = grid.nodeZ.length;
  // per node: the break points' s above s_lim, ascending; and the pieces they bound
  const cutsOf: (Float64Array | undefined)[] = new Array<Float64Array | undefined>(nodeCount);
  const piecesOf: (FixedPiece | undefined)[][] = Array.from({ length: nodeCount }, () => []);
  // per node: exp(nodeLogV), made at its first use (NaN until then)
  const volumeOf = new Float64Array(nodeCount).fill(NaN);

  const nodeCuts = (j: number): Float64Array => {
    let cuts = cutsOf[j];
    if (cuts) return cuts;
    const sLim = grid.nodeTLim[j]!;
    const obsA = grid.nodeObsA[j]!;
    const list: number[] = [];
    if (breaks) {
      for (const bp of breaks.points) {
        const t = (LN10 * (bp - obsA)) / slope;
        if (t > sLim) list.push(t);
      }
    }
    list.sort((x, y) => x - y);
    cuts = Float64Array.from(list);
    cutsOf[j] = cuts;
    return cuts;
  };

  /** Piece i of node j: from s_lim (i = 0) or the i-th break point to the next break point. */
  const fixedPiece = (j: number, i: number): FixedPiece => {
    const kept = piecesOf[j]![i];
    if (kept) return kept;
    const cuts = nodeCuts(j);
    const obsA = grid.nodeObsA[j]!;
    const a = i === 0 ? grid.nodeTLim[j]! : cuts[i - 1]!;
    const b = cuts[i]!;
    const nSub = Math.max(1, Math.ceil((b - a) / maxStep));
    const h = (b - a) / nSub;
    const piece: FixedPiece = {
      s: new Float64Array(nSub * PANEL_POINTS),
      wc: new Float64Array(nSub * PANEL_POINTS),
      count: 0,
    };
    for (let p = 0; p < nSub; p++) {
      const pa = a + p * h;
      for (let q = 0; q < PANEL_POINTS; q++) {
        const sv = pa + 0.5 * h * (nodes[q]! + 1);
        const cv = cfn ? cfn(obsA + (slope * sv) / LN10) : 1;
        if (!(cv > 0)) continue;
        piece.s[piece.count] = sv;
        piece.wc[piece.count] = 0.5 * h * weights[q]! * cv;
        piece.count++;
      }
    }
    piecesOf[j]![i] = piece;
    return piece;
  };

  const sums = new Float64Array(2);
  /** The fixed piece's terms added to sums[0] (integrand) and sums[1] (integrand times a1 - u). */
  const addFixed = (piece: FixedPiece, a1: number, delta: number): void => {
    let c = sums[0]!;
    let d = sums[1]!;
    const { s, wc, count } = piece;
    for (let i = 0; i < count; i++) {
      const t = s[i]! + delta;
      const u = Math.exp(t);
      const w = wc[i]! * Math.exp(a1 * t - u);
      c += w;
      d += w * (a1 - u);
    }
    sums[0] = c;
    sums[1] = d;
  };
  /** The last piece's terms, [a, upper], its nodes made afresh. */
  const addLast = (a: number, upper: number, obsA: number, a1: number, delta: number): void => {
    let c = sums[0]!;
    let d = sums[1]!;
    const nSub = Math.max(1, Math.ceil((upper - a) / maxStep));
    const h = (upper - a) / nSub;
    for (let p = 0; p < nSub; p++) {
      const pa = a + p * h;
      for (let q = 0; q < PANEL_POINTS; q++) {
        const sv = pa + 0.5 * h * (nodes[q]! + 1);
        const cv = cfn ? cfn(obsA + (slope * sv) / LN10) : 1;
        if (!(cv > 0)) continue;
        const t = sv + delta;
        const u = Math.exp(t);
        const w = 0.5 * h * weights[q]! * cv * Math.exp(a1 * t - u);
        c += w;
        d += w * (a1 - u);
      }
    }
    sums[0] = c;
    sums[1] = d;
  };

  return (sl, delta, out, at) => {
    let count = 0;
    let derivative = 0;
    const upper = -delta;
    for (let j = grid.sliceNodeStart[sl]!; j < grid.sliceNodeStart[sl + 1]!; j++) {
      const sLim = grid.nodeTLim[j]!;
      if (!(upper > sLim)) continue;
      const a1 = grid.nodeA1[j]!;
      const obsA = grid.nodeObsA[j]!;
      let v = volumeOf[j]!;
      if (Number.isNaN(v)) volumeOf[j] = v = Math.exp(grid.nodeLogV[j]!);
      const cuts = nodeCuts(j);
      let k = 0;
      while (k < cuts.length && cuts[k]! < upper) k++;
      sums[0] = 0;
      sums[1] = 0;
      for (let i = 0; i < k; i++) addFixed(fixedPiece(j, i), a1, delta);
      addLast(k === 0 ? sLim : cuts[k - 1]!, upper, obsA, a1, delta);
      const cEnd = cfn ? cfn(obsA + (slope * upper) / LN10) : 1;
      const d = sums[1] - Math.exp(-1) * cEnd;
      count += v * sums[0];
      derivative += v * d;
    }
    out[at] = count;
    out[at + 1] = derivative;
  };
}

/** Knots 0, step, 2 step, ... covering [0, maxDelta]. */
export function knotCount(maxDelta: number): number {
  return Math.max(2, Math.ceil(maxDelta / KNOT_STEP - 1e-9) + 1);
}

const TABLES_JOB: WorkerJob = 'plan-depth-tables';

/** The block function of a grid: knots [start, end) into one array, knot after knot. */
export function knotBlocks(grid: DensityGrid): BlockFunction<{ values: Float64Array }> {
  const nS = sliceCount(grid);
  const faint = faintCounter(grid);
  return (start, end) => {
    const values = new Float64Array((end - start) * nS * PER_SLICE);
    for (let k = start; k < end; k++) knotValues(grid, k * KNOT_STEP, values, (k - start) * nS * PER_SLICE, faint);
    return { values };
  };
}

/** Tabulate every knot up to maxDelta, in this thread or in `workers` worker threads (src/parallel/blocks.ts). */
export async function tabulateDepth(
  grid: DensityGrid,
  maxDelta: number,
  opts: { workers?: number; onProgress?: (done: number, total: number) => void } = {},
): Promise<DepthTables> {
  const knots = knotCount(maxDelta);
  const nS = sliceCount(grid);
  const data = new Float64Array(knots * nS * PER_SLICE);
  const workers = Math.max(1, Math.min(opts.workers ?? 1, Math.ceil(knots / 8)));
  const block = Math.max(1, Math.min(16, Math.ceil(knots / (workers * 4))));
  await runBlocks({
    total: knots,
    block,
    workers,
    data: grid,
    prepare: knotBlocks,
    job: TABLES_JOB,
    onBlock: (start, _end, r: { values: Float64Array }) => data.set(r.values, start * nS * PER_SLICE),
    onProgress: opts.onProgress,
    name: 'plan',
    items: 'depth knots',
  });
  return { slices: nS, knots, step: KNOT_STEP, data };
}

/**
 * The cubic Hermite weights at x in [0, 1] of a knot interval h wide, into w: h00, h10, h01, h11
 * (of the value and the slope at the interval's start, then at its end).
 */
export function hermiteWeights(x: number, h: number, w: Float64Array): void {
  const x2 = x * x;
  const x3 = x2 * x;
  w[0] = 2 * x3 - 3 * x2 + 1;
  w[1] = (x3 - 2 * x2 + x) * h;
  w[2] = -2 * x3 + 3 * x2;
  w[3] = (x3 - x2) * h;
}

/**
 * The six Fisher sums of one slice interpolated between two knots (their sums at d[a..a+5] and
 * d[b..b+5], the sums' derivatives 6 places after each) with Hermite weights w, times `factor`,
 * into out[0..5].
 */
export function interpolateSums(
  d: Float64Array,
  a: number,
  b: number,
  w: Float64Array,
  factor: number,
  out: Float64Array,
): void {
  for (let k = 0; k < 6; k++)
    out[k] = factor * (w[0]! * d[a + k]! + w[1]! * d[a + 6 + k]! + w[2]! * d[b + k]! + w[3]! * d[b + 6 + k]!);
}

const weights = new Float64Array(4);

/**
 * Interpolated numbers of slice `sl` at Delta (clamped to the table), into out[0..6]:
 * N, b_c, b_a, F_cc, F_ca, F_aa, faint count.
 */
export function interpolateSlice(t: DepthTables, sl: number, delta: number, out: Float64Array): void {
  const h = t.step;
  let i = Math.floor(delta / h);
  if (i < 0) i = 0;
  if (i > t.knots - 2) i = t.knots - 2;
  let x = (delta - i * h) / h;
  if (x < 0) x = 0;
  if (x > 1) x = 1;
  hermiteWeights(x, h, weights);
  const stride = t.slices * PER_SLICE;
  const a = i * stride + sl * PER_SLICE;
  const b = a + stride;
  const d = t.data;
  interpolateSums(d, a, b, weights, 1, out);
  out[6] = weights[0]! * d[a + 12]! + weights[1]! * d[a + 13]! + weights[2]! * d[b + 12]! + weights[3]! * d[b + 13]!;
}
