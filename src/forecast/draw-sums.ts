/**
 * The six Fisher sums of every slice and their derivatives in x (knotSums, src/planning/tables.ts)
 * as functions of the shift x and the alpha offset dA, tabulated once as tensor Chebyshev series so
 * that each model draw of a robust plan (src/planning/robust.ts) or of forecast --model-draws
 * (drawnFisher, src/forecast/model-spread.ts) costs a few thousand multiplications instead of one
 * pass over the density grid per knot or per draw.
 *
 * Each sum is a finite sum over the grid's points of exp(logW + (a1 + dA)(t + x) - e^(t + x)) times
 * a polynomial in (t + x, e^(t + x)): an entire function of (x, dA), so its Chebyshev interpolant
 * converges geometrically (Trefethen 2013, Approximation Theory and Approximation Practice, ch. 8).
 * The x range is cut into panels no wider than `panelWidth`, each with `degreeX` + 1 first-kind
 * Chebyshev points, the dA range into panels no wider than `panelWidthA` with `degreeA` + 1 points
 * (one point where a range is a single value). The six sums are tabulated (fisherSums); their
 * derivatives in x are those of the series in x. The errors are estimated from the last
 * coefficients in each direction (`errorEstimate`, `slopeErrorEstimate`, relative to each sum's
 * largest magnitude on its panel's points); its users take the table only where they are within
 * their tolerance and the table costs fewer passes than the exact per-draw sums.
 */
import type { DensityGrid } from './grid.js';
import { sliceCount } from './grid.js';

/** Numbers per slice written: the six sums, then their six derivatives in x (the layout of knotSums). */
const PER_SLICE = 12;
/** Numbers per slice tabulated: the six sums (their derivatives are the series' own). */
const SUMS = 6;

/**
 * The six Fisher sums of every slice (N, b_c, b_a, F_cc, F_ca, F_aa of src/forecast/fisher.ts) at
 * shift x and alpha offset dA, into out[offset + stride sl ...]: src/planning/tables.ts's knotSums
 * without the derivatives, term for term.
 */
export function fisherSums(
  grid: DensityGrid,
  x: number,
  dA: number,
  out: Float64Array,
  offset: number,
  stride = 6,
): void {
  const eX = Math.exp(x);
  const { nodePointStart, sliceNodeStart } = grid;
  for (let sl = 0; sl < sliceCount(grid); sl++) {
    const q0 = nodePointStart[sliceNodeStart[sl]!]!;
    const q1 = nodePointStart[sliceNodeStart[sl + 1]!]!;
    sliceFisherSums(grid, q0, q1, x, eX, dA, out, offset + stride * sl);
  }
}

/**
 * fisherSums of one slice (its points q0 to q1) into out[o ..]. The loop over the points is a
 * function of its own: when it was fisherSums' inner loop, V8 compiled fisherSums while the loop
 * ran (on-stack replacement), reached the code after the loop without type feedback, and threw the
 * compiled code away, several times in a cold report.
 */
function sliceFisherSums(
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
    faa = 0;
  for (let q = q0; q < q1; q++) {
    const a = pointA1[q]! + dA;
    const y = pointT[q]! + x;
    const u = pointExpT[q]! * eX;
    const g = Math.exp(pointLogW[q]! + a * y - u);
    const dc = s * (a - u);
    n += g;
    bc += g * dc;
    ba += g * y;
    fcc += g * dc * dc;
    fca += g * dc * y;
    faa += g * y * y;
  }
  out[o] = n;
  out[o + 1] = bc;
  out[o + 2] = ba;
  out[o + 3] = fcc;
  out[o + 4] = fca;
  out[o + 5] = faa;
}

/**
 * What the draws with an offset reach (theta = [d log10 phi*, d_c, d_alpha] each): their number,
 * the range of the shift x = s d_c (s the grid's shift) and of d_alpha; undefined when no draw
 * moves. The series are tabulated over these ranges.
 */
export function drawReach(
  grid: DensityGrid,
  thetas: readonly (readonly number[])[],
): { moved: number; xRange: [number, number]; aRange: [number, number] } | undefined {
  const moved = thetas.filter((th) => !th.every((v) => v === 0));
  if (moved.length === 0) return undefined;
  const shifts = moved.map((th) => grid.shift * th[1]!);
  const alphas = moved.map((th) => th[2]!);
  return {
    moved: moved.length,
    xRange: [Math.min(...shifts), Math.max(...shifts)],
    aRange: [Math.min(...alphas), Math.max(...alphas)],
  };
}

export interface DrawSumsOptions {
  /** Widest x panel (ln u). */
  panelWidth: number;
  /** Polynomial degree in x per panel. */
  degreeX: number;
  /** Widest dA panel. */
  panelWidthA: number;
  /** Polynomial degree in dA per panel. */
  degreeA: number;
}

export interface DrawSumsTable {
  /** Grid passes spent building the table (each one fisherSums call). */
  passes: number;
  /**
   * Largest estimated interpolation error of any number, relative to that number's (slice's and
   * kind's) largest magnitude on its panel's points: the sum of the magnitudes of the last two
   * coefficients in each direction.
   */
  errorEstimate: number;
  /**
   * The same for the derivatives in x (the series' own derivatives), per unit of x: the last two
   * coefficients in x times l^2 (the largest |T_l'| on [-1, 1]) over the half panel width.
   */
  slopeErrorEstimate: number;
  /**
   * knotSums(grid, x0 + k step, dA, out, offset + k knotStride) for k = 0 .. knots - 1, from the
   * series (x and dA within the table's ranges; outside, the nearest panel's series extrapolate).
   */
  fill(
    x0: number,
    step: number,
    knots: number,
    dA: number,
    out: Float64Array,
    offset: number,
    knotStride: number,
  ): void;
}

/**
 * y[yo ..] += c x[xo ..], n numbers: the transforms' and the evaluation's one loop, in a function
 * of its own so that it is compiled once for all of them (a loop nest run once would run its first
 * iterations unoptimised).
 */
function axpy(y: Float64Array, yo: number, c: number, x: Float64Array, xo: number, n: number): void {
  for (let r = 0; r < n; r++) y[yo + r] = y[yo + r]! + c * x[xo + r]!;
}

/**
 * One slice's sums at one knot from its series in x: out[os + r] = sum over l of tx[l] c_l and
 * out[os + SUMS + r] = sum over l of dx[l] c_l, c_l = series[src + l width + r], l ascending (the
 * value and the derivative), each summed in a local and written once.
 */
function seriesAt(
  series: Float64Array,
  src: number,
  width: number,
  nx: number,
  tx: Float64Array,
  dx: Float64Array,
  out: Float64Array,
  os: number,
): void {
  for (let r = 0; r < SUMS; r++) {
    let v = 0;
    let d = 0;
    for (let l = 0, at = src + r; l < nx; l++, at += width) {
      const c = series[at]!;
      v = v + tx[l]! * c;
      d = d + dx[l]! * c;
    }
    out[os + r] = v;
    out[os + SUMS + r] = d;
  }
}

/** Panels covering [lo, hi] no wider than `width`: their count and width (one panel of width 0 for a point). */
function panelsOf(lo: number, hi: number, width: number): { count: number; step: number } {
  if (!(hi > lo)) return { count: 1, step: 0 };
  const count = Math.max(1, Math.ceil((hi - lo) / width - 1e-9));
  return { count, step: (hi - lo) / count };
}

/** Grid passes drawSumsTable spends on these ranges. */
export function seriesPasses(
  xRange: readonly [number, number],
  aRange: readonly [number, number],
  opts: DrawSumsOptions,
): number {
  const x = panelsOf(xRange[0], xRange[1], opts.panelWidth);
  const a = panelsOf(aRange[0], aRange[1], opts.panelWidthA);
  return x.count * (x.step > 0 ? opts.degreeX + 1 : 1) * a.count * (a.step > 0 ? opts.degreeA + 1 : 1);
}

/** First-kind Chebyshev points on [-1, 1], n of them: cos(pi (i + 1/2) / n) (0 for n = 1). */
function chebyshevPoints(n: number): Float64Array {
  const p = new Float64Array(n);
  for (let i = 0; i < n; i++) p[i] = n === 1 ? 0 : Math.cos((Math.PI * (i + 0.5)) / n);
  return p;
}

/** T_0(xi) .. T_(n-1)(xi) into out. */
function chebyshevValues(xi: number, n: number, out: Float64Array): void {
  out[0] = 1;
  if (n > 1) out[1] = xi;
  for (let k = 2; k < n; k++) out[k] = 2 * xi * out[k - 1]! - out[k - 2]!;
}

/**
 * The interpolant's coefficients from its values at n first-kind points, as a matrix M[k][i]:
 * c_k = (2 - [k = 0]) / n sum_i f_i cos(pi k (i + 1/2) / n) (Press et al., Numerical Recipes, 3rd ed.,
 * section 5.8).
 */
function chebyshevTransform(n: number): Float64Array {
  const m = new Float64Array(n * n);
  for (let k = 0; k < n; k++)
    for (let i = 0; i < n; i++) m[k * n + i] = ((k === 0 ? 1 : 2) / n) * Math.cos((Math.PI * k * (i + 0.5)) / n);
  return m;
}

/** The panel of v among `count` panels `step` wide from lo (clamped), and v's place in it on [-1, 1]. */
function locate(v: number, lo: number, count: number, step: number): { panel: number; xi: number } {
  if (!(step > 0)) return { panel: 0, xi: 0 };
  let panel = Math.floor((v - lo) / step);
  // (count - 1 worked out before the branch that needs it, seldom taken: arithmetic first run
  // after V8 has compiled a caller throws the compiled code away)
  const last = count - 1;
  if (panel < 0) panel = 0;
  if (panel > last) panel = last;
  return { panel, xi: (v - lo - (panel + 0.5) * step) / (0.5 * step) };
}

export function drawSumsTable(
  grid: DensityGrid,
  xRange: readonly [number, number],
  aRange: readonly [number, number],
  opts: DrawSumsOptions,
): DrawSumsTable {
  const nS = sliceCount(grid);
  const width = SUMS * nS;
  const [xLo, xHi] = xRange;
  const [aLo, aHi] = aRange;
  const xp = panelsOf(xLo, xHi, opts.panelWidth);
  const ap = panelsOf(aLo, aHi, opts.panelWidthA);
  const nx = xp.step > 0 ? opts.degreeX + 1 : 1;
  const na = ap.step > 0 ? opts.degreeA + 1 : 1;
  const px = chebyshevPoints(nx);
  const pa = chebyshevPoints(na);
  const tx = chebyshevTransform(nx);
  const ta = chebyshevTransform(na);
  // d/dx of the series in x: (2 / panel width) d/dxi
  const dXi = xp.step > 0 ? 2 / xp.step : 0;

  // per panel pair (x panel p, dA panel q): coefficients [k][l][r] (degree k in dA, l in x, number r)
  const block = na * nx * width;
  const coef = new Float64Array(xp.count * ap.count * block);
  const values = new Float64Array(block);
  const tmp = new Float64Array(block);
  const scale = new Float64Array(width);
  const tailOf = new Float64Array(width);
  const slopeOf = new Float64Array(width);
  let passes = 0;
  let tail = 0;
  let slopeTail = 0;
  for (let q = 0; q < ap.count; q++)
    for (let p = 0; p < xp.count; p++) {
      const xMid = xLo + (p + 0.5) * xp.step;
      const aMid = aLo + (q + 0.5) * ap.step;
      for (let j = 0; j < na; j++)
        for (let i = 0; i < nx; i++) {
          fisherSums(grid, xMid + 0.5 * xp.step * px[i]!, aMid + 0.5 * ap.step * pa[j]!, values, (j * nx + i) * width);
          passes++;
        }
      scale.fill(0);
      for (let v = 0; v < na * nx; v++)
        for (let r = 0; r < width; r++) scale[r] = Math.max(scale[r]!, Math.abs(values[v * width + r]!));
      // in x: tmp[j][l][r] = sum_i tx[l][i] values[j][i][r]
      tmp.fill(0);
      for (let j = 0; j < na; j++)
        for (let l = 0; l < nx; l++) {
          const o = (j * nx + l) * width;
          for (let i = 0; i < nx; i++) {
            const c = tx[l * nx + i]!;
            const v = (j * nx + i) * width;
            axpy(tmp, o, c, values, v, width);
          }
        }
      // in dA: coef[k][l][r] = sum_j ta[k][j] tmp[j][l][r]
      const base = (q * xp.count + p) * block;
      for (let k = 0; k < na; k++)
        for (let j = 0; j < na; j++) {
          const c = ta[k * na + j]!;
          for (let l = 0; l < nx; l++) {
            const o = base + (k * nx + l) * width;
            const v = (j * nx + l) * width;
            axpy(coef, o, c, tmp, v, width);
          }
        }
      // the error estimates: the last two coefficients in each direction (of more than two); for
      // the slope in x, the last two in x times the largest |T_l'| on [-1, 1], l^2
      tailOf.fill(0);
      slopeOf.fill(0);
      for (let k = 0; k < na; k++)
        for (let l = 0; l < nx; l++) {
          const lastX = nx > 2 && l >= nx - 2;
          if (!(lastX || (na > 2 && k >= na - 2))) continue;
          const o = base + (k * nx + l) * width;
          for (let r = 0; r < width; r++) {
            const c = Math.abs(coef[o + r]!);
            tailOf[r] = tailOf[r]! + c;
            slopeOf[r] = slopeOf[r]! + c * (lastX ? l * l : nx * nx) * dXi;
          }
        }
      for (let r = 0; r < width; r++)
        if (scale[r]! > 0) {
          tail = Math.max(tail, tailOf[r]! / scale[r]!);
          slopeTail = Math.max(slopeTail, slopeOf[r]! / scale[r]!);
        }
    }

  return new SeriesTable(passes, tail, slopeTail, coef, xp, ap, xLo, aLo, nx, na, nS, dXi);
}

/**
 * The table drawSumsTable returns. A class rather than an object literal with its own fill: every
 * table's fill was a closure of its own, which V8's optimising compiler compiled afresh (four times
 * in a cold report of the robust UV plan); the prototype's fill is compiled once.
 */
class SeriesTable implements DrawSumsTable {
  private readonly width: number;
  private readonly block: number;
  private readonly ta1: Float64Array;
  private readonly tx1: Float64Array;
  private readonly dx1: Float64Array;
  private readonly u1: Float64Array;
  /** The series in x of every x panel at the last draw's dA: reduced[p][l][r]. */
  private readonly reduced: Float64Array;
  private reducedFor = NaN;

  constructor(
    readonly passes: number,
    readonly errorEstimate: number,
    readonly slopeErrorEstimate: number,
    private readonly coef: Float64Array,
    private readonly xp: { count: number; step: number },
    private readonly ap: { count: number; step: number },
    private readonly xLo: number,
    private readonly aLo: number,
    private readonly nx: number,
    private readonly na: number,
    private readonly nS: number,
    private readonly dXi: number,
  ) {
    this.width = SUMS * nS;
    this.block = na * nx * this.width;
    this.ta1 = new Float64Array(na);
    this.tx1 = new Float64Array(nx);
    this.dx1 = new Float64Array(nx);
    this.u1 = new Float64Array(nx);
    this.reduced = new Float64Array(xp.count * nx * this.width);
  }

  fill(
    x0: number,
    step: number,
    knots: number,
    dA: number,
    out: Float64Array,
    offset: number,
    knotStride: number,
  ): void {
    const { xp, ap, xLo, aLo, nx, na, nS, dXi, width, block, coef, reduced, ta1, tx1, dx1, u1 } = this;
    if (dA !== this.reducedFor) {
      const { panel: q, xi } = locate(dA, aLo, ap.count, ap.step);
      chebyshevValues(xi, na, ta1);
      reduced.fill(0);
      const span = nx * width;
      for (let p = 0; p < xp.count; p++) {
        const dst = p * span;
        for (let k = 0; k < na; k++) {
          const c = ta1[k]!;
          const src = (q * xp.count + p) * block + k * span;
          axpy(reduced, dst, c, coef, src, span);
        }
      }
      this.reducedFor = dA;
    }
    for (let kn = 0; kn < knots; kn++) {
      const { panel: p, xi } = locate(x0 + kn * step, xLo, xp.count, xp.step);
      chebyshevValues(xi, nx, tx1);
      // T_l' = l U_(l-1), U the second kind: U_0 = 1, U_1 = 2 xi, U_k = 2 xi U_(k-1) - U_(k-2)
      u1[0] = 1;
      if (nx > 1) u1[1] = 2 * xi;
      for (let l = 2; l < nx; l++) u1[l] = 2 * xi * u1[l - 1]! - u1[l - 2]!;
      dx1[0] = 0;
      for (let l = 1; l < nx; l++) dx1[l] = l * u1[l - 1]! * dXi;
      const o = offset + kn * knotStride;
      for (let sl = 0; sl < nS; sl++)
        seriesAt(reduced, p * nx * width + SUMS * sl, width, nx, tx1, dx1, out, o + PER_SLICE * sl);
    }
  }
}
