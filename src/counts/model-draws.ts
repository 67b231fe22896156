/**
 * The counts under the assumed model's own uncertainty (a population's model_uncertainty,
 * docs/survey-file.md): N draws of constant offsets to the Schechter parameters, each counted on
 * the redshift nodes the plain prediction already built (src/counts/engine.ts, option `drawNodes`).
 *
 * At a node the observed value is obs = a(z) + slope log10 u, and a(z) holds the characteristic
 * value with coefficient 1 (log10 L* for a luminosity variable, M* for a magnitude one;
 * src/selection/observe.ts). A draw's offsets (d_phi per component, d_alpha per component, d_c)
 * therefore change a node only through
 *   phi*_c -> phi*_c 10^d_phi,  alpha_c -> alpha_c + d_alpha,  a -> a + d_c,
 *   log10 u_lim -> log10 u_lim - d_c / slope,
 * while its redshift, volume weight, transmission and limit in obs stay: per draw only the
 * Schechter part is redone (upper incomplete gamma functions; where the completeness varies, the
 * completeness quadrature's rules in obs, whose completeness values are kept with the curve). From
 * TABLE_MIN_DRAWS draws on, a slice's draws come from Chebyshev tables over the offsets instead
 * (SliceTables where the completeness varies, hardTables under a hard limit).
 *
 * Draws: from a multivariate normal, d = L xi with L the Cholesky factor of the covariance and xi
 * standard normal (improved ziggurat, Doornik 2005) from a Mersenne Twister stream (Matsumoto & Nishimura 1998;
 * src/numerics/random.ts, the numbers of @stdlib/random-base-normal and -mt19937) seeded with [seed, population index] (init_by_array), xi drawn
 * parameter by parameter in the order the file lists them, draw after draw; or every row of a
 * draws file once. Percentiles interpolate linearly between order statistics (Hyndman & Fan 1996,
 * type 7, numpy's default).
 */
import { Mt19937, normalDeviates } from '../numerics/random.js';
import type { FlatCosmology } from '../cosmology/flat-cosmology.js';
import type { Population } from '../model/population.js';
import type { Survey } from '../model/survey.js';
import { modelOffsets, type ModelOffsets, type ModelUncertainty } from '../model/model-uncertainty.js';
import { gammaFn, upperGamma, upperGammaByRecurrence } from '../numerics/gamma.js';
import {
  chebyshev2D,
  chebyshevAlongY,
  chebyshevAt,
  chebyshevAtY,
  chebyshevPoints,
  chebyshevTail,
  type Chebyshev2D,
} from '../numerics/chebyshev.js';
import { makeObserver, type Observer } from '../selection/observe.js';
import { completenessBreaks, completenessFunction, type CompletenessFn } from '../selection/completeness.js';
import { completenessQuadrature, type CompletenessQuadrature } from './completeness-quadrature.js';
import { ComponentAtZ, componentsMap, componentsTotalLuminosity } from '../population/schechter.js';
import {
  histogramFromTable,
  histogramTable,
  offsetRanges,
  type HistogramTableStart,
} from './model-draws-histograms.js';
import { histogramCount, overCompletenessPieces, schechterBetween, type NodeState, type SliceCount } from './engine.js';

// (defined with the model, so that the command line reads them without loading this module)
export { DEFAULT_MODEL_DRAWS, DEFAULT_MODEL_SEED, MAX_MODEL_DRAWS } from '../model/model-uncertainty.js';
/**
 * Draws whose histograms are made (the first ones): a histogram costs one incomplete gamma
 * function per bin edge and node, some twenty times a count, so the per-bin percentiles use at
 * most this many draws (their Monte Carlo error, about 1.25 sigma / sqrt(draws) at p16 and p84,
 * is a few per cent of the band's width).
 */
export const HISTOGRAM_DRAWS = 100;

export const PERCENTILES = [0.025, 0.16, 0.5, 0.84, 0.975] as const;

/**
 * The offsets drawn, by model uncertainty and then by (components, draws, seed, stream): a report
 * draws the same offsets for its prediction, its figures' bands, its forecast and its plan.
 */
const offsetsDrawn = new WeakMap<ModelUncertainty, Map<string, readonly ModelOffsets[]>>();

/**
 * The offsets of every draw of one population (index `stream` among the survey's populations),
 * made once per model uncertainty and arguments: the same array is returned to every caller, who
 * must not change it.
 */
export function drawModelOffsets(
  mu: ModelUncertainty,
  components: number,
  draws: number,
  seed: number,
  stream: number,
): readonly ModelOffsets[] {
  let kept = offsetsDrawn.get(mu);
  if (!kept) offsetsDrawn.set(mu, (kept = new Map<string, readonly ModelOffsets[]>()));
  const key = `${components} ${draws} ${seed} ${stream}`;
  let offsets = kept.get(key);
  if (!offsets) kept.set(key, (offsets = makeModelOffsets(mu, components, draws, seed, stream)));
  return offsets;
}

function makeModelOffsets(
  mu: ModelUncertainty,
  components: number,
  draws: number,
  seed: number,
  stream: number,
): ModelOffsets[] {
  if (mu.kind === 'draws') return mu.offsets.map((row) => modelOffsets(mu.parameters, row, components));
  // (the numbers of @stdlib/random-base-normal's factory(0, 1, { prng }) with prng the normalized
  // output of @stdlib/random-base-mt19937 seeded with [seed, stream]: src/numerics/random.ts)
  const normal = normalDeviates(new Mt19937([seed >>> 0, stream >>> 0]));
  const gauss = () => 0 + 1 * normal();
  const k = mu.parameters.length;
  const xi = new Float64Array(k);
  const d = new Float64Array(k);
  const out: ModelOffsets[] = [];
  for (let i = 0; i < draws; i++) {
    for (let j = 0; j < k; j++) xi[j] = gauss();
    for (let r = 0; r < k; r++) {
      let s = 0;
      const row = mu.cholesky[r]!;
      for (let c = 0; c <= r; c++) s += row[c]! * xi[c]!;
      d[r] = s;
    }
    out.push(modelOffsets(mu.parameters, d, components));
  }
  return out;
}

/** One population's slices under every draw. */
export interface PopulationDraws {
  draws: number;
  /** Per slice, the count of each draw. */
  counts: Float64Array[];
  /** Per slice, the detected luminosity (and the total, where every draw has one) of each draw; absent without luminosities. */
  luminosity?: { detected: Float64Array[]; total?: Float64Array[] };
  /** Per slice, per bin of the plain histogram, the count of each of the first histogram draws. */
  histograms?: { draws: number; bins: Float64Array[] }[];
}

/** log10 of the u beyond which the Schechter factor e^-u (below e^-800) is left out. */
const L10_U_NEGLIGIBLE = Math.log10(800);

interface Setting {
  /** What the completeness quadrature depends on, as text (for keeping level-1 series). */
  key: string;
  width: number;
  observer: Observer;
  completeness?: CompletenessFn;
  breaks?: { points: number[]; scale: number; varying: [number, number] };
  rules?: CompletenessQuadrature;
}

function settingOf(survey: Survey, population: Population, cosmo: FlatCosmology): Setting {
  const observer = makeObserver(survey.detection, population, cosmo);
  const spec = survey.detection.completeness;
  const width = survey.histogramWidth;
  const key = `${JSON.stringify(spec)} ${survey.detection.kind} ${population.variable} ${observer.slope} ${width}`;
  if (!spec) return { key, observer, width };
  const completeness = completenessFunction(spec, survey.detection.kind, population.variable);
  const breaks = completenessBreaks(spec, survey.detection.kind, population.variable);
  const rules = completenessQuadrature(
    spec,
    `${survey.detection.kind} ${population.variable}`,
    observer.slope,
    completeness,
    breaks,
  );
  return { key, observer, width, completeness, breaks, rules };
}

function isZero(o: ModelOffsets): boolean {
  return o.characteristic === 0 && o.log10PhiStar.every((v) => v === 0) && o.alpha.every((v) => v === 0);
}

/** A node under a draw's offsets. */
function shifted(nd: NodeState, o: ModelOffsets, slope: number, lumFactor: number): NodeState {
  return {
    ...nd,
    a: nd.a + o.characteristic,
    log10ULimit: nd.log10ULimit - o.characteristic / slope,
    obsLimit: nd.obsLimit,
    components: componentsMap(
      nd.components,
      (c, k) =>
        new ComponentAtZ(o.log10PhiStar[k] ? c.phiStar * 10 ** o.log10PhiStar[k] : c.phiStar, c.alpha + o.alpha[k]!),
    ),
    allComponents: componentsMap(
      nd.allComponents,
      (c, k) =>
        new ComponentAtZ(o.log10PhiStar[k] ? c.phiStar * 10 ** o.log10PhiStar[k] : c.phiStar, c.alpha + o.alpha[k]!),
    ),
    lumScale: nd.lumScale * lumFactor,
  };
}

/**
 * integral over u above the limit of sum_c phi*_c u^(alpha_c + power) e^-u c(obs(u)) du at a node
 * (power 0: number density; 1: luminosity density in units of L*): closed forms where the
 * completeness is constant, the completeness quadrature's rules where it varies.
 */
function nodeIntegral(nd: NodeState, s: Setting, power: 0 | 1): number {
  const closed = (p: number, q: number): number => schechterBetween(nd.components, p, q, power);
  const l10uLim = nd.log10ULimit;
  if (!s.completeness || !s.breaks) return closed(l10uLim, Infinity);
  const slope = s.observer.slope;
  return overCompletenessPieces(nd, slope, s.completeness, s.breaks.varying, closed, (j, p, q, obsLo, obsHi) => {
    // beyond u = 800 the Schechter factor is below e^-800: nothing to integrate there
    const qq = Math.min(q, L10_U_NEGLIGIBLE);
    if (!(qq > p)) return j;
    const oA = p === l10uLim ? nd.obsLimit : obsLo;
    // (the cut moved out to the histogram grid, so that every draw meets the same few ranges and reuses their rules)
    const cut = nd.a + slope * qq;
    const oB = qq < q ? (slope > 0 ? Math.ceil(cut / s.width) : Math.floor(cut / s.width)) * s.width : obsHi;
    // in pieces on the grid of the histogram's width, as the engine integrates (rules sized per
    // piece), from the faint end; what is left beyond a piece's bright edge at u is at most
    // schechterBetween(log10 u, Infinity) (the completeness is at most 1): the pieces stop where
    // an upper bound on that (tailBound: one exponential, not an incomplete gamma function) falls
    // below 1e-17 of what is counted (the Schechter factor, not the range, then ends them)
    const w = s.width;
    const up = oB > oA;
    let from = oA;
    for (let k = up ? Math.floor(oA / w) + 1 : Math.ceil(oA / w) - 1; ; k += up ? 1 : -1) {
      const edge = k * w;
      const to = up ? Math.min(edge, oB) : Math.max(edge, oB);
      j += s.rules!.integrate(from, to, power);
      if (to === oB) break;
      from = to;
      if (j > 0 && tailBound(nd.components, (from - nd.a) / slope, power) < 1e-17 * j) break;
    }
    return j;
  });
}

/**
 * integral over obs from `faint` to `bright` (the limit of the node, which sits at `faint`, and a
 * brighter obs, both where the completeness varies or fainter) of the node's Schechter sum times
 * the completeness, as nodeIntegral integrates it there: the rules in pieces on the grid of the
 * histogram's width, a constant completeness's value times the closed form beyond the faint end of
 * its varying range (where it is below 4.3e-18).
 */
function stripIntegral(nd: NodeState, s: Setting, faint: number, bright: number, power: 0 | 1): number {
  const slope = s.observer.slope;
  const [vLo, vHi] = s.breaks!.varying;
  // where the completeness starts varying, seen from the faint side
  const vFaint = slope > 0 ? vLo : vHi;
  const toL10u = (o: number) => (o - nd.a) / slope;
  let j = 0;
  let from = faint;
  if ((vFaint - faint) * slope > 0) {
    // the part fainter than the varying range
    const to = (vFaint - bright) * slope > 0 ? bright : vFaint;
    j += s.completeness!(0.5 * (from + to)) * schechterBetween(nd.components, toL10u(from), toL10u(to), power);
    from = to;
  }
  const w = s.width;
  const up = bright > from;
  if (from === bright) return j;
  for (let k = up ? Math.floor(from / w) + 1 : Math.ceil(from / w) - 1; ; k += up ? 1 : -1) {
    const edge = k * w;
    const to = up ? Math.min(edge, bright) : Math.max(edge, bright);
    j += s.rules!.integrate(from, to, power);
    if (to === bright) break;
    from = to;
  }
  return j;
}

/**
 * An upper bound on schechterBetween(components, l10u, Infinity, power) (the Schechter factor
 * beyond u = 10^l10u), at the cost of one exponential per component: with s = alpha + 1 + power,
 * Gamma(s, u) <= u^(s-1) e^-u for s <= 1 (t^(s-1) <= u^(s-1) over t >= u), and
 * Gamma(s, u) <= u^(s-1) e^-u / (1 - (s-1)/u) for s > 1 and u > s - 1 (t^(s-1) <= u^(s-1)
 * e^((s-1)(t-u)/u)); Infinity where neither holds. A bound, so a sum stopped by it leaves out no
 * more than a stop by the incomplete gamma function itself.
 */
export function tailBound(
  components: readonly { phiStar: number; alpha: number }[],
  l10u: number,
  power: 0 | 1,
): number {
  const u = 10 ** l10u;
  const lnU = l10u * Math.LN10;
  let b = 0;
  for (const c of components) {
    const sm1 = c.alpha + power;
    const e = Math.exp(sm1 * lnU - u);
    if (sm1 <= 0) b += c.phiStar * e;
    else if (u > 2 * sm1) b += (c.phiStar * e) / (1 - sm1 / u);
    else return Infinity;
  }
  return b;
}

/** A slice's nodes as flat arrays (the quantities a draw does not change), and scratch nodes for the completeness path. */
interface SliceNodes {
  count: number;
  vw: Float64Array;
  l10u: Float64Array;
  a: Float64Array;
  lumScale: Float64Array;
  /** The limit in obs at each node. */
  obsLimit: Float64Array;
  /** Per component: phi* (times the selection weight: what is detected; and as the luminosity function gives it) and alpha at each node. */
  phi: Float64Array[];
  allPhi: Float64Array[];
  alpha: Float64Array[];
  scratch: NodeState[];
}

function flatten(nodes: readonly NodeState[]): SliceNodes {
  // every node (one that detects nothing still holds sources for the total luminosity)
  const kept = nodes;
  const m = kept.length;
  const comps = kept[0]?.components.length ?? 0;
  return {
    count: m,
    vw: Float64Array.from(kept, (nd) => nd.volumeWeight),
    l10u: Float64Array.from(kept, (nd) => nd.log10ULimit),
    a: Float64Array.from(kept, (nd) => nd.a),
    lumScale: Float64Array.from(kept, (nd) => nd.lumScale),
    obsLimit: Float64Array.from(kept, (nd) => nd.obsLimit),
    phi: Array.from({ length: comps }, (_, c) => Float64Array.from(kept, (nd) => nd.components[c]!.phiStar)),
    allPhi: Array.from({ length: comps }, (_, c) => Float64Array.from(kept, (nd) => nd.allComponents[c]!.phiStar)),
    alpha: Array.from({ length: comps }, (_, c) => Float64Array.from(kept, (nd) => nd.components[c]!.alpha)),
    scratch: kept.map((nd) => ({
      ...nd,
      components: componentsMap(nd.components, (c) => new ComponentAtZ(c.phiStar, c.alpha)),
      allComponents: componentsMap(nd.allComponents, (c) => new ComponentAtZ(c.phiStar, c.alpha)),
    })),
  };
}

/**
 * Count (and luminosities) of one slice under one draw. Hard limits: per node and component one
 * incomplete gamma function Gamma(s, u) with s = alpha + 1, and the luminosity from it by
 * Gamma(s + 1, u) = s Gamma(s, u) + u^s e^-u (DLMF 8.8.2). Varying completeness: nodeIntegral.
 */
function sliceUnderDraw(
  f: SliceNodes,
  s: Setting,
  o: ModelOffsets,
  lumFactor: number,
  withLum: boolean,
  withTotal: boolean,
  out: Float64Array,
): void {
  const slope = s.observer.slope;
  const shift = -o.characteristic / slope;
  const nc = f.phi.length;
  let count = 0;
  let detected = 0;
  let total = 0;
  let hasTotal = withTotal;
  if (!s.completeness) {
    let lastAlpha = NaN;
    let lastGamma = 0;
    for (let k = 0; k < nc; k++) {
      const phiScale = o.log10PhiStar[k] ? 10 ** o.log10PhiStar[k]! : 1;
      const dAlpha = o.alpha[k]!;
      const phiK = f.phi[k]!;
      const alphaK = f.alpha[k]!;
      for (let i = 0; i < f.count; i++) {
        const sOrder = alphaK[i]! + dAlpha + 1;
        const lu = f.l10u[i]! + shift;
        const u = 10 ** lu;
        const g = Number.isFinite(lu) ? upperGamma(sOrder, u) : 0;
        const w = f.vw[i]! * phiK[i]! * phiScale;
        count += w * g;
        if (!withLum) continue;
        const lw = w * f.lumScale[i]! * lumFactor;
        if (g > 0) detected += lw * (sOrder * g + Math.exp(sOrder * lu * Math.LN10 - u));
        if (hasTotal) {
          if (!(sOrder > -1)) hasTotal = false;
          else {
            if (sOrder + 1 !== lastAlpha) {
              lastAlpha = sOrder + 1;
              lastGamma = gammaFn(lastAlpha);
            }
            total += f.allPhi[k]![i]! * phiScale * f.vw[i]! * f.lumScale[i]! * lumFactor * lastGamma;
          }
        }
      }
    }
  } else {
    const nodes = f.scratch;
    for (let i = 0; i < f.count; i++) {
      const nd = nodes[i]!;
      nd.a = f.a[i]! + o.characteristic;
      nd.log10ULimit = f.l10u[i]! + shift;
      nd.lumScale = f.lumScale[i]! * lumFactor;
      for (let k = 0; k < nc; k++) {
        const c = nd.components[k]!;
        c.phiStar = o.log10PhiStar[k] ? f.phi[k]![i]! * 10 ** o.log10PhiStar[k]! : f.phi[k]![i]!;
        c.alpha = f.alpha[k]![i]! + o.alpha[k]!;
        const all = nd.allComponents[k]!;
        all.phiStar = o.log10PhiStar[k] ? f.allPhi[k]![i]! * 10 ** o.log10PhiStar[k]! : f.allPhi[k]![i]!;
        all.alpha = c.alpha;
      }
    }
    s.rules!.setSlice(nodes.filter((nd) => Number.isFinite(nd.log10ULimit)));
    for (const nd of nodes) {
      const sees = Number.isFinite(nd.log10ULimit);
      if (sees) {
        s.rules!.setNode(nd);
        count += nd.volumeWeight * nodeIntegral(nd, s, 0);
      }
      if (!withLum) continue;
      if (sees) detected += nd.volumeWeight * nd.lumScale * nodeIntegral(nd, s, 1);
      if (!hasTotal) continue;
      const jt = componentsTotalLuminosity(nd.allComponents);
      if (jt === undefined) hasTotal = false;
      else total = total + nd.volumeWeight * nd.lumScale * jt;
    }
  }
  setDrawResult(out, count, detected, total, hasTotal);
}

/** A slice under one draw: its count, detected luminosity, total luminosity and whether the total is defined (1) or not (0). */
const DRAW_COUNT = 0;
const DRAW_DETECTED = 1;
const DRAW_TOTAL = 2;
const DRAW_HAS_TOTAL = 3;

function setDrawResult(out: Float64Array, count: number, detected: number, total: number, hasTotal: boolean): void {
  out[DRAW_COUNT] = count;
  out[DRAW_DETECTED] = detected;
  out[DRAW_TOTAL] = total;
  out[DRAW_HAS_TOTAL] = hasTotal ? 1 : 0;
}

/**
 * The tabulated path where the completeness varies (the exact path, sliceUnderDraw, costs one
 * completeness quadrature per node and draw). With the limit at the same obs at every node (flux
 * and magnitude limits), a node's integral depends only on t = a (its characteristic term, moved by
 * the draw's d_c) and its alpha (moved by d_alpha), phi* being a factor:
 *
 *   J(t, alpha) = integral above the limit of u^alpha e^-u c(obs(u)) du,  obs = t + slope log10 u,
 *
 * and J1 the same with u^(alpha + 1) (the luminosity). Two levels of Chebyshev series
 * (src/numerics/chebyshev.ts), in logarithms so that their error is relative:
 *  1. ln J and ln J1 over t from the smallest a of the population's nodes plus the smallest d_c
 *     of the draws to the largest plus the largest, and alpha over what the draws reach at those
 *     nodes, from the exact path's node integrals (nodeIntegral with phi* = 1) at the Chebyshev
 *     points: one table for every slice whose limit sits at the same obs (populationRange; an
 *     explore page, which moves level 1 from limit to limit, makes one per slice, over the slice's
 *     nodes, so that a change of the window's end leaves the other slices' series as they were);
 *  2. per component, the slice's ln N_k(d_c, d_alpha_k) = ln sum_i V_i phi*_ik J(a_i + d_c,
 *     alpha_ik + d_alpha_k) (and the luminosity) over the draws' range of offsets, from level 1
 *     (a row of points at a time: at one d_c, level 1 at each node's t as a series in alpha,
 *     chebyshevAlongY, then at every d_alpha).
 * A draw then costs one series per component: N = sum_k 10^(d_phi_k) N_k. Along each variable
 * the points start at 16 and 16 (for a population's first slice, where 16 and 8 failed on every
 * sample; a later slice starts at what the slice before it needed) and double (to 64 and 32)
 * until the coefficients' tail, an estimate of
 * the error in the logarithm, is below TABLE_TOLERANCE x max(1, the largest |ln|);
 * otherwise, or where a value vanishes, or where the limit differs from node to node (a
 * threshold limit tabulated in z), the slice takes the exact path for every draw.
 */
interface SliceTables {
  /** Per component: ln of its count and (when asked for) of its detected luminosity as functions of (d_c, d_alpha); undefined: the component detects nothing. */
  count: (Chebyshev2D | undefined)[];
  lum: (Chebyshev2D | undefined)[];
  /** Per component: ln of the luminosity of all sources over d_alpha (totalTables); absent: the closed form at each node. */
  total?: (Chebyshev2D | undefined)[];
}

/** Tail of the total luminosity's series accepted (absolute, in the logarithm). */
const TOTAL_TOLERANCE = 1e-13;

/**
 * The luminosity of all sources of a slice under the draws, per component a function of d_alpha
 * alone: T_k(d_alpha) = sum_i phi*_ik V_i L_i Gamma(alpha_ik + d_alpha + 2) (the closed form the
 * exact path sums at every node and draw), as a Chebyshev series of ln T_k over the draws' range
 * of d_alpha (16 to 64 points, tail below TOTAL_TOLERANCE): one series per draw instead of one
 * gamma function per node. Undefined (the closed form per node) where some draw reaches
 * alpha + 2 <= 0 at some node (its total is then absent) or the series does not converge.
 */
function totalTables(f: SliceNodes, offsets: readonly ModelOffsets[]): (Chebyshev2D | undefined)[] | undefined {
  const nc = f.phi.length;
  const { daMin, daMax } = offsetRanges(offsets, nc);
  const out: (Chebyshev2D | undefined)[] = [];
  for (let k = 0; k < nc; k++) {
    const alphaK = f.alpha[k]!;
    const weight = Float64Array.from(alphaK, (_, i) => f.allPhi[k]![i]! * f.vw[i]! * f.lumScale[i]!);
    for (let i = 0; i < f.count; i++) if (!(alphaK[i]! + daMin[k]! + 2 > 0)) return undefined;
    if (!weight.some((w) => w !== 0)) {
      out.push(undefined);
      continue;
    }
    const lnT = (da: number): number => {
      let t = 0;
      for (let i = 0; i < f.count; i++) if (weight[i] !== 0) t += weight[i]! * gammaFn(alphaK[i]! + da + 2);
      return Math.log(t);
    };
    const y0 = daMin[k]!;
    const y1 = daMax[k]!;
    let series: Chebyshev2D | undefined;
    for (let n = y1 > y0 ? 16 : 1; n <= 64; n *= 2) {
      const v = Float64Array.from(chebyshevPoints(n, y0, y1), lnT);
      if (!v.every(Number.isFinite)) return undefined;
      const c = chebyshev2D(v, n, 1, y0, y1, 0, 0);
      if (n === 1 || chebyshevTail(c).x <= TOTAL_TOLERANCE) {
        series = c;
        break;
      }
    }
    if (!series) return undefined;
    out.push(series);
  }
  return out;
}

/** Slices drawn by the tables and by the exact path where the completeness varies, since the start (for tests and benchmarks). */
export const drawPaths = { tabulated: 0, exact: 0 };

/** Draws from which the completeness path tabulates (below it the exact path costs less). */
export const TABLE_MIN_DRAWS = 64;
/** Tail of the Chebyshev coefficients accepted, relative to max(1, the largest |ln|) (see SliceTables). */
export const TABLE_TOLERANCE = 1e-10;
/**
 * The points a population's first slice starts from: where the completeness varies (SliceTables,
 * whose count and luminosity share their points, doubled, so that the count's points do not
 * depend on whether the luminosity is asked for), and under a hard limit (hardTables: count and
 * luminosity each on points of their own, grown by morePoints).
 */
const TABLE_POINTS: [number, number] = [16, 16];
const HARD_TABLE_POINTS: [number, number] = [10, 8];
/** The points each level starts from: TABLE_POINTS (HARD_TABLE_POINTS) for a population's first slice, then what the slice before needed. */
interface TableStart {
  node: [number, number];
  slice: [number, number];
  /** The detected luminosity's tables under a hard limit (hardTables). */
  lum: [number, number];
}
const TABLE_MAX_POINTS: [number, number] = [64, 32];

/**
 * Chebyshev series of ln g over [x0, x1] x [y0, y1] (g evaluated a row of points at a time: at
 * one x and every y, values returned together for several functions, out[m][j] the m-th at the
 * j-th y), doubling the points (`grow`: adding as many as morePoints says) until the tail is
 * small. Undefined when a value is not positive and finite or the tail stays large.
 */
function logSeries(
  x0: number,
  x1: number,
  y0: number,
  y1: number,
  functions: number,
  g: (x: number, ys: Float64Array, out: Float64Array[]) => void,
  start: [number, number],
  keep?: { values?: Float64Array[] },
  grow = false,
): Chebyshev2D[] | undefined {
  let [nx, ny] = start;
  if (!(x1 > x0)) nx = 1;
  if (!(y1 > y0)) ny = 1;
  for (;;) {
    const xs = chebyshevPoints(nx, x0, x1);
    const ys = chebyshevPoints(ny, y0, y1);
    const got = Array.from({ length: functions }, () => new Float64Array(ny));
    const v = Array.from({ length: functions }, () => new Float64Array(nx * ny));
    let big = 1;
    for (let i = 0; i < nx; i++) {
      g(xs[i]!, ys, got);
      for (let m = 0; m < functions; m++) {
        const gm = got[m]!;
        const vm = v[m]!;
        for (let j = 0; j < ny; j++) {
          const x = gm[j]!;
          if (!(x > 0 && x < Infinity)) return undefined;
          const l = Math.log(x);
          vm[i * ny + j] = l;
          big = Math.max(big, Math.abs(l));
        }
      }
    }
    const series = v.map((vm) => chebyshev2D(vm, nx, ny, x0, x1, y0, y1));
    const { moreX, moreY } = tailsTooLarge(series, big);
    if (!moreX && !moreY) {
      if (nx > 1) start[0] = nx;
      if (ny > 1) start[1] = ny;
      if (keep) keep.values = v;
      return series;
    }
    if ((moreX && nx >= TABLE_MAX_POINTS[0]) || (moreY && ny >= TABLE_MAX_POINTS[1])) return undefined;
    const tol = TABLE_TOLERANCE * big;
    if (moreX) nx = grow ? morePoints(series, true, tol, TABLE_MAX_POINTS[0]) : 2 * nx;
    if (moreY) ny = grow ? morePoints(series, false, tol, TABLE_MAX_POINTS[1]) : 2 * ny;
  }
}

/**
 * The points to take next along x (or y) where the series' tail there is too large: where their
 * coefficients fall geometrically (rate rho per degree, from the second half of them: the
 * magnitude of each row (or column) the sum of its |coefficients|, as chebyshevTail takes it, the
 * largest over the series), as many more as bring the tail to a quarter of the tolerance, plus one;
 * at least two more and at most twice as many (the doubling without a rate), and within the cap.
 */
function morePoints(series: readonly Chebyshev2D[], alongX: boolean, tol: number, cap: number): number {
  const n = alongX ? series[0]!.nx : series[0]!.ny;
  const m = new Float64Array(n);
  for (const c of series) {
    const row = new Float64Array(n);
    for (let i = 0; i < c.nx; i++)
      for (let j = 0; j < c.ny; j++) row[alongX ? i : j] = row[alongX ? i : j]! + Math.abs(c.coef[i * c.ny + j]!);
    for (let k = 0; k < n; k++) m[k] = Math.max(m[k]!, row[k]!);
  }
  const tail = Math.max(m[n - 1]!, m[n - 2]!);
  const h = Math.floor(n / 2);
  const rho = (tail / Math.max(m[h]!, m[h - 1]!)) ** (1 / (n - 1 - h));
  let next = 2 * n;
  if (rho > 0 && rho < 1) next = n + Math.ceil(Math.log(tol / (4 * tail)) / Math.log(rho)) + 1;
  return Math.min(cap, Math.max(n + 2, Math.min(2 * n, next)));
}

/** Whether the series' coefficient tails along x and along y exceed TABLE_TOLERANCE x big. */
function tailsTooLarge(series: readonly Chebyshev2D[], big: number): { moreX: boolean; moreY: boolean } {
  let tx = 0;
  let ty = 0;
  for (const c of series) {
    const t = chebyshevTail(c);
    tx = Math.max(tx, t.x);
    ty = Math.max(ty, t.y);
  }
  const tol = TABLE_TOLERANCE * big;
  return { moreX: tx > tol, moreY: ty > tol };
}

/**
 * Level-1 series made so far, by everything they depend on (the completeness curve, detection kind,
 * variable, slope and histogram width; the limit in obs; the ranges; the luminosity; the points
 * started from), with the points they ended at: the same inputs give the same series, so a
 * prediction that differs only where level 1 cannot see it (the area, phi*, the slices' volume
 * weights: an explore page's area control) reuses them. The last LEVEL1_KEPT are kept.
 */
interface Level1 {
  series: Chebyshev2D[] | undefined;
  ended: [number, number];
  /** The limit in obs, and ln J (and ln J1) at the points of the series (row-major, as chebyshev2D takes them). */
  obsLim: number;
  values?: Float64Array[];
  /** Limit moves made since the series were made afresh. */
  moves: number;
}
const level1Kept = new Map<string, Level1>();
const LEVEL1_KEPT = 64;
/**
 * The last level-1 series of each shape (everything they depend on but the limit: an explore
 * page's limit control). At another limit a node integral differs by the integral over the strip
 * of obs between the two limits, J(t, alpha; L') = J(t, alpha; L) +- integral over the strip, so
 * the values at the same points are those plus one short integral each (the completeness
 * quadrature's rules on the strip), and the series follow from them (kept when their tail passes
 * the test of logSeries; otherwise, after LEVEL1_MOVES moves, where a value would fall below
 * 1e-4 of the one it is moved from, or where a limit lies brighter than the completeness's varying
 * range, made afresh). Equal to series made afresh to about 1e-13 relative (the rules' error per
 * moved strip), well inside the tables' 1e-10.
 */
const level1ByShape = new Map<string, Level1>();
const LEVEL1_MOVES = 32;

/** Forget the kept level-1 series (tests: a computation afresh). */
export function forgetLevel1Series(): void {
  level1Kept.clear();
  level1ByShape.clear();
  level2Kept.clear();
}

/** Level-1 series moved (made from the series at another limit) and made afresh, since the start (tests, benchmarks). */
export const level1Paths = { moved: 0, afresh: 0 };

function keepLevel1(map: Map<string, Level1>, key: string, entry: Level1): void {
  map.delete(key);
  if (map.size >= LEVEL1_KEPT) map.delete(map.keys().next().value!);
  map.set(key, entry);
}

function nodeLevelKept(
  shape: string,
  obsLim: number,
  start: TableStart,
  make: (keep: { values?: Float64Array[] }) => Chebyshev2D[] | undefined,
  move: (from: Level1) => { series: Chebyshev2D[]; values: Float64Array[] } | undefined,
  moveAcrossLimits: boolean,
): Chebyshev2D[] | undefined {
  // moved series differ from series made afresh at round-off (about 1e-14): only a caller that
  // asks (an explore page) gets them, kept or new, so a prediction never depends on what the
  // process ran before
  const key = `${shape} ${obsLim}`;
  let kept = level1Kept.get(key);
  if (kept && (moveAcrossLimits || kept.moves === 0)) {
    start.node[0] = kept.ended[0];
    start.node[1] = kept.ended[1];
    return kept.series;
  }
  const before = moveAcrossLimits ? level1ByShape.get(shape) : undefined;
  const moved = before?.series && before.values && before.moves < LEVEL1_MOVES ? move(before) : undefined;
  if (moved && before) {
    level1Paths.moved++;
    kept = { ...moved, ended: before.ended, obsLim, moves: before.moves + 1 };
    start.node[0] = kept.ended[0];
    start.node[1] = kept.ended[1];
  } else {
    level1Paths.afresh++;
    const holder: { values?: Float64Array[] } = {};
    const series = make(holder);
    kept = { series, ended: [start.node[0], start.node[1]], obsLim, values: holder.values, moves: 0 };
  }
  keepLevel1(level1Kept, key, kept);
  if (kept.series) keepLevel1(level1ByShape, shape, kept);
  return kept.series;
}

/**
 * What level 1 needs of a slice: the limit in obs (the same at every node that detects, where the
 * node's limit in u puts it), the range of the nodes' t and alpha, and the nodes that detect;
 * undefined where the limit differs from node to node (the exact path) or no node detects.
 */
interface SliceRange {
  obsLim: number;
  aMin: number;
  aMax: number;
  alphaMin: number;
  alphaMax: number;
  seen: number[];
}

function sliceRange(f: SliceNodes, slope: number): SliceRange | undefined {
  const nc = f.phi.length;
  let obsLim = NaN;
  let aMin = Infinity;
  let aMax = -Infinity;
  let alphaMin = Infinity;
  let alphaMax = -Infinity;
  const seen: number[] = [];
  for (let i = 0; i < f.count; i++) {
    const l = f.l10u[i]!;
    if (!Number.isFinite(l)) continue;
    const lim = f.scratch[i]!.obsLimit;
    const a = f.a[i]!;
    if (Number.isNaN(obsLim)) obsLim = lim;
    // the same limit in obs at every node, where the node's limit in u puts it
    const scale = 1e-12 * Math.max(1, Math.abs(obsLim));
    if (Math.abs(lim - obsLim) > scale || Math.abs(a + slope * l - obsLim) > 1e3 * scale) return undefined;
    seen.push(i);
    aMin = Math.min(aMin, a);
    aMax = Math.max(aMax, a);
    for (let k = 0; k < nc; k++) {
      alphaMin = Math.min(alphaMin, f.alpha[k]![i]!);
      alphaMax = Math.max(alphaMax, f.alpha[k]![i]!);
    }
  }
  return seen.length === 0 ? undefined : { obsLim, aMin, aMax, alphaMin, alphaMax, seen };
}

/**
 * One range of level 1 for every slice of a population whose limit sits at the first such slice's
 * obs (flux and magnitude limits: all of them): the union of the slices' ranges of t and alpha.
 * Level 1 is then made once over it and serves every slice, where a table per slice made it once
 * per slice (the robust UV plan: 4 tables of 16 x 16 node integrals, with luminosity twice that).
 */
function populationRange(ranges: readonly (SliceRange | undefined)[]): SliceRange | undefined {
  let union: SliceRange | undefined;
  for (const r of ranges) {
    if (!r) continue;
    if (!union) union = { ...r, seen: [] };
    else if (r.obsLim === union.obsLim) {
      union.aMin = Math.min(union.aMin, r.aMin);
      union.aMax = Math.max(union.aMax, r.aMax);
      union.alphaMin = Math.min(union.alphaMin, r.alphaMin);
      union.alphaMax = Math.max(union.alphaMax, r.alphaMax);
    }
  }
  return union;
}

/**
 * Level 1 over a range of t = a + d_c and alpha + d_alpha (the nodes' range widened by the draws'
 * offsets): ln J (and ln J1) from the node integrals at the Chebyshev points, kept by everything
 * they depend on (nodeLevelKept), or moved from another limit where `moveAcrossLimits`.
 */
function levelOne(
  s: Setting,
  range: SliceRange,
  nc: number,
  offsets: readonly ModelOffsets[],
  withLum: boolean,
  start: TableStart,
  moveAcrossLimits: boolean,
): Chebyshev2D[] | undefined {
  const slope = s.observer.slope;
  const { obsLim, aMin, aMax, alphaMin, alphaMax } = range;
  const { dcMin, dcMax, daMin, daMax } = offsetRanges(offsets, nc);
  // level 1: the node integral J (and J1) over (t, alpha)
  const probe: NodeState = {
    z: 0,
    volumeWeight: 1,
    a: 0,
    log10ULimit: 0,
    obsLimit: obsLim,
    components: [new ComponentAtZ(1, 0)],
    allComponents: [new ComponentAtZ(1, 0)],
    lumScale: 1,
  };
  const x0 = aMin + dcMin;
  const x1 = aMax + dcMax;
  const y0 = alphaMin + Math.min(...daMin);
  const y1 = alphaMax + Math.max(...daMax);
  const functions = withLum ? 2 : 1;
  const nodeAt = (t: number, alpha: number, limit: number) => {
    probe.a = t;
    probe.obsLimit = limit;
    probe.log10ULimit = (limit - t) / slope;
    probe.components[0]!.alpha = alpha;
    s.rules!.setSlice([probe]);
    s.rules!.setNode(probe);
  };
  return nodeLevelKept(
    `${s.key} ${x0} ${x1} ${y0} ${y1} ${withLum} ${start.node.join(',')}`,
    obsLim,
    start,
    (keep) =>
      logSeries(
        x0,
        x1,
        y0,
        y1,
        functions,
        (t, alphas, out) => {
          alphas.forEach((alpha, j) => {
            nodeAt(t, alpha, obsLim);
            out[0]![j] = nodeIntegral(probe, s, 0);
            if (withLum) out[1]![j] = nodeIntegral(probe, s, 1);
          });
        },
        start.node,
        keep,
      ),
    (from) => {
      const c0 = from.series![0]!;
      const { nx, ny } = c0;
      const varying = s.breaks!.varying;
      // (a limit brighter than where the completeness varies: the constant's value at each limit differs)
      const bright = (o: number) => (slope > 0 ? o > varying[1] : o < varying[0]);
      if (bright(obsLim) || bright(from.obsLim)) return undefined;
      // the strip between the limits, from its faint end; + where the new limit is the fainter
      const sign = (obsLim - from.obsLim) * slope < 0 ? 1 : -1;
      const faint = sign > 0 ? obsLim : from.obsLim;
      const brightEnd = sign > 0 ? from.obsLim : obsLim;
      const xs = chebyshevPoints(nx, x0, x1);
      const ys = chebyshevPoints(ny, y0, y1);
      const values = Array.from({ length: functions }, () => new Float64Array(nx * ny));
      let big = 1;
      for (let i = 0; i < nx; i++)
        for (let j = 0; j < ny; j++) {
          nodeAt(xs[i]!, ys[j]!, faint);
          for (let m = 0; m < functions; m++) {
            const old = Math.exp(from.values![m]![i * ny + j]!);
            const moved = old + sign * stripIntegral(probe, s, faint, brightEnd, m as 0 | 1);
            if (!(moved > 1e-4 * old && moved < Infinity)) return undefined;
            const l = Math.log(moved);
            values[m]![i * ny + j] = l;
            big = Math.max(big, Math.abs(l));
          }
        }
      const series = values.map((v) => chebyshev2D(v, nx, ny, x0, x1, y0, y1));
      const { moreX, moreY } = tailsTooLarge(series, big);
      return moreX || moreY ? undefined : { series, values };
    },
    moveAcrossLimits,
  );
}

function sliceTables(
  f: SliceNodes,
  s: Setting,
  offsets: readonly ModelOffsets[],
  withLum: boolean,
  start: TableStart,
  moveAcrossLimits: boolean,
  range: SliceRange | undefined,
  shared: { range: SliceRange; series: Chebyshev2D[] | undefined } | undefined,
): SliceTables | undefined {
  const nc = f.phi.length;
  if (!range) return undefined;
  const { seen } = range;
  const { dcMin, dcMax, daMin, daMax } = offsetRanges(offsets, nc);
  // level 1: the population's where the slice's limit is at its obs (and its series were made),
  // else the slice's own
  const nodeLevel =
    shared?.series && shared.range.obsLim === range.obsLim
      ? shared.series
      : levelOne(s, range, nc, offsets, withLum, start, moveAcrossLimits);
  if (!nodeLevel) return undefined;
  const [j0, j1] = nodeLevel as [Chebyshev2D, Chebyshev2D | undefined];
  // level 2: per component, the slice over (d_c, d_alpha)
  const out: SliceTables = { count: [], lum: [] };
  for (let k = 0; k < nc; k++) {
    const phiK = f.phi[k]!;
    const alphaK = f.alpha[k]!;
    const used = seen.filter((i) => f.vw[i]! * phiK[i]! !== 0);
    if (used.length === 0) {
      out.count.push(undefined);
      out.lum.push(undefined);
      continue;
    }
    // a row (one d_c): per node, the level-1 series at its t as a series in alpha, then at each d_alpha
    const row0 = new Float64Array(j0.ny);
    const row1 = new Float64Array(j1?.ny ?? 0);
    const row = new Level2Row(f.vw, f.a, f.lumScale, phiK, alphaK, used, j0, j1, row0, row1, withLum);
    const series = sliceLevelKept(j0, j1, f, k, used, dcMin, dcMax, daMin[k]!, daMax[k]!, withLum, start, () =>
      logSeries(dcMin, dcMax, daMin[k]!, daMax[k]!, withLum ? 2 : 1, row.values.bind(row), start.slice),
    );
    if (!series) return undefined;
    out.count.push(series[0]);
    out.lum.push(series[1]);
  }
  return out;
}

/**
 * A row of a slice's level-2 values (one d_c, every d_alpha) for one component: per node, the
 * level-1 series at its t as a series in alpha, then at each d_alpha. A class whose method every
 * component's tables share, rather than a closure made per component: V8's optimising compiler
 * compiled each such closure afresh (twice in a cold predict of the robust UV plan). It holds the
 * slice's arrays rather than the slice, whose objects change shape once (V8 makes an object
 * literal's later copies from a template), which would throw its compiled code away.
 */
class Level2Row {
  constructor(
    private readonly vw: Float64Array,
    private readonly a: Float64Array,
    private readonly lumScale: Float64Array,
    private readonly phiK: Float64Array,
    private readonly alphaK: Float64Array,
    private readonly used: readonly number[],
    private readonly j0: Chebyshev2D,
    private readonly j1: Chebyshev2D | undefined,
    private readonly row0: Float64Array,
    private readonly row1: Float64Array,
    private readonly withLum: boolean,
  ) {}

  values(dc: number, das: Float64Array, got: Float64Array[]): void {
    const { vw, a, lumScale, phiK, alphaK, used, j0, j1, row0, row1, withLum } = this;
    // the count's values and the luminosity's by one loop over the functions, so that V8 compiles
    // one copy of the sums (two, written out for each, made this method's compilation twice as large)
    const functions = withLum ? 2 : 1;
    for (let m = 0; m < functions; m++) {
      const out = got[m]!.fill(0);
      const c = m === 0 ? j0 : j1;
      if (c)
        nodeSums(c, m === 0 ? row0 : row1, vw, phiK, m === 0 ? undefined : lumScale, a, alphaK, used, dc, das, out);
    }
  }
}

/**
 * out[q] += V_i phi*_ik (times the luminosity's scale where given) exp(J(a_i + d_c, alpha_ik +
 * d_alpha_q)) over the nodes `used`, J the level-1 series `c` (collapsed at each node's t into `row`).
 */
function nodeSums(
  c: Chebyshev2D,
  row: Float64Array,
  vw: Float64Array,
  phiK: Float64Array,
  lumScale: Float64Array | undefined,
  a: Float64Array,
  alphaK: Float64Array,
  used: readonly number[],
  dc: number,
  das: Float64Array,
  out: Float64Array,
): void {
  for (const i of used) {
    const w0 = vw[i]! * phiK[i]!;
    const w = lumScale ? w0 * lumScale[i]! : w0;
    chebyshevAlongY(c, a[i]! + dc, row);
    for (let q = 0; q < das.length; q++) out[q] = out[q]! + w * Math.exp(chebyshevAtY(c, row, alphaK[i]! + das[q]!));
  }
}

/**
 * Level-2 series made so far, by everything they depend on: the level-1 series (the same objects:
 * kept, or moved to a limit for an explore page only), the slice's nodes that detect (volume
 * weight, phi*, a, alpha and the luminosity's scale of each), the draws' ranges, the luminosity and
 * the points started from, with the points they ended at. The same inputs make the same series,
 * so a slice an explore page's change leaves as it was (the window's other end) reads them. The
 * last LEVEL2_KEPT are kept.
 */
const level2Kept = new Map<string, { series: Chebyshev2D[] | undefined; ended: [number, number] }>();
const LEVEL2_KEPT = 64;
/** Level-2 series read from those kept and made, since the start (tests, benchmarks). */
export const level2Paths = { kept: 0, made: 0 };
const seriesIds = new WeakMap<Chebyshev2D, number>();
let seriesCount = 0;

function seriesId(c: Chebyshev2D | undefined): number {
  if (!c) return -1;
  let id = seriesIds.get(c);
  if (id === undefined) seriesIds.set(c, (id = ++seriesCount));
  return id;
}

function sliceLevelKept(
  j0: Chebyshev2D,
  j1: Chebyshev2D | undefined,
  f: SliceNodes,
  k: number,
  used: readonly number[],
  dcMin: number,
  dcMax: number,
  daMin: number,
  daMax: number,
  withLum: boolean,
  start: TableStart,
  make: () => Chebyshev2D[] | undefined,
): Chebyshev2D[] | undefined {
  const parts = [seriesId(j0), seriesId(j1), dcMin, dcMax, daMin, daMax, withLum, start.slice[0], start.slice[1]];
  for (const i of used) parts.push(i, f.vw[i]!, f.phi[k]![i]!, f.a[i]!, f.alpha[k]![i]!, f.lumScale[i]!);
  const key = parts.join(' ');
  const kept = level2Kept.get(key);
  level2Paths[kept ? 'kept' : 'made']++;
  if (kept) {
    start.slice[0] = kept.ended[0];
    start.slice[1] = kept.ended[1];
    return kept.series;
  }
  const series = make();
  level2Kept.delete(key);
  if (level2Kept.size >= LEVEL2_KEPT) level2Kept.delete(level2Kept.keys().next().value!);
  level2Kept.set(key, { series, ended: [start.slice[0], start.slice[1]] });
  return series;
}

/**
 * The tables of a slice with a hard limit (no completeness): per component, ln N_k(d_c, d_alpha_k)
 * = ln sum_i V_i phi*_ik Gamma(alpha_ik + d_alpha_k + 1, u_i 10^(-d_c / slope)) and the detected
 * luminosity (Gamma(s + 1, u) = s Gamma(s, u) + u^s e^-u, as sliceUnderDraw) as Chebyshev series
 * over the draws' offsets, from the exact sums at the Chebyshev points (logSeries, the tolerance of
 * SliceTables; the incomplete gamma functions by upperGammaByRecurrence): a draw then costs one series per component instead of one incomplete
 * gamma function per node and component. Undefined (the exact path) where a value vanishes or the
 * tail stays large.
 */
function hardTables(
  f: SliceNodes,
  s: Setting,
  offsets: readonly ModelOffsets[],
  withLum: boolean,
  start: TableStart,
): SliceTables | undefined {
  const slope = s.observer.slope;
  const nc = f.phi.length;
  const { dcMin, dcMax, daMin, daMax } = offsetRanges(offsets, nc);
  const out: SliceTables = { count: [], lum: [] };
  for (let k = 0; k < nc; k++) {
    const phiK = f.phi[k]!;
    const alphaK = f.alpha[k]!;
    const used: number[] = [];
    for (let i = 0; i < f.count; i++) if (f.vw[i]! * phiK[i]! !== 0 && Number.isFinite(f.l10u[i]!)) used.push(i);
    if (used.length === 0) {
      out.count.push(undefined);
      out.lum.push(undefined);
      continue;
    }
    // the count and the luminosity each a series of its own, so that the counts' tables are the
    // same with and without the luminosity; the luminosity's at the points of the count's reads
    // the incomplete gamma functions the count made there (by row: d_c, the first d_alpha and
    // the row's length)
    const made = new Map<string, Float64Array>();
    const table = (lum: boolean) =>
      logSeries(
        dcMin,
        dcMax,
        daMin[k]!,
        daMax[k]!,
        1,
        (dc, das, got) => {
          const v = got[0]!.fill(0);
          const shift = -dc / slope;
          const key = `${dc} ${das[0]} ${das.length}`;
          const kept = lum ? made.get(key) : undefined;
          const gammas = kept ?? (withLum && !lum ? new Float64Array(used.length * das.length) : undefined);
          if (!lum && gammas) made.set(key, gammas);
          let at = 0;
          for (const i of used) {
            const lu = f.l10u[i]! + shift;
            const u = 10 ** lu;
            const w = f.vw[i]! * phiK[i]!;
            for (let q = 0; q < das.length; q++, at++) {
              const sOrder = alphaK[i]! + das[q]! + 1;
              const g = kept ? kept[at]! : upperGammaByRecurrence(sOrder, u);
              if (!lum) {
                if (gammas) gammas[at] = g;
                v[q] = v[q]! + w * g;
              } else if (g > 0)
                v[q] = v[q]! + w * f.lumScale[i]! * (sOrder * g + Math.exp(sOrder * lu * Math.LN10 - u));
            }
          }
        },
        lum ? start.lum : start.slice,
        undefined,
        true,
      );
    const count = table(false);
    const lum = withLum ? table(true) : undefined;
    if (!count || (withLum && !lum)) return undefined;
    out.count.push(count[0]);
    out.lum.push(lum?.[0]);
  }
  return out;
}

/** Scratch of sliceFromTables: e^(the series) of a component's count, detected and total luminosity. */
const seriesValues = new Float64Array(3);

/** Count (and luminosities) of one slice under one draw from its tables (as sliceUnderDraw does exactly). */
function sliceFromTables(
  f: SliceNodes,
  tb: SliceTables,
  o: ModelOffsets,
  lumFactor: number,
  withLum: boolean,
  withTotal: boolean,
  out: Float64Array,
): void {
  const nc = f.phi.length;
  let count = 0;
  let detected = 0;
  let total = 0;
  let hasTotal = withTotal;
  for (let k = 0; k < nc; k++) {
    const phiScale = o.log10PhiStar[k] ? 10 ** o.log10PhiStar[k]! : 1;
    const dAlpha = o.alpha[k]!;
    const c0 = tb.count[k];
    const c1 = tb.lum[k];
    const ct = withLum && hasTotal && tb.total ? tb.total[k] : undefined;
    // the series first, by one loop (V8 compiled a copy of chebyshevAt for each series written out)
    const v = seriesValues;
    const series = !withLum ? 1 : hasTotal && tb.total ? 3 : 2;
    for (let m = 0; m < series; m++) {
      const c = m === 0 ? c0 : m === 1 ? c1 : ct;
      v[m] = c ? Math.exp(chebyshevAt(c, m === 2 ? dAlpha : o.characteristic, m === 2 ? 0 : dAlpha)) : 0;
    }
    if (c0) count += phiScale * v[0]!;
    if (!withLum) continue;
    if (c1) detected += phiScale * lumFactor * v[1]!;
    if (!hasTotal) continue;
    // every source's luminosity: its series, or the closed form at each node as the exact path
    if (tb.total) {
      if (ct) total += phiScale * lumFactor * v[2]!;
      continue;
    }
    const alphaK = f.alpha[k]!;
    let lastAlpha = NaN;
    let lastGamma = 0;
    for (let i = 0; i < f.count && hasTotal; i++) {
      const order = alphaK[i]! + dAlpha + 2;
      if (!(order > 0)) hasTotal = false;
      else {
        if (order !== lastAlpha) {
          lastAlpha = order;
          lastGamma = gammaFn(order);
        }
        total += f.allPhi[k]![i]! * phiScale * f.vw[i]! * f.lumScale[i]! * lumFactor * lastGamma;
      }
    }
  }
  setDrawResult(out, count, detected, total, hasTotal);
}

/**
 * Every slice of one population under each draw's offsets. `slices` are the plain prediction's
 * (counted with the engine's `drawNodes` option); `luminosity` also gives the luminosity per draw;
 * `histogramDraws` (0: none) the histograms of the first draws. A draw without offsets is the
 * plain prediction itself.
 */
export function populationDraws(
  survey: Survey,
  population: Population,
  cosmo: FlatCosmology,
  slices: readonly SliceCount[],
  offsets: readonly ModelOffsets[],
  options: {
    luminosity: boolean;
    histogramDraws: number;
    exact?: boolean;
    /** Level-1 series may be moved from those made at another limit (an explore page's limit control). */
    moveAcrossLimits?: boolean;
  },
): PopulationDraws {
  const s = settingOf(survey, population, cosmo);
  const n = offsets.length;
  const counts = slices.map(() => new Float64Array(n));
  const detected = options.luminosity ? slices.map(() => new Float64Array(n)) : undefined;
  let total: Float64Array[] | undefined = options.luminosity ? slices.map(() => new Float64Array(n)) : undefined;
  const lumFactors = offsets.map((o) =>
    population.variable === 'luminosity' ? 10 ** o.characteristic : 10 ** (-0.4 * o.characteristic),
  );
  const first = s.completeness ? TABLE_POINTS : HARD_TABLE_POINTS;
  const start: TableStart = { node: [...first], slice: [...first], lum: [...first] };
  const zero = Uint8Array.from(offsets, (o) => (isZero(o) ? 1 : 0));
  const flat = slices.map((sl) => flatten(sl.drawNodes ?? []));
  // (the luminosity of all sources is given only where every draw of every slice has one: where
  // some has none, none is computed)
  if (total && !totalsDefined(slices, flat, offsets, zero)) total = undefined;
  const tabulate = !options.exact && n >= TABLE_MIN_DRAWS;
  const moveAcrossLimits = options.moveAcrossLimits === true;
  const ranges = flat.map((f) =>
    tabulate && s.completeness && f.count > 0 ? sliceRange(f, s.observer.slope) : undefined,
  );
  // one level 1 for the population (an explore page, which may move level 1 to another limit,
  // keeps one per slice instead: a change of the window's end then leaves the other slices' level
  // 1 and 2 as they were, and their series are read again)
  const union = moveAcrossLimits ? undefined : populationRange(ranges);
  const shared = union && {
    range: union,
    series: levelOne(
      s,
      union,
      flat.find((f) => f.count > 0)!.phi.length,
      offsets,
      detected !== undefined,
      start,
      false,
    ),
  };
  for (let j = 0; j < slices.length; j++) {
    const sl = slices[j]!;
    const f = flat[j]!;
    const tables =
      tabulate && f.count > 0
        ? s.completeness
          ? sliceTables(f, s, offsets, detected !== undefined, start, moveAcrossLimits, ranges[j], shared)
          : hardTables(f, s, offsets, detected !== undefined, start)
        : undefined;
    if (tables && total) tables.total = totalTables(f, offsets);
    if (f.count > 0) drawPaths[tables ? 'tabulated' : 'exact']++;
    const totalDefined = sliceDraws(sl, f, s, tables, offsets, zero, lumFactors, counts[j]!, detected?.[j], total?.[j]);
    if (!totalDefined) total = undefined;
  }
  const out: PopulationDraws = { draws: n, counts };
  if (detected) out.luminosity = total ? { detected, total } : { detected };
  if (options.histogramDraws > 0)
    out.histograms = histogramDraws(
      survey,
      s,
      slices,
      offsets.slice(0, options.histogramDraws),
      lumFactors,
      options.exact === true,
    );
  return out;
}

/**
 * One slice under every draw: counts[i] (and detected[i], total[i] where asked for); false where
 * some draw's total luminosity is undefined.
 */
function sliceDraws(
  sl: SliceCount,
  f: SliceNodes,
  s: Setting,
  tables: SliceTables | undefined,
  offsets: readonly ModelOffsets[],
  zero: Uint8Array,
  lumFactors: readonly number[],
  counts: Float64Array,
  detected: Float64Array | undefined,
  total: Float64Array | undefined,
): boolean {
  const res = new Float64Array(4);
  const withLum = detected !== undefined;
  const withTotal = total !== undefined;
  let totalDefined = true;
  for (let i = 0; i < offsets.length; i++) {
    const o = offsets[i]!;
    if (zero[i] || f.count === 0) {
      const t = sl.luminosity?.total;
      setDrawResult(res, sl.count, sl.luminosity?.detected ?? 0, t ?? 0, t !== undefined);
    } else if (tables) {
      sliceFromTables(f, tables, o, lumFactors[i]!, withLum, withTotal, res);
    } else {
      sliceUnderDraw(f, s, o, lumFactors[i]!, withLum, withTotal, res);
    }
    counts[i] = res[DRAW_COUNT]!;
    if (detected) {
      detected[i] = res[DRAW_DETECTED]!;
      if (!res[DRAW_HAS_TOTAL]) totalDefined = false;
      else if (total) total[i] = res[DRAW_TOTAL]!;
    }
  }
  return totalDefined;
}

/**
 * Whether every draw of every slice has a luminosity of all sources: the plain prediction's where a
 * draw has no offsets or a slice no nodes, else alpha + d_alpha > -2 at every node and component
 * (the condition of every path: the closed form's Gamma(alpha + d_alpha + 2), componentsTotalLuminosity,
 * totalTables; checked at each component's least alpha and least d_alpha of a draw with offsets,
 * since rounding keeps the order of sums).
 */
function totalsDefined(
  slices: readonly SliceCount[],
  flat: readonly SliceNodes[],
  offsets: readonly ModelOffsets[],
  zero: Uint8Array,
): boolean {
  const nc = flat.find((f) => f.count > 0)?.phi.length ?? 0;
  const daLeast = new Float64Array(nc).fill(Infinity);
  let plainDraws = false;
  let moved = false;
  for (let i = 0; i < offsets.length; i++) {
    if (zero[i]) {
      plainDraws = true;
      continue;
    }
    moved = true;
    const da = offsets[i]!.alpha;
    for (let k = 0; k < nc; k++) daLeast[k] = Math.min(daLeast[k]!, da[k]!);
  }
  for (let j = 0; j < slices.length; j++) {
    const f = flat[j]!;
    const plainTotal = slices[j]!.luminosity?.total !== undefined;
    if (offsets.length > 0 && (plainDraws || f.count === 0) && !plainTotal) return false;
    if (f.count === 0 || !moved) continue;
    for (let k = 0; k < nc; k++) {
      let least = Infinity;
      for (let i = 0; i < f.count; i++) least = Math.min(least, f.alpha[k]![i]!);
      if (!(least + daLeast[k]! > -2)) return false;
    }
  }
  return true;
}

/**
 * Slices whose draws' histograms came from a table and from the exact path, and draws of a
 * tabulated slice that took the exact path (their bins beyond the table's reach), since the start
 * (for tests and benchmarks).
 */
export const histogramPaths = { tabulated: 0, exact: 0, exactDraws: 0 };

/** Draws from which the histograms are tabulated (model-draws-histograms.ts; a table costs about two exact histograms). */
export const HISTOGRAM_TABLE_MIN_DRAWS = 8;

/**
 * Each slice's histogram under the first draws, on the plain histogram's bins (a draw's bins
 * beyond them are left out): from a table per slice (histogramTable) from HISTOGRAM_TABLE_MIN_DRAWS
 * draws on where the limit sits at one obs, else by the engine's histogramCount per draw.
 */
function histogramDraws(
  survey: Survey,
  s: Setting,
  slices: readonly SliceCount[],
  offsets: readonly ModelOffsets[],
  lumFactors: number[],
  exact: boolean,
): { draws: number; bins: Float64Array[] }[] {
  const width = survey.histogramWidth;
  const slope = s.observer.slope;
  const zero = Uint8Array.from(offsets, (o) => (isZero(o) ? 1 : 0));
  const start: HistogramTableStart = [];
  const moved = offsets.filter((_, i) => !zero[i]);
  return slices.map((sl) => {
    const plain = sl.histogram;
    const nb = plain.counts.length;
    const bins = Array.from({ length: nb }, () => new Float64Array(offsets.length));
    const nodes = sl.drawNodes ?? [];
    if (nb === 0 || nodes.length === 0) return { draws: offsets.length, bins };
    const k0 = Math.round(plain.edges[0]! / width);
    const table =
      !exact && offsets.length >= HISTOGRAM_TABLE_MIN_DRAWS
        ? histogramTable(
            flatten(nodes),
            { slope, width, completeness: s.completeness, breaks: s.breaks },
            plain,
            moved,
            start,
          )
        : undefined;
    histogramPaths[table ? 'tabulated' : 'exact']++;
    const one = new Float64Array(nb);
    for (let i = 0; i < offsets.length; i++) {
      const o = offsets[i]!;
      if (zero[i]) {
        for (let b = 0; b < nb; b++) bins[b]![i] = plain.counts[b]!;
        continue;
      }
      if (table && histogramFromTable(table, o, one)) {
        for (let b = 0; b < nb; b++) bins[b]![i] = one[b]!;
        continue;
      }
      if (table) histogramPaths.exactDraws++;
      exactHistogram(survey, s, nodes, o, lumFactors[i]!, k0, bins, i);
    }
    return { draws: offsets.length, bins };
  });
}

/** One draw's histogram by the engine (histogramCount of the moved nodes), into bins[b][i] on the plain histogram's bins from grid index k0. */
function exactHistogram(
  survey: Survey,
  s: Setting,
  nodes: readonly NodeState[],
  o: ModelOffsets,
  lumFactor: number,
  k0: number,
  bins: Float64Array[],
  i: number,
): void {
  const width = survey.histogramWidth;
  const moved = nodes.map((nd) => shifted(nd, o, s.observer.slope, lumFactor));
  const h = histogramCount(moved, s.observer, width, s.completeness, s.breaks, false, s.rules, survey.file).histogram;
  const off = Math.round(h.edges[0]! / width) - k0;
  h.counts.forEach((c, b) => {
    const at = off + b;
    if (at >= 0 && at < bins.length) bins[at]![i] = c;
  });
}

/** Type-7 percentiles (linear between order statistics) of the values, at the given probabilities. */
export function percentilesOf(values: ArrayLike<number>, ps: readonly number[] = PERCENTILES): number[] {
  const sorted = Float64Array.from(values).sort();
  const n = sorted.length;
  return ps.map((p) => {
    const h = (n - 1) * p;
    const lo = Math.floor(h);
    const hi = Math.min(lo + 1, n - 1);
    return sorted[lo]! + (h - lo) * (sorted[hi]! - sorted[lo]!);
  });
}
