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
 * completeness quadrature's rules in obs, whose completeness values are kept with the curve).
 *
 * Draws: from a multivariate normal, d = L xi with L the Cholesky factor of the covariance and xi
 * standard normal from a Mersenne Twister stream (Matsumoto & Nishimura 1998;
 * @stdlib/random-base-mt19937) seeded with [seed, population index] (init_by_array), xi drawn
 * parameter by parameter in the order the file lists them, draw after draw; or every row of a
 * draws file once. Percentiles interpolate linearly between order statistics (Hyndman & Fan 1996,
 * type 7, numpy's default).
 */
import mt19937 from '@stdlib/random-base-mt19937';
import normalRng from '@stdlib/random-base-normal';
import type { FlatCosmology } from '../cosmology/flat-cosmology.js';
import type { Population } from '../model/population.js';
import type { Survey } from '../model/survey.js';
import { modelOffsets, type ModelOffsets, type ModelUncertainty } from '../model/model-uncertainty.js';
import { gammaFn, upperGamma } from '../numerics/gamma.js';
import { makeObserver, type Observer } from '../selection/observe.js';
import { completenessBreaks, completenessFunction, type CompletenessFn } from '../selection/completeness.js';
import { completenessQuadrature, type CompletenessQuadrature } from './completeness-quadrature.js';
import { componentsTotalLuminosity } from '../population/schechter.js';
import { histogramCount, type NodeState, type SliceCount } from './engine.js';

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

/** The offsets of every draw of one population (index `stream` among the survey's populations). */
export function drawModelOffsets(
  mu: ModelUncertainty,
  components: number,
  draws: number,
  seed: number,
  stream: number,
): ModelOffsets[] {
  if (mu.kind === 'draws') return mu.offsets.map((row) => modelOffsets(mu.parameters, row, components));
  // The factory's generator carries .normalized (uniform on [0, 1), 53 bits) at run time.
  const rng = mt19937.factory({ seed: new Uint32Array([seed >>> 0, stream >>> 0]) }) as unknown as {
    normalized: () => number;
  };
  const gauss = normalRng.factory(0, 1, { prng: rng.normalized });
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
  if (!spec) return { observer, width };
  const completeness = completenessFunction(spec, survey.detection.kind, population.variable);
  const breaks = completenessBreaks(spec, survey.detection.kind);
  const rules = completenessQuadrature(
    spec,
    `${survey.detection.kind} ${population.variable}`,
    observer.slope,
    completeness,
    breaks,
  );
  return { observer, width, completeness, breaks, rules };
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
    components: nd.components.map((c, k) => ({
      phiStar: o.log10PhiStar[k] ? c.phiStar * 10 ** o.log10PhiStar[k] : c.phiStar,
      alpha: c.alpha + o.alpha[k]!,
    })),
    allComponents: nd.allComponents.map((c, k) => ({
      phiStar: o.log10PhiStar[k] ? c.phiStar * 10 ** o.log10PhiStar[k] : c.phiStar,
      alpha: c.alpha + o.alpha[k]!,
    })),
    lumScale: nd.lumScale * lumFactor,
  };
}

/**
 * integral over u above the limit of sum_c phi*_c u^(alpha_c + power) e^-u c(obs(u)) du at a node
 * (power 0: number density; 1: luminosity density in units of L*): closed forms where the
 * completeness is constant, the completeness quadrature's rules where it varies.
 */
function nodeIntegral(nd: NodeState, s: Setting, power: 0 | 1): number {
  const closed = (p: number, q: number): number => {
    let j = 0;
    for (const c of nd.components) {
      const order = c.alpha + 1 + power;
      j += c.phiStar * (upperGamma(order, 10 ** p) - (q === Infinity ? 0 : upperGamma(order, 10 ** q)));
    }
    return j;
  };
  const l10uLim = nd.log10ULimit;
  if (!s.completeness || !s.breaks) return closed(l10uLim, Infinity);
  const slope = s.observer.slope;
  const [vLo, vHi] = s.breaks.varying;
  const b1 = (vLo - nd.a) / slope;
  const b2 = (vHi - nd.a) / slope;
  const lo = Math.min(b1, b2);
  const hi = Math.max(b1, b2);
  const obsLo = slope > 0 ? vLo : vHi;
  const obsHi = slope > 0 ? vHi : vLo;
  const cuts = [l10uLim];
  if (lo > l10uLim) cuts.push(lo);
  if (hi > l10uLim) cuts.push(hi);
  cuts.push(Infinity);
  let j = 0;
  for (let i = 0; i + 1 < cuts.length; i++) {
    const p = cuts[i]!;
    const q = cuts[i + 1]!;
    if (!(q > p)) continue;
    if (!(p >= lo && q <= hi)) {
      const probe = q === Infinity ? p + 1 : 0.5 * (p + q);
      const c = s.completeness(nd.a + slope * probe);
      if (c > 0) j += c * closed(p, q);
    } else {
      // beyond u = 800 the Schechter factor is below e^-800: nothing to integrate there
      const qq = Math.min(q, L10_U_NEGLIGIBLE);
      if (!(qq > p)) continue;
      const oA = p === l10uLim ? nd.obsLimit : obsLo;
      // (the cut moved out to the histogram grid, so that every draw meets the same few ranges and reuses their rules)
      const cut = nd.a + slope * qq;
      const oB = qq < q ? (slope > 0 ? Math.ceil(cut / s.width) : Math.floor(cut / s.width)) * s.width : obsHi;
      // in pieces on the grid of the histogram's width, as the engine integrates (rules sized per piece)
      const e1 = Math.min(oA, oB);
      const e2 = Math.max(oA, oB);
      let from = e1;
      for (let k = Math.floor(e1 / s.width) + 1; k * s.width < e2; k++) {
        j += s.rules!.integrate(from, k * s.width, power);
        from = k * s.width;
      }
      j += s.rules!.integrate(from, e2, power);
    }
  }
  return j;
}

/** A slice's nodes as flat arrays (the quantities a draw does not change), and scratch nodes for the completeness path. */
interface SliceNodes {
  count: number;
  vw: Float64Array;
  l10u: Float64Array;
  a: Float64Array;
  lumScale: Float64Array;
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
    phi: Array.from({ length: comps }, (_, c) => Float64Array.from(kept, (nd) => nd.components[c]!.phiStar)),
    allPhi: Array.from({ length: comps }, (_, c) => Float64Array.from(kept, (nd) => nd.allComponents[c]!.phiStar)),
    alpha: Array.from({ length: comps }, (_, c) => Float64Array.from(kept, (nd) => nd.components[c]!.alpha)),
    scratch: kept.map((nd) => ({
      ...nd,
      components: nd.components.map((c) => ({ ...c })),
      allComponents: nd.allComponents.map((c) => ({ ...c })),
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
  out: { count: number; detected: number; total: number | undefined },
): void {
  const slope = s.observer.slope;
  const shift = -o.characteristic / slope;
  const nc = f.phi.length;
  let count = 0;
  let detected = 0;
  let total: number | undefined = 0;
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
        if (total !== undefined) {
          if (!(sOrder > -1)) total = undefined;
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
      const jt = componentsTotalLuminosity(nd.allComponents);
      total = jt === undefined || total === undefined ? undefined : total + nd.volumeWeight * nd.lumScale * jt;
    }
  }
  out.count = count;
  out.detected = detected;
  out.total = total;
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
  options: { luminosity: boolean; histogramDraws: number },
): PopulationDraws {
  const s = settingOf(survey, population, cosmo);
  const n = offsets.length;
  const counts = slices.map(() => new Float64Array(n));
  const detected = options.luminosity ? slices.map(() => new Float64Array(n)) : undefined;
  let total: Float64Array[] | undefined = options.luminosity ? slices.map(() => new Float64Array(n)) : undefined;
  const lumFactors = offsets.map((o) =>
    population.variable === 'luminosity' ? 10 ** o.characteristic : 10 ** (-0.4 * o.characteristic),
  );
  const res = { count: 0, detected: 0, total: 0 as number | undefined };
  slices.forEach((sl, j) => {
    const f = flatten(sl.drawNodes ?? []);
    for (let i = 0; i < n; i++) {
      const o = offsets[i]!;
      if (isZero(o) || f.count === 0) {
        res.count = sl.count;
        res.detected = sl.luminosity?.detected ?? 0;
        res.total = sl.luminosity?.total;
      } else {
        sliceUnderDraw(f, s, o, lumFactors[i]!, detected !== undefined, res);
      }
      counts[j]![i] = res.count;
      if (detected) {
        detected[j]![i] = res.detected;
        if (res.total === undefined) total = undefined;
        else if (total) total[j]![i] = res.total;
      }
    }
  });
  const out: PopulationDraws = { draws: n, counts };
  if (detected) out.luminosity = total ? { detected, total } : { detected };
  if (options.histogramDraws > 0)
    out.histograms = histogramDraws(survey, s, slices, offsets.slice(0, options.histogramDraws), lumFactors);
  return out;
}

/** Each slice's histogram under the first draws, on the plain histogram's bins (a draw's bins beyond them are left out). */
function histogramDraws(
  survey: Survey,
  s: Setting,
  slices: readonly SliceCount[],
  offsets: readonly ModelOffsets[],
  lumFactors: number[],
): { draws: number; bins: Float64Array[] }[] {
  const width = survey.histogramWidth;
  const slope = s.observer.slope;
  return slices.map((sl) => {
    const plain = sl.histogram;
    const nb = plain.counts.length;
    const bins = Array.from({ length: nb }, () => new Float64Array(offsets.length));
    const nodes = sl.drawNodes ?? [];
    if (nb === 0 || nodes.length === 0) return { draws: offsets.length, bins };
    const k0 = Math.round(plain.edges[0]! / width);
    offsets.forEach((o, i) => {
      if (isZero(o)) {
        plain.counts.forEach((c, b) => (bins[b]![i] = c));
        return;
      }
      const moved = nodes.map((nd) => shifted(nd, o, slope, lumFactors[i]!));
      const h = histogramCount(
        moved,
        s.observer,
        width,
        s.completeness,
        s.breaks,
        false,
        s.rules,
        survey.file,
      ).histogram;
      const off = Math.round(h.edges[0]! / width) - k0;
      h.counts.forEach((c, b) => {
        const at = off + b;
        if (at >= 0 && at < nb) bins[at]![i] = c;
      });
    });
    return { draws: offsets.length, bins };
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
