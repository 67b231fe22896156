/**
 * The histograms of the model's draws from one table per slice (src/counts/model-draws.ts draws
 * the counts; this module the per-bin counts of the first draws, which the exact path makes by
 * redoing a whole histogram, one incomplete gamma function or completeness quadrature per bin
 * edge and node, for every draw).
 *
 * With the limit at the same obs at every node (flux and magnitude limits), a bin of the observed
 * value [o1, o2] counts, under a draw's offsets (d_phi_k, d_alpha_k per component, d_c),
 *
 *   N = sum_k 10^(d_phi_k) integral over o in the bin, beyond the limit, of c(o) G_k(o - d_c, d_alpha_k) do,
 *
 *   G_k(x, d_alpha) = ln10/|slope| sum_i V_i phi*_ik u_i^(alpha_ik + d_alpha + 1) e^-u_i,
 *   u_i = 10^((x - a_i) / slope),
 *
 * since at node i obs = a_i + d_c + slope log10 u (src/selection/observe.ts) and du/u = ln10/|slope|
 * do: the completeness stays where it is in obs while the draw moves the Schechter factor by d_c.
 * ln G_k is smooth in both variables, so it is a Chebyshev series over (x, d_alpha) made from its
 * exact values (one exponential per node at each point: a cheap table; the points in d_alpha start
 * where the component's last series ended, HistogramTableStart), and every draw integrates
 * its bins by one fixed rule in obs: 8-point Gauss-Legendre panels cut at the bin edges and the
 * completeness's break points, no wider than 1.5 logistic widths nor than 2 / lambda, lambda =
 * (u + |alpha + 2| + 2) ln10 / |slope| with u the largest any draw meets at the panel's bright end
 * among the nodes within 50 of the smallest (the completeness quadrature's rule,
 * src/counts/completeness-quadrature.ts; it is accurate to about 1e-17 of each panel for the
 * Schechter factor). The completeness is taken as the exact path takes it: its value at the bin's
 * middle where it does not vary over the bin (src/selection/completeness.ts, `varying`), pointwise
 * elsewhere. A draw's bins are the exact path's: those of the plain histogram between the draw's own
 * faint and bright ends (histogramCount, src/counts/engine.ts), the brightest open (to infinity
 * where the completeness is constant over it; to its bright edge where it varies, as the exact path
 * integrates it). A draw costs one series in x per component (collapsed at its d_alpha) evaluated at
 * the rule's points, instead of one incomplete gamma function per edge and node.
 *
 * A threshold tabulated in z (the limit in obs differs from node to node) without a varying
 * completeness: the limits stay where they are in obs under a draw, so the rule starts at the first
 * bin whose faint edge is brighter than every node's limit (there every node counts: G_k as above),
 * and the few bins before it, which hold a limit, are counted per draw as the exact path counts them
 * (limitBin).
 */
import {
  chebyshev2D,
  chebyshevAlongX,
  chebyshevPoints,
  chebyshevTail,
  type Chebyshev2D,
} from '../numerics/chebyshev.js';
import { upperGammaByRecurrence } from '../numerics/gamma.js';
import { gaussLegendreRule } from '../numerics/quadrature.js';
import { CAPS } from '../model/limits.js';
import type { ModelOffsets } from '../model/model-uncertainty.js';
import type { CompletenessFn } from '../selection/completeness.js';
import { roundEdge, U_BRIGHT_SPAN } from './engine.js';

/** A u = L / L* beyond which e^-u, times any power of u the slopes allow, is 0 in doubles. */
const U_NOTHING = 1e4;

/** A slice's nodes as model-draws.ts flattens them (what a draw does not change). */
export interface HistogramNodes {
  count: number;
  vw: Float64Array;
  l10u: Float64Array;
  a: Float64Array;
  phi: Float64Array[];
  alpha: Float64Array[];
  obsLimit: Float64Array;
}

export interface HistogramSetting {
  slope: number;
  width: number;
  completeness?: CompletenessFn;
  breaks?: { points: number[]; scale: number; varying: [number, number] };
}

/** Tail of the series of ln G accepted, absolute (ln G reaches -100 at the rule's bright end: a relative rule would allow 1e-8 there). */
export const HISTOGRAM_TABLE_TOLERANCE = 1e-11;
const START: [number, number] = [16, 4];
const MAX_POINTS: [number, number] = [256, 32];
/** The Gauss-Legendre orders a panel may take, and the error each panel is held below (relative). */
const ORDERS = [4, 6, 8, 10, 12, 16, 20];
const PANEL_ERROR = 1e-14;

function factorial(n: number): number {
  let f = 1;
  for (let i = 2; i <= n; i++) f *= i;
  return f;
}

/**
 * Per order n, the widest panel times lambda for which n-point Gauss-Legendre integrates e^(-lambda x)
 * to PANEL_ERROR: the rule's error h^(2n+1) (n!)^4 / ((2n + 1) ((2n)!)^3) f^(2n) (Abramowitz & Stegun
 * 25.4.30) relative to the integral, (lambda h)^(2n + 1) (n!)^4 / ((2n + 1) ((2n)!)^3) for lambda h
 * >= 1 (the integral is about f / lambda), (lambda h)^(2n) (n!)^4 / ((2n + 1) ((2n)!)^3) below (about f h); and the Bernstein-ellipse parameter rho it needs against a pole (the logistic's, pi widths
 * off the real axis): the error falls as rho^(-2n) (Trefethen 2013, chapter 19).
 */
const ORDER_LIMITS = ORDERS.map((n) => {
  const k = factorial(n) ** 4 / ((2 * n + 1) * factorial(2 * n) ** 3);
  const wide = (PANEL_ERROR / k) ** (1 / (2 * n + 1));
  const lambdaH = wide >= 1 ? wide : (PANEL_ERROR / k) ** (1 / (2 * n));
  const rho = PANEL_ERROR ** (-1 / (2 * n));
  return { n, lambdaH, halfWidthOverPole: 2 / (rho - 1 / rho) };
});

/** The cheapest composite rule over a length for the given lambda and pole distance: panels and order. */
function chooseRule(length: number, lambda: number, pole: number): { panels: number; order: number } {
  let best = { panels: 0, order: 0, cost: Infinity };
  for (const o of ORDER_LIMITS) {
    const h = Math.min(o.lambdaH / lambda, 2 * pole * o.halfWidthOverPole);
    const panels = Math.max(1, Math.ceil(length / h));
    if (panels * o.n < best.cost) best = { panels, order: o.n, cost: panels * o.n };
  }
  return best;
}
const LN10 = Math.LN10;

/** Chebyshev series on consecutive pieces of x of one length (with each piece's ends and points, read per rule point). */
interface Segmented {
  x0: number;
  len: number;
  parts: Chebyshev2D[];
  partX0: Float64Array;
  partX1: Float64Array;
  partN: Int32Array;
}

/** The pieces' length in ln u. */
const SEGMENT_LN_U = 2;

export interface HistogramTable {
  /** The plain histogram's first grid index (edges k width) and bin count. */
  k0: number;
  bins: number;
  /** Grid index of each rule point's bin (from kLo), the points in obs and their weights (completeness included). */
  kLo: number;
  kCount: number;
  pointK: Int32Array;
  pointObs: Float64Array;
  pointWeight: Float64Array;
  /** The points before the plain histogram's bright edge. */
  plainEnd: number;
  /** Per grid index from kLo: whether the exact path takes the completeness as constant over the bin. */
  constant: Uint8Array;
  /** Per component: H_k over (x, d_alpha) in pieces of x, or undefined where the component counts nothing. */
  series: (Segmented | undefined)[];
  /** The reference node's a and, per component, alpha. */
  aRef: number;
  alphaRef: number[];
  /** The nodes that fix each draw's bins (finite limits): a and log10 u at the limit. */
  nodeA: Float64Array;
  nodeL10u: Float64Array;
  /** Limits that differ from node to node: the bins (in order from the faintest) between the faintest limit and the rule's first bin. */
  limitBins: LimitBin[];
  slope: number;
  width: number;
  /** Scratch: the sums per grid index, a collapsed series, a draw's first and last grid index. */
  sums: Float64Array;
  row: Float64Array;
  rowN: number;
  range: Float64Array;
}

/**
 * The table of one slice for the given offsets (those whose histograms are drawn), or undefined
 * (the exact path) where the limit differs from node to node under a varying completeness, or a
 * series does not converge.
 */
export function histogramTable(
  f: HistogramNodes,
  s: HistogramSetting,
  plain: { edges: readonly number[]; counts: readonly number[] },
  offsets: readonly ModelOffsets[],
  start: HistogramTableStart = [],
): HistogramTable | undefined {
  const { slope, width } = s;
  const nc = f.phi.length;
  const nb = plain.counts.length;
  if (nb === 0 || offsets.length === 0) return undefined;
  // the nodes that count, and their limits in obs (one, or, for a limit tabulated in z, one per node)
  const finite: number[] = [];
  let obsLim = NaN;
  let oneLimit = true;
  // the faintest and the brightest limit (along the direction of brighter obs)
  let limFaint = NaN;
  let limBright = NaN;
  const dir = slope > 0 ? 1 : -1;
  for (let i = 0; i < f.count; i++) {
    const l = f.l10u[i]!;
    if (!Number.isFinite(l)) continue;
    const lim = f.obsLimit[i]!;
    if (Number.isNaN(obsLim)) obsLim = limFaint = limBright = lim;
    const scale = 1e-12 * Math.max(1, Math.abs(lim));
    if (Math.abs(f.a[i]! + slope * l - lim) > 1e3 * scale) return undefined;
    if (Math.abs(lim - obsLim) > 1e-12 * Math.max(1, Math.abs(obsLim))) oneLimit = false;
    if (dir * (lim - limFaint) < 0) limFaint = lim;
    if (dir * (lim - limBright) > 0) limBright = lim;
    finite.push(i);
  }
  if (finite.length === 0) return undefined;
  // limits that differ from node to node: with a varying completeness, the exact path
  if (!oneLimit && s.completeness) return undefined;
  const { dcMin, dcMax, daMin, daMax } = offsetRanges(offsets, nc);
  // u at a node under a draw is u(obs) 10^(-d_c / slope): the extreme factors
  const rA = 10 ** (-dcMin / slope);
  const rB = 10 ** (-dcMax / slope);
  const rMin = Math.min(rA, rB);
  const rMax = Math.max(rA, rB);
  let alphaSpan = 0;
  for (let k = 0; k < nc; k++)
    for (const i of finite) {
      const al = f.alpha[k]![i]!;
      alphaSpan = Math.max(alphaSpan, Math.abs(al + daMin[k]! + 2), Math.abs(al + daMax[k]! + 2));
    }
  // log10 u at obs of the node seeing the smallest and the largest u
  let negAMin = Infinity;
  let negAMax = -Infinity;
  for (const i of finite) {
    negAMin = Math.min(negAMin, -f.a[i]! / slope);
    negAMax = Math.max(negAMax, -f.a[i]! / slope);
  }
  const l10uLeast = (o: number) => o / slope + negAMin;
  const l10uMost = (o: number) => o / slope + negAMax;
  // the rule runs from the limit brightwards to where every draw's u has grown by 40 beyond the
  // plain histogram's bright edge (what an open bin leaves out is below e^-40 of it)
  const k0 = Math.round(plain.edges[0]! / width);
  const brightEdge = (slope > 0 ? k0 + nb : k0) * width;
  const uEdge = 10 ** l10uLeast(brightEdge);
  const oFar = brightEdge + slope * (Math.log10(uEdge + U_BRIGHT_SPAN / rMin) - Math.log10(uEdge));
  const varying = s.breaks?.varying;
  // the logistic's poles lie pi widths off the real axis (a table's curve is linear between its points)
  const pole = s.breaks && Number.isFinite(s.breaks.scale) ? Math.PI * s.breaks.scale : Infinity;
  const scale = LN10 / Math.abs(slope);
  const obsOfK = (k: number) => roundEdge(k * width);
  // grid bins from the limit's to the far end's; limits that differ from node to node: from the
  // first bin whose faint edge is brighter than every limit (the bins before it: limitBins)
  const kLimit = oneLimit
    ? slope > 0
      ? Math.floor(obsLim / width + 1e-9)
      : Math.ceil(obsLim / width - 1e-9) - 1
    : slope > 0
      ? Math.floor(limBright / width) + 1
      : Math.ceil(limBright / width) - 2;
  const startObs = oneLimit ? obsLim : obsOfK(slope > 0 ? kLimit : kLimit + 1);
  if (!Number.isFinite(oFar) || dir * (oFar - startObs) <= 0) return undefined;
  // a limit far brighter than the knee (every draw's u at it above U_NOTHING: e^-u is 0 in doubles):
  // nothing to tabulate, and the rule's panels would grow with u (a magnitude limit of 3 gave u
  // near 1e9 and a rule of 1e8 points); the exact path gives every bin its 0
  if (!(10 ** l10uLeast(startObs) * rMin < U_NOTHING)) return undefined;
  const pk: number[] = [];
  const po: number[] = [];
  const pw: number[] = [];
  /** Per grid bin from the limit's (index (k - kLimit) dir): whether the completeness is constant over it. */
  const constantFrom: number[] = [];
  for (let k = kLimit; ; k += dir) {
    if (Math.abs(k - kLimit) > 4 * CAPS.histogramBins) return undefined;
    const lowEdge = obsOfK(k);
    const highEdge = obsOfK(k + 1);
    const faintEdge = slope > 0 ? lowEdge : highEdge;
    const brightEdgeK = slope > 0 ? highEdge : lowEdge;
    // the part beyond the limit, up to the far end
    const from = k === kLimit ? startObs : faintEdge;
    const to = dir * (brightEdgeK - oFar) >= 0 ? oFar : brightEdgeK;
    const isConstant = !s.completeness || !varying || highEdge <= varying[0] || lowEdge >= varying[1];
    constantFrom.push(isConstant ? 1 : 0);
    const cBin = !s.completeness ? 1 : isConstant ? s.completeness(0.5 * (faintEdge + brightEdgeK)) : NaN;
    if (dir * (to - from) > 0) {
      const cuts = [from];
      if (!isConstant) for (const p of s.breaks!.points) if (dir * (p - from) > 0 && dir * (to - p) > 0) cuts.push(p);
      cuts.push(to);
      cuts.sort((x, y) => dir * (x - y));
      for (let c = 0; c + 1 < cuts.length; c++) {
        const p = cuts[c]!;
        const q = cuts[c + 1]!;
        // the largest u any draw meets at the piece's bright end, among nodes that matter
        const uLeast = 10 ** l10uLeast(q) * rMax;
        const u = Math.min(10 ** l10uMost(q) * rMax, uLeast + 50);
        const lambda = (u + alphaSpan + 2) * scale;
        const rule = chooseRule(Math.abs(q - p), lambda, isConstant ? Infinity : pole);
        const n = rule.panels;
        const { nodes: gl, weights: glw } = gaussLegendreRule(rule.order);
        const h = (q - p) / n;
        for (let j = 0; j < n; j++) {
          const pa = p + j * h;
          for (let g = 0; g < rule.order; g++) {
            const o = pa + 0.5 * h * (gl[g]! + 1);
            const c0 = isConstant ? cBin : s.completeness!(o);
            pk.push(k);
            po.push(o);
            pw.push(0.5 * Math.abs(h) * glw[g]! * scale * c0);
          }
        }
      }
    }
    if (to === oFar) break;
  }
  const kLast = kLimit + dir * (constantFrom.length - 1);
  const kLo = Math.min(kLimit, kLast);
  const kCount = constantFrom.length;
  const constant = new Uint8Array(kCount);
  constantFrom.forEach((c, j) => (constant[kLimit + dir * j - kLo] = c));
  const pointObs = Float64Array.from(po);
  let oMin = Infinity;
  let oMax = -Infinity;
  for (const o of pointObs) {
    oMin = Math.min(oMin, o);
    oMax = Math.max(oMax, o);
  }
  // the reference node: the smallest u at every obs (u_i = u* rho_i, rho_i >= 1)
  let ref = finite[0]!;
  for (const i of finite) if (-f.a[i]! / slope < -f.a[ref]! / slope) ref = i;
  const aRef = f.a[ref]!;
  // ln G_k = (alpha*_k + d_alpha + 1) L* - u* + H_k(x, d_alpha), L* = ln u*, where
  // H_k = ln sum_i V_i phi*_ik exp((alpha_ik + d_alpha + 1) D_i + (alpha_ik - alpha*_k) L* - u* (rho_i - 1)),
  // D_i = ln rho_i: the double exponential taken out exactly, H_k is gentle
  const series: (Segmented | undefined)[] = [];
  const alphaRef: number[] = [];
  const lnTerm = new Float64Array(finite.length);
  const xPart = new Float64Array(finite.length);
  const uPart = new Float64Array(finite.length);
  for (let k = 0; k < nc; k++) {
    const phiK = f.phi[k]!;
    const alphaK = f.alpha[k]!;
    const aStar = alphaK[ref]!;
    alphaRef.push(aStar);
    const used = finite.filter((i) => f.vw[i]! * phiK[i]! > 0);
    if (used.length === 0) {
      series.push(undefined);
      continue;
    }
    const terms = new HTerms(
      Float64Array.from(used, (i) => Math.log(f.vw[i]! * phiK[i]!)),
      Float64Array.from(used, (i) => ((aRef - f.a[i]!) * LN10) / slope),
      new Float64Array(used.length),
      Float64Array.from(used, (i) => alphaK[i]!),
      aStar,
      aRef,
      slope,
      lnTerm,
      xPart,
      uPart,
    );
    for (let q = 0; q < used.length; q++) terms.rhoM1[q] = Math.expm1(terms.dln[q]!);
    // in pieces of SEGMENT_LN_U in ln u* (a low degree each: a draw evaluates them at every point)
    const x0 = oMin - dcMax;
    const x1 = oMax - dcMin;
    const segs = Math.max(1, Math.ceil((Math.abs(x1 - x0) * LN10) / Math.abs(slope) / SEGMENT_LN_U));
    const len = (x1 - x0) / segs;
    const parts: Chebyshev2D[] = [];
    for (let g = 0; g < segs; g++) {
      const c = logTable(terms, x0 + g * len, g === segs - 1 ? x1 : x0 + (g + 1) * len, daMin[k]!, daMax[k]!, start, k);
      if (!c) return undefined;
      parts.push(c);
    }
    series.push({
      x0,
      len,
      parts,
      partX0: Float64Array.from(parts, (q) => q.x0),
      partX1: Float64Array.from(parts, (q) => q.x1),
      partN: Int32Array.from(parts, (q) => q.nx),
    });
  }
  // the bins from the faintest limit's to the rule's first
  const limitBins: LimitBin[] = [];
  if (!oneLimit) {
    const kFaint = slope > 0 ? Math.floor(limFaint / width + 1e-9) : Math.ceil(limFaint / width - 1e-9) - 1;
    for (let k = kFaint; k !== kLimit; k += dir) {
      limitBins.push(limitBin(f, finite, slope, obsOfK(slope > 0 ? k : k + 1), obsOfK(slope > 0 ? k + 1 : k), k));
    }
  }
  let nxMax = 1;
  for (const c of series) if (c) for (const q of c.parts) nxMax = Math.max(nxMax, q.nx);
  // the points up to the plain histogram's bright edge (a draw whose open bin lies beyond it needs no more)
  let plainEnd = 0;
  while (plainEnd < pk.length && dir * (pk[plainEnd]! - (slope > 0 ? k0 + nb : k0 - 1)) < 0) plainEnd++;
  return {
    k0,
    bins: nb,
    kLo,
    kCount,
    pointK: Int32Array.from(pk, (k) => k - kLo),
    pointObs,
    pointWeight: Float64Array.from(pw),
    plainEnd,
    constant,
    series,
    aRef,
    alphaRef,
    nodeA: Float64Array.from(finite, (i) => f.a[i]!),
    nodeL10u: Float64Array.from(finite, (i) => f.l10u[i]!),
    limitBins,
    slope,
    width,
    sums: new Float64Array(kCount),
    row: new Float64Array(nxMax * Math.max(1, ...series.map((c) => c?.parts.length ?? 1))),
    rowN: nxMax,
    range: new Float64Array(2),
  };
}

/**
 * A bin that holds some node's limit (the limit tabulated in z), per component the nodes that count
 * in it: their weight V_i phi*_ik, alpha, and log10 u at the bin's faint end (its faint edge or the
 * node's limit, whichever is brighter) and at its bright edge, before the draw's shift.
 */
interface LimitBin {
  k: number;
  parts: { w: Float64Array; alpha: Float64Array; lo: Float64Array; hi: Float64Array }[];
}

/**
 * The bin [faint, bright] in obs (its bright edge brighter than the faintest limit) under a limit
 * that differs from node to node: each draw counts it as the exact path (histogramCount,
 * src/counts/engine.ts) does, V_i phi*_ik (Gamma(s, u_i at the faint end) - Gamma(s, u_i at the
 * bright edge)), s = alpha_ik + d_alpha + 1, over the nodes whose limit is fainter than the bright
 * edge, u_i at obs o 10^((o - a_i - d_c) / slope) (the limits stay where they are in obs). Such bins
 * are few (the limits' spread over the bin width, plus one) and hold few nodes, so a draw costs
 * two incomplete gamma functions (upperGammaByRecurrence) per node in them (a series over the
 * offsets would cost more at a hundred draws).
 */
function limitBin(
  f: HistogramNodes,
  finite: readonly number[],
  slope: number,
  faint: number,
  bright: number,
  k: number,
): LimitBin {
  const parts = f.phi.map((phiK, c) => {
    const used = finite.filter((i) => f.vw[i]! * phiK[i]! > 0 && (bright - f.a[i]!) / slope > f.l10u[i]!);
    return {
      w: Float64Array.from(used, (i) => f.vw[i]! * phiK[i]!),
      alpha: Float64Array.from(used, (i) => f.alpha[c]![i]!),
      lo: Float64Array.from(used, (i) => Math.max((faint - f.a[i]!) / slope, f.l10u[i]!)),
      hi: Float64Array.from(used, (i) => (bright - f.a[i]!) / slope),
    };
  });
  return { k, parts };
}

/** A bin holding some node's limit under a draw (limitBin). */
function limitBinCount(lb: LimitBin, o: ModelOffsets, slope: number): number {
  const shift = -o.characteristic / slope;
  let v = 0;
  for (let k = 0; k < lb.parts.length; k++) {
    const { w, alpha, lo, hi } = lb.parts[k]!;
    if (w.length === 0) continue;
    const dPhi = o.log10PhiStar[k]!;
    const phiScale = dPhi ? 10 ** dPhi : 1;
    const da = o.alpha[k]!;
    for (let q = 0; q < w.length; q++) {
      const sOrder = alpha[q]! + da + 1;
      const d =
        upperGammaByRecurrence(sOrder, 10 ** (lo[q]! + shift)) - upperGammaByRecurrence(sOrder, 10 ** (hi[q]! + shift));
      if (d > 0) v += w[q]! * phiScale * d;
    }
  }
  return v;
}

/**
 * Per component, the points in d_alpha its last series needed (a population's slices and pieces
 * share the component's range of d_alpha, and a series in it needs about the same points in each):
 * the next series starts there rather than at START's, where the points in d_alpha are not
 * smaller, so that it is not first made at too few points and thrown away.
 */
export type HistogramTableStart = number[];

/**
 * What H_k(x, d_alpha) sums over a component's nodes (see histogramTable), with scratch per node.
 * A class rather than an object literal: V8 makes an object literal's later copies from a
 * template whose fields it generalises, so the first copy's shape is given up, and hRow, compiled
 * on it, was compiled again in every cold predict with histogram tables.
 */
class HTerms {
  constructor(
    /** ln(V_i phi*_ik), D_i, rho_i - 1 and alpha_ik per node that counts. */
    readonly lnW: Float64Array,
    readonly dln: Float64Array,
    readonly rhoM1: Float64Array,
    readonly alpha: Float64Array,
    readonly aStar: number,
    readonly aRef: number,
    readonly slope: number,
    readonly lnTerm: Float64Array,
    /** At the row's x: (alpha_ik - alpha*_k) L* and u* (rho_i - 1) per node. */
    readonly xPart: Float64Array,
    readonly uPart: Float64Array,
  ) {}
}

/**
 * H_k at one x and every d_alpha of `ys` into out[at + j] (false where a value is not finite): the
 * terms that depend on x alone once per row.
 */
function hRow(c: HTerms, x: number, ys: Float64Array, out: Float64Array, at: number): boolean {
  const n = c.lnW.length;
  const lnU = ((x - c.aRef) * LN10) / c.slope;
  const u = Math.exp(lnU);
  const { lnW, dln, rhoM1, alpha, lnTerm, xPart, uPart } = c;
  for (let q = 0; q < n; q++) {
    xPart[q] = (alpha[q]! - c.aStar) * lnU;
    uPart[q] = u * rhoM1[q]!;
  }
  for (let j = 0; j < ys.length; j++) {
    const da = ys[j]!;
    let m = -Infinity;
    for (let q = 0; q < n; q++) {
      const t = lnW[q]! + (alpha[q]! + da + 1) * dln[q]! + xPart[q]! - uPart[q]!;
      lnTerm[q] = t;
      if (t > m) m = t;
    }
    let sum = 0;
    for (let q = 0; q < n; q++) sum += Math.exp(lnTerm[q]! - m);
    const g = m + Math.log(sum);
    if (!Number.isFinite(g)) return false;
    out[at + j] = g;
  }
  return true;
}

/**
 * A Chebyshev series of H_k over [x0, x1] x [y0, y1], doubling the points until the tail is below
 * the tolerance (from START, the points in y from start[k] where that is more; start[k] is then
 * the points the series took in y).
 */
function logTable(
  terms: HTerms,
  x0: number,
  x1: number,
  y0: number,
  y1: number,
  start: HistogramTableStart,
  k: number,
): Chebyshev2D | undefined {
  let [nx, ny] = START;
  if ((start[k] ?? 0) > ny) ny = start[k]!;
  if (!(x1 > x0)) nx = 1;
  if (!(y1 > y0)) ny = 1;
  for (;;) {
    const xs = chebyshevPoints(nx, x0, x1);
    const ys = chebyshevPoints(ny, y0, y1);
    const v = new Float64Array(nx * ny);
    for (let i = 0; i < nx; i++) if (!hRow(terms, xs[i]!, ys, v, i * ny)) return undefined;
    const c = chebyshev2D(v, nx, ny, x0, x1, y0, y1);
    const t = chebyshevTail(c);
    const moreX = t.x > HISTOGRAM_TABLE_TOLERANCE;
    const moreY = t.y > HISTOGRAM_TABLE_TOLERANCE;
    if (!moreX && !moreY) {
      if (ny > 1) start[k] = ny;
      return c;
    }
    if ((moreX && nx >= MAX_POINTS[0]) || (moreY && ny >= MAX_POINTS[1])) return undefined;
    if (moreX) nx *= 2;
    if (moreY) ny *= 2;
  }
}

/**
 * One draw's histogram on the plain histogram's bins (`out`, one value per bin) from the table;
 * false where the draw's own histogram would have more bins than a slice may have (the exact path
 * then reports it). (In small functions, each hot loop one of its own: V8 optimises a small
 * function sooner and compiles it faster, and until then every double in a loop is a heap
 * allocation.)
 */
export function histogramFromTable(tb: HistogramTable, o: ModelOffsets, out: Float64Array): boolean {
  const { slope } = tb;
  if (!drawRange(tb, o.characteristic)) return false;
  const dk0 = tb.range[0]!;
  const dk1 = tb.range[1]!;
  const kBright = slope > 0 ? dk1 - 1 : dk0;
  // (an open bin among those holding a limit: the exact path)
  for (const lb of tb.limitBins) if (lb.k === kBright) return false;
  // the sums of the rule's points per grid bin, up to the plain histogram's bright edge unless the
  // draw's open bin lies within it and counts to infinity
  const dir = slope > 0 ? 1 : -1;
  const openAt = kBright - tb.kLo;
  const openInside = dir * (kBright - (slope > 0 ? tb.k0 + tb.bins - 1 : tb.k0)) <= 0;
  const np = openInside && openAt >= 0 && openAt < tb.kCount && tb.constant[openAt] ? tb.pointObs.length : tb.plainEnd;
  tb.sums.fill(0);
  for (let k = 0; k < tb.series.length; k++) {
    const c = tb.series[k];
    if (c) componentSums(tb, c, np, o.characteristic, o.log10PhiStar[k]!, o.alpha[k]!, tb.alphaRef[k]!);
  }
  plainBins(tb, o, dk0, dk1, kBright, out);
  return true;
}

/**
 * The draw's own bins (histogramCount's range: from the limit to u = uLim + 40, or 40, at every
 * node) as grid indices in tb.range; false beyond the cap on a slice's bins.
 */
function drawRange(tb: HistogramTable, dc: number): boolean {
  const { slope, width, nodeA, nodeL10u } = tb;
  let obsMin = Infinity;
  let obsMax = -Infinity;
  const shift = -dc / slope;
  for (let i = 0; i < nodeA.length; i++) {
    const l = nodeL10u[i]! + shift;
    const a = nodeA[i]! + dc;
    const uLim = 10 ** l;
    const uBright = uLim > 1 ? uLim + U_BRIGHT_SPAN : U_BRIGHT_SPAN;
    const o1 = a + slope * l;
    const o2 = a + slope * Math.log10(uBright);
    obsMin = Math.min(obsMin, o1, o2);
    obsMax = Math.max(obsMax, o1, o2);
  }
  const dk0 = Math.floor(obsMin / width + 1e-9);
  const dk1 = Math.max(dk0 + 1, Math.ceil(obsMax / width - 1e-9));
  tb.range[0] = dk0;
  tb.range[1] = dk1;
  return dk1 - dk0 <= CAPS.histogramBins;
}

/** One component's part of the draw at the rule's first np points, added to tb.sums per grid bin. */
function componentSums(
  tb: HistogramTable,
  c: Segmented,
  np: number,
  dc: number,
  dPhi: number,
  da: number,
  alphaRef: number,
): void {
  const phiScale = dPhi ? 10 ** dPhi : 1;
  const power = alphaRef + da + 1;
  const parts = c.parts;
  const last = parts.length - 1;
  const stride = tb.rowN;
  const row = tb.row;
  for (let g = 0; g <= last; g++) chebyshevAlongX(parts[g]!, da, row, g * stride);
  const lnScale = LN10 / tb.slope;
  const base = -(tb.aRef + dc) * lnScale;
  pointSums(
    np,
    tb.pointObs,
    tb.pointK,
    tb.pointWeight,
    tb.sums,
    row,
    stride,
    c.partX0,
    c.partX1,
    c.partN,
    c.x0,
    1 / c.len,
    lnScale,
    base,
    dc,
    phiScale,
    power,
  );
}

/**
 * sums[bin of p] += w_p phiScale exp(power ln u - u + H(obs_p - d_c)) over the first np rule
 * points, H the component's series collapsed at the draw's d_alpha (`row`, a piece per stride).
 */
function pointSums(
  np: number,
  pointObs: Float64Array,
  pointK: Int32Array,
  pointWeight: Float64Array,
  sums: Float64Array,
  row: Float64Array,
  stride: number,
  partX0: Float64Array,
  partX1: Float64Array,
  partN: Int32Array,
  x0: number,
  invLen: number,
  lnScale: number,
  base: number,
  dc: number,
  phiScale: number,
  power: number,
): void {
  const last = partN.length - 1;
  for (let p = 0; p < np; p++) {
    const ob = pointObs[p]!;
    const lnU = ob * lnScale + base;
    const x = ob - dc;
    let g = Math.floor((x - x0) * invLen);
    if (g < 0) g = 0;
    else if (g > last) g = last;
    const n = partN[g]!;
    const px0 = partX0[g]!;
    const px1 = partX1[g]!;
    const t = n === 1 ? 0 : (2 * x - px0 - px1) / (px1 - px0);
    // Clenshaw's recurrence over the piece's collapsed series
    const off = g * stride;
    let d1 = 0;
    let d2 = 0;
    const t2 = 2 * t;
    for (let i = n - 1; i >= 1; i--) {
      const d = t2 * d1 - d2 + row[off + i]!;
      d2 = d1;
      d1 = d;
    }
    const h = t * d1 - d2 + row[off]!;
    const at = pointK[p]!;
    sums[at] = sums[at]! + pointWeight[p]! * phiScale * Math.exp(power * lnU - Math.exp(lnU) + h);
  }
}

/** The plain bins from the sums: the draw's own (grid indices dk0 to dk1), its brightest open. */
function plainBins(tb: HistogramTable, o: ModelOffsets, dk0: number, dk1: number, kBright: number, out: Float64Array) {
  const dir = tb.slope > 0 ? 1 : -1;
  const sums = tb.sums;
  for (let bin = 0; bin < tb.bins; bin++) {
    const k = tb.k0 + bin;
    if (k < dk0 || k >= dk1) {
      out[bin] = 0;
      continue;
    }
    const at = k - tb.kLo;
    if (at < 0 || at >= tb.kCount) {
      out[bin] = 0;
      for (const lb of tb.limitBins) if (lb.k === k) out[bin] = limitBinCount(lb, o, tb.slope);
      continue;
    }
    if (k !== kBright || !tb.constant[at]) {
      out[bin] = sums[at]!;
      continue;
    }
    let v = 0;
    for (let j = at; j >= 0 && j < tb.kCount; j += dir) v += sums[j]!;
    out[bin] = v;
  }
}

interface OffsetRanges {
  dcMin: number;
  dcMax: number;
  daMin: readonly number[];
  daMax: readonly number[];
}

/** The ranges found so far, by the list of offsets (every slice of a population reads the same list). */
const rangesKept = new WeakMap<readonly ModelOffsets[], { nc: number; length: number; ranges: OffsetRanges }>();

/** The range of the draws' offsets: of the characteristic value, and of alpha per component. */
export function offsetRanges(offsets: readonly ModelOffsets[], nc: number): OffsetRanges {
  const kept = rangesKept.get(offsets);
  if (kept && kept.nc === nc && kept.length === offsets.length) return kept.ranges;
  const ranges = findRanges(offsets, nc);
  rangesKept.set(offsets, { nc, length: offsets.length, ranges });
  return ranges;
}

function findRanges(offsets: readonly ModelOffsets[], nc: number): OffsetRanges {
  let dcMin = Infinity;
  let dcMax = -Infinity;
  const daMin = new Array<number>(nc).fill(Infinity);
  const daMax = new Array<number>(nc).fill(-Infinity);
  for (const o of offsets) {
    dcMin = Math.min(dcMin, o.characteristic);
    dcMax = Math.max(dcMax, o.characteristic);
    for (let k = 0; k < nc; k++) {
      daMin[k] = Math.min(daMin[k]!, o.alpha[k]!);
      daMax[k] = Math.max(daMax[k]!, o.alpha[k]!);
    }
  }
  return { dcMin, dcMax, daMin, daMax };
}
