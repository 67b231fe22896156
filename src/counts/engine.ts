/**
 * The count engine. For one population and one redshift slice [z1, z2]:
 *
 *   N = area_sr * integral_{z1}^{z2} dV_C/dz/dOmega(z) n(z) dz,
 *   n(z) = integral over the population variable above the limit of phi(x, z) c(x, z) dx
 *
 * (docs/survey-file.md, "Detection kinds and their limits"). Without completeness n(z) is a sum of upper incomplete gamma
 * functions; where the completeness varies the inner integral is done by Gauss-Legendre panels in
 * the observed value (src/counts/completeness-quadrature.ts), with rules shared by every node.
 * The outer integral is Gauss-Legendre in z (with z = z1 + dz t^4 near z = 0, where a flux limit
 * makes the integrand behave like z^(2 alpha + 4)).
 *
 * Histograms: per slice, bins of the observed value (apparent magnitude, log10 measured line flux,
 * log10 quantity or absolute magnitude) on multiples of the bin width; the brightest bin also holds
 * the (negligible, e^-40 relative) tail brighter than its edge, so the counts of a slice sum to its count.
 */
import type { FlatCosmology } from '../cosmology/flat-cosmology.js';
import type { Population } from '../model/population.js';
import { isTableSource } from '../model/zparam.js';
import type { Survey } from '../model/survey.js';
import { gaussLegendreRule, keptBreaks, panelNodes, type PanelNodes } from '../numerics/quadrature.js';
import { upperGamma } from '../numerics/gamma.js';
import { bisectCrossing } from '../numerics/roots.js';
import { makeObserver, type HistogramVariable, type Observation, type Observer } from '../selection/observe.js';
import { selectionEffects } from '../selection/effects.js';
import { completenessBreaks, completenessFunction, type CompletenessFn } from '../selection/completeness.js';
import { completenessQuadrature, type CompletenessQuadrature } from './completeness-quadrature.js';
import { luminosityScale, populationAt, type ParameterOffsets, type PopulationAtZ } from '../population/model.js';
import { ComponentAtZ, componentsMap, componentsTotalLuminosity } from '../population/schechter.js';
import { inputError } from '../errors.js';
import { LYMAN_LIMIT_ANGSTROM, MADAU1995_LINES } from '../selection/igm.js';
import { bandSupport, tableRange } from '../selection/filter.js';
import { CAPS } from '../model/limits.js';

/**
 * Work done where the completeness varies, summed over every call since the last reset: the
 * completeness evaluations and the evaluations of the Schechter factor (one exponential per
 * component each) of the quadrature in obs. For benchmarks (test/bench/predict.bench.ts).
 */
export const completenessWork = { completenessEvaluations: 0, densityEvaluations: 0 };

/** u = L/L* beyond which the population is negligible (exp(-40) ~ 4e-18). */
export const U_BRIGHT_SPAN = 40;
const LN10 = Math.LN10;

export interface Histogram {
  variable: HistogramVariable;
  edges: number[];
  counts: number[];
}

export interface SliceCount {
  zMin: number;
  zMax: number;
  volumeMpc3: number;
  count: number;
  /** log10 L_lim, M_lim or the threshold at the slice's middle; Infinity where no line is seen there. */
  limitAtCenter: number;
  histogram: Histogram;
  /**
   * Luminosity in the slice (area * integral dV j(z)), in the luminosity-density unit times Mpc^3
   * (src/population/model.ts luminosityScale): of the detected sources (completeness-weighted) and,
   * when every component has alpha > -2 at every node, of all sources. Absent with noHistogram.
   */
  luminosity?: { detected: number; total?: number };
  /** With the profile option: where in redshift the slice's detected sources lie (its quadrature nodes). */
  profile?: RedshiftProfile;
  /** With the drawNodes option: the slice's redshift nodes as counted (src/counts/model-draws.ts redoes them under offsets). */
  drawNodes?: NodeState[];
  /** With the nodeDetail option: what each node adds. */
  nodes?: NodeDetail;
  /**
   * Present when the redshift quadrature did not converge even after halving its pieces
   * (chooseRedshiftNodes' `unconverged`): by how much its last two orders differed there, as a
   * share of the slice's integral (unconvergedShare), and near which redshift.
   */
  quadratureMissed?: { share: number; z: number };
}

/**
 * The detected sources of a slice node by node: the redshift quadrature nodes (ascending), the
 * expected count each carries (they sum to the slice's count) and the comoving volume each
 * carries (area times dV/dz times the node's weight), so that count / volume is the density of
 * detected sources at that redshift. Empty for a slice outside the population's window.
 */
export interface RedshiftProfile {
  z: number[];
  count: number[];
  volumeMpc3: number[];
  /**
   * The fraction of the sources at each node's redshift that the slice holds (photometric
   * redshifts: the probability of being measured in it); count / (selected volume) is then the
   * density of all of them. Absent: 1.
   */
  selected?: number[];
}

export interface EngineOptions {
  offsets?: ParameterOffsets;
  /** Skip the histograms (faster; used by forecasts and plans). */
  noHistogram?: boolean;
  /** Also return each slice's redshift profile (the total's cosmic variance weights by it). */
  profile?: boolean;
  /** Also return each slice's redshift nodes (the model's draws reuse them). */
  drawNodes?: boolean;
  /**
   * Also return what each redshift node adds to the slice (`nodes`): photometric redshifts weight
   * the nodes of true redshift by the probability of being measured in each slice (src/counts/photo-z.ts).
   */
  nodeDetail?: boolean;
}

/** What each redshift node of a slice adds to its results (EngineOptions.nodeDetail). */
export interface NodeDetail {
  z: number[];
  /** The node's comoving volume (area times dV/dz times its weight), Mpc^3. */
  volumeMpc3: number[];
  /** Its count (the sum of its row of bins). */
  count: number[];
  /** bins[k][b]: what node k adds to bin b of the slice's histogram. */
  bins: number[][];
  /** Its detected luminosity and (undefined when it diverges) its total luminosity, as SliceCount.luminosity. */
  detected: number[];
  total?: number[];
}

/**
 * With a flux or magnitude limit, the luminosity limit falls as D_L^2 ~ z^2 towards z = 0, so the
 * number density above it grows as z^(2 (alpha + 1)) and the count integrand behaves like
 * z^2 z^(2 (alpha + 1)) = z^(2 alpha + 4): the count from z = 0 diverges when alpha <= -2.5
 * (common practice; follows from the definitions in docs/survey-file.md, "A count that diverges"). Refuse it with one sentence.
 */
export function assertConvergent(survey: Survey, population: Population, edges: readonly number[]): void {
  if (survey.detection.kind === 'threshold') return;
  const z0 = Math.max(edges[0]!, population.window.min);
  if (z0 > 0) return;
  const steepest = Math.min(...population.components.map((c) => c.alpha.at(0)));
  if (steepest <= -2.5) {
    throw inputError(
      'divergent',
      survey.file,
      'redshift.min',
      `the expected count of ${population.name} diverges at z = 0, where a ${survey.detection.kind === 'line_flux' ? 'flux' : 'magnitude'} limit reaches ever fainter luminosities and alpha = ${steepest} is at or below -2.5`,
      'start the redshift window above 0 or assume a flatter faint end',
    );
  }
}

/**
 * Redshift quadrature for [z1, z2]: nodes and weights (weights include dz). `n` defaults to a
 * number that grows with the slice width; `chooseRedshiftNodes` picks it by convergence.
 */
export function redshiftNodes(z1: number, z2: number, n = defaultNodeCount(z1, z2)): { z: number[]; w: number[] } {
  const dz = z2 - z1;
  const rule = gaussLegendreRule(n);
  const z: number[] = [];
  const w: number[] = [];
  const nearZero = z1 < 1e-3;
  for (let i = 0; i < n; i++) {
    const t = 0.5 * (rule.nodes[i]! + 1); // (0, 1)
    const wt = 0.5 * rule.weights[i]!;
    if (nearZero) {
      // z = z1 + dz t^4, dz/dt = 4 dz t^3: tames z^(2 alpha + 4) at z -> 0.
      z.push(z1 + dz * t ** 4);
      w.push(wt * 4 * dz * t ** 3);
    } else {
      z.push(z1 + dz * t);
      w.push(wt * dz);
    }
  }
  return { z, w };
}

function defaultNodeCount(z1: number, z2: number): number {
  return Math.min(96, Math.max(8, Math.ceil((12 * (z2 - z1)) / 0.2)));
}

/**
 * A piece of a redshift quadrature that did not converge: its last two orders (the largest and half
 * of it) still differed by `difference` (in the integrand's unit) after the piece it came from was
 * halved as often as `chooseRedshiftNodes` allows.
 */
export interface UnconvergedPiece {
  z1: number;
  z2: number;
  difference: number;
  /** The same for the weighted integrand `g`, when there is one. */
  differenceG?: number;
}

/** Redshift nodes and weights, with the pieces whose integral did not converge (absent when every piece did). */
export interface RedshiftRule {
  z: number[];
  w: number[];
  unconverged?: UnconvergedPiece[];
}

/** Most halvings of one piece whose largest order has not converged (chooseRedshiftNodes). */
export const MAX_HALVINGS = 24;

/**
 * Share of a slice's count by which the unconverged pieces of its redshift quadrature may differ
 * (their last two orders) before the outputs say so: a tenth of the 1e-6 the counts promise.
 */
export const UNCONVERGED_SHARE = 1e-7;

/**
 * Where a redshift rule did not converge: by how much the unconverged pieces' last two orders
 * differ, relative to the whole integral of `f` (or of `g`, where that share is larger), and the
 * middle of the piece that differs most. Undefined when every piece converged.
 */
export function unconvergedShare(
  rule: RedshiftRule,
  f: (z: number) => number,
  g?: (z: number) => number,
): { share: number; z: number } | undefined {
  const pieces = rule.unconverged;
  if (!pieces) return undefined;
  let dF = 0;
  let dG = 0;
  let worst = pieces[0]!;
  for (const u of pieces) {
    dF += u.difference;
    dG += u.differenceG ?? 0;
    if (u.difference > worst.difference) worst = u;
  }
  const whole = Math.abs(sumOver(rule, f));
  const wholeG = g ? Math.abs(sumOver(rule, g)) : 0;
  // (an integral that is 0 on the rule's nodes but not on the order before: all of it in doubt)
  const share = Math.max(whole > 0 ? dF / whole : dF > 0 ? 1 : 0, wholeG > 0 ? dG / wholeG : dG > 0 ? 1 : 0);
  return { share, z: 0.5 * (worst.z1 + worst.z2) };
}

/**
 * The smallest Gauss-Legendre order (8, 16, 32, 64, 128 or 256, at least the default for the
 * width) whose integral of `f` agrees with the next order to `rel` (or `abs`). The hard-limit count
 * integrand is cheap, and its variation in z (volume, distance, filter transmission) is what the
 * full computation sees too. With `g` (the count weighted by something the integrand does not
 * hold, such as a bias given as an expression with a narrow feature), its integral must agree too
 * (to `rel` or `gAbs`).
 *
 * Where the largest order (256 nodes from a start of 8, 480 from 60: the orders double from the
 * start) still does not agree with the one before (a kink or a feature no cut marks), the piece is
 * halved and each half chosen again (depth first, each half with half the absolute tolerance), at
 * most MAX_HALVINGS times in all; a piece still unconverged then is returned with its largest
 * order and listed in `unconverged`, for the caller to say so. Before, that order was returned
 * silently: a forecast's grid stepping over a spike between a phi* table's rows 0.001 apart (which
 * it does not cut at) was 2.7e-3 low in that slice.
 */
export function chooseRedshiftNodes(
  z1: number,
  z2: number,
  f: (z: number) => number,
  rel = 1e-8,
  nStart = defaultNodeCount(z1, z2),
  abs = 0,
  g?: (z: number) => number,
  gAbs = 0,
): RedshiftRule {
  const budget = { halvings: MAX_HALVINGS };
  return chooseNodesWithin(z1, z2, f, rel, nStart, abs, g, gAbs, budget);
}

function chooseNodesWithin(
  z1: number,
  z2: number,
  f: (z: number) => number,
  rel: number,
  nStart: number,
  abs: number,
  g: ((z: number) => number) | undefined,
  gAbs: number,
  budget: { halvings: number },
): RedshiftRule {
  let n = nStart;
  let prev = redshiftNodes(z1, z2, n);
  let prevSum = sumOver(prev, f);
  let prevG = g ? sumOver(prev, g) : 0;
  let difference = 0;
  let differenceG = 0;
  while (n < 256) {
    const next = redshiftNodes(z1, z2, 2 * n);
    const nextSum = sumOver(next, f);
    difference = Math.abs(nextSum - prevSum);
    let agree = difference <= Math.max(rel * Math.abs(nextSum), abs);
    let nextG = 0;
    if (g) {
      nextG = sumOver(next, g);
      differenceG = Math.abs(nextG - prevG);
      agree &&= differenceG <= Math.max(rel * Math.abs(nextG), gAbs);
    }
    if (agree) return prev;
    n *= 2;
    prev = next;
    prevSum = nextSum;
    prevG = nextG;
  }
  if (budget.halvings <= 0 || !(z2 - z1 > 1e-9 * Math.max(1, Math.abs(z2))))
    return { ...prev, unconverged: [g ? { z1, z2, difference, differenceG } : { z1, z2, difference }] };
  budget.halvings--;
  const mid = 0.5 * (z1 + z2);
  const left = chooseNodesWithin(z1, mid, f, rel, nStart, 0.5 * abs, g, 0.5 * gAbs, budget);
  const right = chooseNodesWithin(mid, z2, f, rel, nStart, 0.5 * abs, g, 0.5 * gAbs, budget);
  const out: RedshiftRule = { z: [...left.z, ...right.z], w: [...left.w, ...right.w] };
  const missed = [...(left.unconverged ?? []), ...(right.unconverged ?? [])];
  if (missed.length > 0) out.unconverged = missed;
  return out;
}

/**
 * Gauss-Legendre nodes over [cuts[0], cuts[last]], each piece between consecutive cuts chosen by
 * convergence of `f` (one piece: exactly chooseRedshiftNodes). With several pieces, each converges
 * to 1e-8 of its own integral or 1e-9 of the whole (a piece holding almost nothing need not converge
 * alone), starting from nStart nodes (2; 8 where the cuts follow a completeness curve, whose effect
 * `f`, the count without completeness, does not show). With `g`, its integral converges likewise.
 */
export function piecewiseRedshiftNodes(
  cuts: readonly number[],
  f: (z: number) => number,
  nStart = 2,
  g?: (z: number) => number,
): RedshiftRule {
  if (cuts.length === 2) return chooseRedshiftNodes(cuts[0]!, cuts[1]!, f, 1e-8, undefined, 0, g);
  let estimate = 0;
  let estimateG = 0;
  for (let k = 0; k + 1 < cuts.length; k++) {
    const eight = redshiftNodes(cuts[k]!, cuts[k + 1]!, 8);
    estimate += sumOver(eight, f);
    if (g) estimateG += sumOver(eight, g);
  }
  const abs = 1e-9 * Math.abs(estimate);
  const gAbs = 1e-9 * Math.abs(estimateG);
  const z: number[] = [];
  const w: number[] = [];
  let unconverged: UnconvergedPiece[] | undefined;
  for (let k = 0; k + 1 < cuts.length; k++) {
    const piece = chooseRedshiftNodes(cuts[k]!, cuts[k + 1]!, f, 1e-8, nStart, abs, g, gAbs);
    z.push(...piece.z);
    w.push(...piece.w);
    if (piece.unconverged) (unconverged ??= []).push(...piece.unconverged);
  }
  return unconverged ? { z, w, unconverged } : { z, w };
}

function sumOver(nodes: { z: number[]; w: number[] }, f: (z: number) => number): number {
  let s = 0;
  for (let i = 0; i < nodes.z.length; i++) s += nodes.w[i]! * f(nodes.z[i]!);
  return s;
}

export interface NodeState {
  z: number;
  /** area_sr * dV/dz/dOmega * quadrature weight: Mpc^3 per unit n. */
  volumeWeight: number;
  a: number;
  log10ULimit: number;
  /** The limit in obs (the same at every node for flux and magnitude limits). */
  obsLimit: number;
  /** The components at z with phi* times the selection weight S(z) E(z) (src/selection/effects.ts): what is detected. */
  components: { phiStar: number; alpha: number }[];
  /** The components as the luminosity function gives them (all sources, before any selection). */
  allComponents: { phiStar: number; alpha: number }[];
  /** What u = 1 stands for in luminosity-density units (L*, or L*_nu for a magnitude variable). */
  lumScale: number;
}

/**
 * Count one population over the given slice edges. Slices outside the population's window count
 * zero; slices that straddle its edge are cut to it.
 */
export function countPopulation(
  survey: Survey,
  population: Population,
  cosmo: FlatCosmology,
  edges: readonly number[],
  options: EngineOptions = {},
): SliceCount[] {
  assertConvergent(survey, population, edges);
  const observer = makeObserver(survey.detection, population, cosmo);
  const completeness = survey.detection.completeness
    ? completenessFunction(survey.detection.completeness, survey.detection.kind, population.variable)
    : undefined;
  const breaks = survey.detection.completeness
    ? completenessBreaks(survey.detection.completeness, survey.detection.kind, population.variable)
    : undefined;
  const quadrature =
    completeness && breaks
      ? completenessQuadrature(
          survey.detection.completeness!,
          `${survey.detection.kind} ${population.variable}`,
          observer.slope,
          completeness,
          breaks,
        )
      : undefined;
  const width = survey.histogramWidth;
  const out: SliceCount[] = [];
  for (let s = 0; s + 1 < edges.length; s++) {
    const zMin = edges[s]!;
    const zMax = edges[s + 1]!;
    const volumeMpc3 = survey.areaSr * cosmo.comovingVolumeBetweenMpc3Sr(zMin, zMax);
    const zMid = 0.5 * (zMin + zMax);
    const lo = Math.max(zMin, population.window.min);
    const hi = Math.min(zMax, population.window.max);
    // The limit at the slice's middle redshift or, where the population's window covers only part
    // of the slice, at the middle of that part (a population's slices lie inside its window: the
    // loader cuts explicit edges at its ends); a slice outside the window (a window outside the
    // edges) takes the window's nearer end. Infinite where the filter passes none of the
    // population's lines there (the outputs write null).
    const zCenter = hi > lo ? 0.5 * (lo + hi) : Math.min(Math.max(zMid, population.window.min), population.window.max);
    const center = observer.at(zCenter, populationAt(population, zCenter, options.offsets).characteristic);
    const limitAtCenter = center.limitInVariable;
    if (!(hi > lo)) {
      const e0 = roundEdge(Math.floor(center.obsLimit / width) * width);
      const empty: SliceCount = {
        zMin,
        zMax,
        volumeMpc3,
        count: 0,
        limitAtCenter,
        histogram: { variable: observer.variable, edges: [e0, roundEdge(e0 + width)], counts: [0] },
      };
      if (!options.noHistogram) empty.luminosity = { detected: 0, total: 0 };
      if (options.profile) empty.profile = { z: [], count: [], volumeMpc3: [] };
      if (options.drawNodes) empty.drawNodes = [];
      out.push(empty);
      continue;
    }
    const missed: { at?: { share: number; z: number } } = {};
    const nodes = buildNodes(survey, population, cosmo, observer, lo, hi, options.offsets, missed);
    let result: { count: number; histogram: Histogram; detectedLuminosity?: number };
    const perNode = options.profile ? new Array<number>(nodes.length).fill(0) : undefined;
    const detail: NodeDetail | undefined = options.nodeDetail
      ? {
          z: nodes.map((nd) => nd.z),
          volumeMpc3: nodes.map((nd) => nd.volumeWeight),
          count: [],
          bins: [],
          detected: nodes.map(() => 0),
        }
      : undefined;
    if (options.noHistogram && !completeness && !detail) {
      let count = 0;
      nodes.forEach((nd, k) => {
        if (!Number.isFinite(nd.log10ULimit)) return;
        const n = schechterBetween(nd.components, nd.log10ULimit, Infinity, 0);
        count += nd.volumeWeight * n;
        if (perNode) perNode[k] = nd.volumeWeight * n;
      });
      result = { count, histogram: { variable: observer.variable, edges: [], counts: [] } };
    } else {
      result = histogramCount(
        nodes,
        observer,
        width,
        completeness,
        breaks,
        !options.noHistogram || !!detail,
        quadrature,
        survey.file,
        perNode,
        detail,
      );
    }
    if (!Number.isFinite(result.count)) {
      throw inputError(
        'not_finite',
        survey.file,
        'population',
        `the count in the slice ${zMin}-${zMax} is not a finite number`,
        'check the Schechter parameters and the limit',
      );
    }
    const slice: SliceCount = {
      zMin,
      zMax,
      volumeMpc3,
      count: result.count,
      limitAtCenter,
      histogram: result.histogram,
    };
    if (perNode)
      slice.profile = { z: nodes.map((nd) => nd.z), count: perNode, volumeMpc3: nodes.map((nd) => nd.volumeWeight) };
    if (detail) {
      detail.count = detail.bins.map((row) => row.reduce((a, v) => a + v, 0));
      slice.nodes = detail;
    }
    if (options.drawNodes) slice.drawNodes = nodes;
    if (missed.at) slice.quadratureMissed = missed.at;
    if (!options.noHistogram || detail) {
      const lum = sliceLuminosity(nodes, observer, completeness, breaks, result.detectedLuminosity, detail);
      if (!Number.isFinite(lum.detected) || (lum.total !== undefined && !Number.isFinite(lum.total))) {
        throw inputError(
          'not_finite',
          survey.file,
          'population',
          `the luminosity density in the slice ${zMin}-${zMax} is not a finite number`,
          'check the Schechter parameters and the limit',
        );
      }
      slice.luminosity = lum;
    }
    out.push(slice);
  }
  return out;
}

/**
 * A node's Schechter sum between log10 u = p and q (q = Infinity: no upper end):
 * sum_c phi*_c [Gamma(alpha_c + 1 + power, 10^p) - Gamma(alpha_c + 1 + power, 10^q)] (DLMF 8.2.2),
 * power 0 the number density, power 1 the luminosity density in units of L*. The one closed form
 * of the engine's and the model draws' (src/counts/model-draws.ts) constant-completeness pieces.
 */
export function schechterBetween(
  components: readonly { phiStar: number; alpha: number }[],
  p: number,
  q: number,
  power: 0 | 1,
): number {
  let j = 0;
  for (const c of components) {
    const s = power === 0 ? c.alpha + 1 : c.alpha + 2;
    j += c.phiStar * (upperGamma(s, 10 ** p) - (q === Infinity ? 0 : upperGamma(s, 10 ** q)));
  }
  return j;
}

/**
 * Luminosity of the detected sources and of all sources in a slice: sum over nodes of
 * volumeWeight * lumScale * sum_c phi*_c * integral_{uLim}^inf u^(alpha_c+1) e^-u c(obs(u)) du
 * (closed form phi* Gamma(alpha+2, uLim) where the completeness is constant, Gauss-Legendre panels
 * where it varies), and the total phi* Gamma(alpha+2) (only when every alpha_c > -2).
 */
function sliceLuminosity(
  nodes: NodeState[],
  observer: Observer,
  completeness: CompletenessFn | undefined,
  breaks: { points: number[]; scale: number; varying: [number, number] } | undefined,
  detectedWithCompleteness?: number,
  detail?: NodeDetail,
): { detected: number; total?: number } {
  let detected = 0;
  let total: number | undefined = 0;
  if (detail) detail.total = [];
  nodes.forEach((nd, k) => {
    const jTot = componentsTotalLuminosity(nd.allComponents);
    if (jTot === undefined) {
      total = undefined;
      if (detail) delete detail.total;
    } else if (total !== undefined) {
      total += nd.volumeWeight * nd.lumScale * jTot;
      detail?.total?.push(nd.volumeWeight * nd.lumScale * jTot);
    }
    if (!Number.isFinite(nd.log10ULimit) || detectedWithCompleteness !== undefined) return;
    const d = nd.volumeWeight * nd.lumScale * detectedLuminosityAtNode(nd, observer, completeness, breaks);
    detected += d;
    if (detail) detail.detected[k] = d;
  });
  if (detectedWithCompleteness !== undefined) detected = detectedWithCompleteness;
  return total === undefined ? { detected } : { detected, total };
}

/** integral_{uLim}^inf sum_c phi*_c u^(alpha_c+1) e^-u c(obs(u)) du, in units of L* Mpc^-3. */
export function detectedLuminosityAtNode(
  nd: Pick<NodeState, 'a' | 'log10ULimit' | 'components'>,
  observer: Pick<Observer, 'slope'>,
  completeness: CompletenessFn | undefined,
  breaks: { points: number[]; scale: number; varying: [number, number] } | undefined,
): number {
  const l10uLim = nd.log10ULimit;
  const closed = (p: number, q: number): number => schechterBetween(nd.components, p, q, 1);
  if (!completeness || !breaks) return closed(l10uLim, Infinity);
  return overCompletenessPieces(nd, observer.slope, completeness, breaks.varying, closed, (j, p, q) => {
    return j + completeIntegral(nd, observer, p, q, completeness, breaks, 1);
  });
}

/**
 * integral over log10 u from a node's limit to infinity of its Schechter sum times the completeness,
 * cut where the completeness starts and stops varying (`range`, in obs): a piece where it is
 * constant adds its value times `closed(p, q)`; the varying piece (p to q in log10 u; its obs ends
 * obsLo and obsHi, the range's) is added by `varying`, given the running sum j and returning it.
 */
export function overCompletenessPieces(
  nd: Pick<NodeState, 'a' | 'log10ULimit'>,
  slope: number,
  completeness: CompletenessFn,
  range: readonly [number, number],
  closed: (p: number, q: number) => number,
  varying: (j: number, p: number, q: number, obsLo: number, obsHi: number) => number,
): number {
  const l10uLim = nd.log10ULimit;
  const [vLo, vHi] = range;
  const b1 = (vLo - nd.a) / slope;
  const b2 = (vHi - nd.a) / slope;
  const lo = Math.min(b1, b2);
  const hi = Math.max(b1, b2);
  // obs at lo and hi (the varying range's ends, exactly)
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
      const c = completeness(nd.a + slope * probe);
      if (c > 0) j += c * closed(p, q);
    } else {
      j = varying(j, p, q, obsLo, obsHi);
    }
  }
  return j;
}

/**
 * detectedLuminosityAtNode where the completeness varies, with the varying piece integrated in
 * obs by `rules` (split at the bin edges k width, edges[k - k0] where the slice has them, so that
 * it reuses the bins' integrals).
 */
function detectedLuminosityByRules(
  nd: NodeState,
  observer: Pick<Observer, 'slope'>,
  completeness: CompletenessFn,
  breaks: { points: number[]; scale: number; varying: [number, number] },
  rules: CompletenessQuadrature,
  width: number,
  k0: number,
  edges: readonly number[],
): number {
  const l10uLim = nd.log10ULimit;
  const closed = (p: number, q: number): number => schechterBetween(nd.components, p, q, 1);
  const slope = observer.slope;
  return overCompletenessPieces(nd, slope, completeness, breaks.varying, closed, (j, p, _q, obsLo, obsHi) => {
    // The varying piece in obs, from oP (the limit or the range's end) to oQ, split at bin edges.
    const oP = p === l10uLim ? nd.obsLimit : obsLo;
    const oQ = obsHi;
    const e1 = Math.min(oP, oQ);
    const e2 = Math.max(oP, oQ);
    let from = e1;
    for (let k = Math.floor(e1 / width + 1e-9) + 1; ; k++) {
      // the slice's bin edge (the same number as in the histogram) or the grid's beyond it
      const edge = k >= k0 && k - k0 < edges.length ? edges[k - k0]! : roundEdge(k * width);
      if (!(edge < e2)) break;
      if (edge > from) {
        j += rules.integrate(from, edge, 1);
        from = edge;
      }
    }
    return j + rules.integrate(from, e2, 1);
  });
}

/** What buildNodes needs at a redshift. */
interface NodeModel {
  p: PopulationAtZ;
  obs: Observation;
  /** The selection weight S(z) E(z). */
  kept: number;
  /** dV_C/dz/dOmega in Mpc^3 sr^-1. */
  dV: number;
}

function buildNodes(
  survey: Survey,
  population: Population,
  cosmo: FlatCosmology,
  observer: Observer,
  lo: number,
  hi: number,
  offsets?: ParameterOffsets,
  missed?: { at?: { share: number; z: number } },
): NodeState[] {
  const effects = selectionEffects(survey.detection, population);
  // Model, observation, selection weight and volume element at z, cached: the chosen nodes are
  // among those the order search visits (as in the forecast grid's walk, src/forecast/grid.ts).
  const cache = new Map<number, NodeModel>();
  const at = (zi: number): NodeModel => {
    let hit = cache.get(zi);
    if (!hit) {
      const p = populationAt(population, zi, offsets);
      const obs = observer.at(zi, p.characteristic);
      hit = { p, obs, kept: effects.weight(zi), dV: cosmo.volumeElementMpc3Sr(zi) };
      cache.set(zi, hit);
    }
    return hit;
  };
  // The integrand by z: the search meets some redshifts twice (with several pieces, each piece's 8
  // nodes of the first estimate again)
  const counted = new Map<number, number>();
  const hardCount = (zi: number): number => {
    const known = counted.get(zi);
    if (known !== undefined) return known;
    const { p, obs, kept, dV } = at(zi);
    if (!Number.isFinite(obs.log10ULimit)) return 0;
    const n = schechterBetween(p.components, obs.log10ULimit, Infinity, 0);
    const f = dV * n * kept;
    counted.set(zi, f);
    return f;
  };
  // Piecewise in z between the redshifts where the integrand has a kink (a threshold limit's
  // table nodes, where the limit crosses a histogram bin edge or a step of the completeness, a
  // tabulated filter's rows, the nodes of a selection or attenuation table, the rows of the
  // population's parameters given as tables, where the intergalactic transmission jumps), each
  // piece by convergence.
  const crossings = completenessCrossings(survey, lo, hi);
  const rows = parameterBreaks(population, lo, hi);
  const inner = [
    ...limitBreaks(survey, lo, hi),
    ...crossings,
    ...filterBreaks(survey, population, lo, hi),
    ...igmBreaks(survey, lo, hi, population),
    ...effects.breaks(lo, hi),
    ...rows,
  ].sort((x, y) => x - y);
  // Pieces start from 8 nodes where the count's integrand has what the hard-limit one does not
  // show: the completeness crossed; and where a parameter's row cuts the range, since the nodes
  // also carry what the hard-limit count does not weigh: the total luminosity density (all
  // sources, where few are detected: from 2 nodes a piece holding almost no detections moved it by
  // 5e-5) and, with photometric redshifts, the probability of being measured in a slice (photo-z.ts
  // weights these nodes by it; a phi* row cutting a piece near a measured edge, at most
  // sigma (1 + z) wide, moved the slices by 2.7e-6).
  const nStart = crossings.length > 0 || rows.length > 0 ? 8 : 2;
  // A bias given as a table or an expression with kinks or a narrow feature: the totals weight the
  // nodes' counts by it (src/uncertainty/prediction.ts totalUncertainty), so the nodes cut where it
  // does and converge for the bias-weighted count too (a total holding the spike of a bias
  // 1.5 + 2 exp(-((z - 1.37)/0.003)^2) had its bias 5.9e-3 off, one with a table stepping over
  // 0.002 inside a slice 1.3e-3)
  const biasCuts = biasBreaks(population, lo, hi);
  const bias = biasCuts.length > 0 && population.bias !== 'auto' ? population.bias.at : undefined;
  if (bias) {
    inner.push(...biasCuts);
    inner.sort((x, y) => x - y);
  }
  const weighted = bias ? (zi: number) => hardCount(zi) * bias(zi) : undefined;
  const rule = piecewiseRedshiftNodes([lo, ...inner, hi], hardCount, nStart, weighted);
  const { z, w } = rule;
  if (rule.unconverged && missed) {
    const m = unconvergedShare(rule, hardCount, weighted);
    if (m) missed.at = m;
  }
  const nodes: NodeState[] = [];
  for (let i = 0; i < z.length; i++) {
    const zi = z[i]!;
    const { p, obs, kept, dV } = at(zi);
    nodes.push({
      z: zi,
      volumeWeight: survey.areaSr * dV * w[i]!,
      a: obs.a,
      // nothing kept at this z: no detection (as a zero transmission)
      log10ULimit: kept > 0 ? obs.log10ULimit : Infinity,
      obsLimit: obs.obsLimit,
      components:
        kept === 1 ? p.components : componentsMap(p.components, (c) => new ComponentAtZ(c.phiStar * kept, c.alpha)),
      allComponents: p.components,
      lumScale: luminosityScale(population.variable, p.characteristic),
    });
  }
  return nodes;
}

/**
 * Redshifts strictly inside (lo, hi) where a threshold limit that varies with z has a kink (the
 * nodes of a table) or crosses a multiple of the histogram bin width (where a bin's count has
 * one). Empty for the other kinds, whose limit is fixed in the observed variable.
 */
export function limitBreaks(survey: Survey, lo: number, hi: number): number[] {
  const d = survey.detection;
  if (d.kind !== 'threshold' || d.limit.constant) return [];
  const out: number[] = [];
  const src = d.limit.source;
  if (typeof src === 'object') for (const [zt] of src.table) if (zt > lo && zt < hi) out.push(zt);
  if (d.limit.kinks) out.push(...d.limit.kinks(lo, hi));
  if (d.limit.features) out.push(...d.limit.features(lo, hi));
  const width = survey.histogramWidth;
  out.push(
    ...limitCrossings(survey, lo, hi, (fa, fb) => {
      const ts: number[] = [];
      const ka = Math.floor(fa / width);
      const kb = Math.floor(fb / width);
      for (let k = Math.min(ka, kb) + 1; k <= Math.max(ka, kb); k++) ts.push(k * width);
      return ts;
    }),
  );
  return keptBreaks(out, lo, hi);
}

/**
 * Redshifts strictly inside (lo, hi) where a threshold limit that varies with z crosses a step of
 * the completeness curve: every 1.5 logistic widths over the 60 widths where the logistic varies
 * (the panel width of the quadrature in obs, src/counts/completeness-quadrature.ts), or a table's
 * nodes. The order of the redshift quadrature is chosen by the convergence of the count without
 * completeness, and with a completeness curve the count changes quickly where the limit runs
 * through it, which that integrand does not see: a logistic of width 0.017 dex crossed by a limit
 * rising 0.34 dex per unit z was counted 3e-4 low over 1.7 < z < 5.3 with histogram bins of 0.5,
 * 1e-3 high with bins of 1 (the bins' edges were the only cuts). The pieces between these cuts start
 * from 8 nodes (buildNodes). Empty without completeness and for the other kinds.
 */
export function completenessCrossings(survey: Survey, lo: number, hi: number): number[] {
  const d = survey.detection;
  const c = d.completeness;
  if (d.kind !== 'threshold' || d.limit.constant || !c) return [];
  const steps: number[] = [];
  if (c.model === 'logistic') for (let k = -20; k <= 20; k++) steps.push(c.half + 1.5 * k * c.width);
  else steps.push(...c.x);
  const out = limitCrossings(survey, lo, hi, (fa, fb) => {
    const flo = Math.min(fa, fb);
    const fhi = Math.max(fa, fb);
    return steps.filter((t) => t > flo && t <= fhi);
  });
  return keptBreaks(out, lo, hi);
}

/**
 * Where a threshold limit crosses the targets `between` gives for two of 64 samples over (lo, hi)
 * (values fa and fb there), each found by bisection. Around a narrow feature of a limit given as an
 * expression the samples also take its cuts (ZParam `features`) and the middles between them: the
 * 64 samples stepped over a spike of width 8e-4, whose crossings of the histogram's bin edges were
 * then not cuts, and its slice's bins were up to 1.9e-4 off (the count itself right).
 */
function limitCrossings(
  survey: Survey,
  lo: number,
  hi: number,
  between: (fa: number, fb: number) => number[],
): number[] {
  const d = survey.detection;
  if (d.kind !== 'threshold') return [];
  const f = (z: number) => d.limit.at(z);
  const out: number[] = [];
  const N = 64;
  const even = (i: number): number => lo + ((hi - lo) * i) / N;
  const cuts = d.limit.features?.(lo, hi) ?? [];
  let zs: number[] | undefined;
  if (cuts.length > 0) {
    const points = [lo];
    for (const z of keptBreaks([...Array.from({ length: N - 1 }, (_, i) => even(i + 1)), ...cuts], lo, hi))
      points.push(z);
    points.push(hi);
    zs = [];
    for (let i = 1; i < points.length; i++) zs.push(0.5 * (points[i - 1]! + points[i]!), points[i]!);
  }
  let za = lo;
  let fa = f(za);
  const count = zs ? zs.length : N;
  for (let i = 1; i <= count; i++) {
    const zb = zs ? zs[i - 1]! : even(i);
    const fb = f(zb);
    if (Number.isFinite(fa) && Number.isFinite(fb))
      for (const target of between(fa, fb)) {
        const zc = bisectCrossing(f, target, za, zb, fa);
        if (zc > lo && zc < hi) out.push(zc);
      }
    za = zb;
    fa = fb;
  }
  return out;
}

/**
 * Redshifts strictly inside (lo, hi) where a parameter of the population given as a table (phi*,
 * L* or M*, alpha, of each component) has a row: linear between rows, it has a kink there. The
 * count converged without them (its order is chosen by convergence), but the total luminosity
 * density, phi* L* Gamma(alpha + 2) over the slice on the count's nodes, was 1.8e-5 off in a slice
 * holding a row of a phi* table and 1.7e-6 off with an M* table. Likewise where a parameter given
 * as an expression has a kink (min, max, abs switching): an 850 um count with
 * log10 phi* = -4 - 2 max(z - 2.3, 0) was 3.6e-6 off in the slice holding z = 2.3 (1e-9 with the
 * same function as a table).
 */
export function parameterBreaks(population: Population, lo: number, hi: number): number[] {
  const out: number[] = [];
  const params = [population.lStar, population.mStar];
  for (const c of population.components) params.push(c.phiStar, c.alpha);
  for (const p of params) {
    const src = p?.source;
    if (src !== undefined && typeof src === 'object')
      for (const [zt] of src.table) if (zt - lo > 1e-9 && hi - zt > 1e-9) out.push(zt);
    if (p?.kinks) out.push(...p.kinks(lo, hi));
    if (p?.features) out.push(...p.features(lo, hi));
  }
  return out;
}

/**
 * Redshifts strictly inside (lo, hi) where a bias given as a table has a row, or as an expression a
 * kink or a narrow feature (ZParam `kinks`, `features`): the totals' bias and cosmic variance weight
 * the count's redshift nodes by it. Empty for bias auto, a number or a smooth expression.
 */
export function biasBreaks(population: Population, lo: number, hi: number): number[] {
  const b = population.bias;
  if (b === 'auto' || b.constant) return [];
  const out: number[] = [];
  if (isTableSource(b.source)) for (const [zt] of b.source.table) out.push(zt);
  if (b.kinks) out.push(...b.kinks(lo, hi));
  if (b.features) out.push(...b.features(lo, hi));
  return keptBreaks(out, lo, hi);
}

/**
 * Redshifts strictly inside (lo, hi) where the population's parameters or a threshold limit given as
 * expressions ask integrals over z to cut around a narrow feature (ZParam `features`; both are among
 * parameterBreaks' and limitBreaks' cuts too): for the forecast's density grid (src/forecast/grid.ts),
 * whose nodes otherwise cut only where the selection effects do. Without them a forecast's slice
 * holding a spike of width 7e-4 in log10_phi_star was counted 3.9e-3 high.
 */
export function featureBreaks(survey: Survey, population: Population, lo: number, hi: number): number[] {
  const out: number[] = [];
  const params = [population.lStar, population.mStar];
  for (const c of population.components) params.push(c.phiStar, c.alpha);
  const d = survey.detection;
  if (d.kind === 'threshold') params.push(d.limit);
  for (const p of params) if (p?.features) out.push(...p.features(lo, hi));
  return keptBreaks(out, lo, hi);
}

/**
 * Redshifts strictly inside (lo, hi) where a tabulated filter's rows fall on the population's line
 * (lambda_k / line - 1): the transmission, linear between rows, has a kink there.
 */
export function filterBreaks(survey: Survey, population: Population, lo: number, hi: number): number[] {
  const d = survey.detection;
  if (d.kind !== 'line_flux' || !d.filter?.table) return [];
  const line = population.lineAngstrom ?? d.lineAngstrom;
  if (line === undefined) return [];
  const out: number[] = [];
  for (const wl of d.filter.table.wavelengthAngstrom) {
    const zk = wl / line - 1;
    if (zk - lo > 1e-9 && hi - zk > 1e-9) out.push(zk);
  }
  return out;
}

/**
 * Redshifts strictly inside (lo, hi) where the Madau 1995 transmission the magnitude kind applies
 * (src/selection/igm.ts) has a jump or a kink in z: where a Lyman line or the Lyman limit,
 * redshifted, reaches the band (z = lambda / lambda_j - 1 for the band's wavelength, or for the
 * ends of a band_file's or an sed band's range, where the averaged transmission has a kink). A
 * Lyman alpha jump inside a piece, not at its end, moved a count by 2e-4.
 */
export function igmBreaks(survey: Survey, lo: number, hi: number, population?: Population): number[] {
  const d = survey.detection;
  if (d.kind !== 'magnitude' || d.igm !== 'madau1995') return [];
  // the spectrum in use: the population's own, else detection.sed
  const sed = population?.sed ?? d.sed;
  const edges = sed
    ? bandSupport(sed.band)
    : d.bandTable
      ? tableRange(d.bandTable)
      : d.spectrumBand
        ? bandSupport(d.spectrumBand)
        : [d.bandAngstrom];
  const out: number[] = [];
  for (const rest of [...MADAU1995_LINES.map(([l]) => l), LYMAN_LIMIT_ANGSTROM]) {
    for (const w of edges) {
      const zk = w / rest - 1;
      if (zk - lo > 1e-9 && hi - zk > 1e-9) out.push(zk);
    }
  }
  return out;
}

/** Histogram and total for one slice from its redshift nodes (and, given perNode, each node's count). */
export function histogramCount(
  nodes: NodeState[],
  observer: Observer,
  width: number,
  completeness: CompletenessFn | undefined,
  breaks: { points: number[]; scale: number; varying: [number, number] } | undefined,
  withLuminosity = false,
  quadrature?: CompletenessQuadrature,
  file = '',
  perNode?: number[],
  detail?: NodeDetail,
): { count: number; histogram: Histogram; detectedLuminosity?: number } {
  const slope = observer.slope;
  const rules = completeness ? quadrature : undefined;
  rules?.setSlice(nodes.filter((nd) => Number.isFinite(nd.log10ULimit)));
  const work0 = rules ? [rules.completenessEvaluations, rules.densityEvaluations] : [0, 0];
  let detectedLuminosity = 0;
  // Range of obs over the slice: from the limit to the bright end (u = uLim + 40 or 40).
  obsRange(nodes, slope, obsSpan);
  const obsMin = obsSpan[0]!;
  const obsMax = obsSpan[1]!;
  if (!Number.isFinite(obsMin)) {
    if (detail) detail.bins = nodes.map(() => [0]);
    return { count: 0, histogram: { variable: observer.variable, edges: [0, width], counts: [0] } };
  }
  const k0 = Math.floor(obsMin / width + 1e-9);
  const k1 = Math.max(k0 + 1, Math.ceil(obsMax / width - 1e-9));
  const nBins = k1 - k0;
  if (!(nBins <= CAPS.histogramBins)) {
    throw inputError(
      'too_large',
      file,
      'histogram.width',
      `the detected sources span ${roundEdge(obsMax - obsMin)} in ${observer.variable === 'apparent_magnitude' || observer.variable === 'absolute_magnitude' ? 'magnitude' : 'dex'}, ${nBins} bins of ${width}, more than the ${CAPS.histogramBins} a slice may have`,
      'give a wider histogram.width, or a limit closer to the knee of the luminosity function',
    );
  }
  const edges: number[] = [];
  for (let k = 0; k <= nBins; k++) edges.push(roundEdge((k0 + k) * width));
  // The bins are summed in typed arrays (copied to the histogram's plain array at the end): a plain
  // array of zeros starts with small-integer elements and turns into doubles at the first sum, and
  // V8's optimised code of the node loop, made for one kind, was thrown away at each new slice's.
  const counts = new Float64Array(nBins);
  // Index of the brightest bin: the last for slope > 0 (bright = large obs), the first for slope < 0.
  const brightBin = slope > 0 ? nBins - 1 : 0;
  const gammas = new Float64Array(nBins + 1);
  if (detail) detail.bins = nodes.map(() => new Array<number>(nBins).fill(0));
  for (let at = 0; at < nodes.length; at++) {
    const nd = nodes[at]!;
    if (!Number.isFinite(nd.log10ULimit)) continue;
    const row = detail?.bins[at];
    let nodeCount = 0; // what this node adds to the bins
    if (!completeness) {
      for (const c of nd.components)
        nodeCount = hardComponentBins(nd, c, slope, edges, nBins, brightBin, gammas, counts, row, nodeCount);
    } else {
      rules!.setNode(nd);
      nodeCount = completeNodeBins(nd, slope, edges, nBins, brightBin, completeness, breaks!, rules!, counts, row);
      if (withLuminosity) {
        const d =
          nd.volumeWeight *
          nd.lumScale *
          detectedLuminosityByRules(nd, observer, completeness, breaks!, rules!, width, k0, edges);
        detectedLuminosity += d;
        if (detail) detail.detected[at] = d;
      }
    }
    if (perNode) perNode[at] = nodeCount;
  }
  let count = 0;
  for (const c of counts) count += c;
  const out: { count: number; histogram: Histogram; detectedLuminosity?: number } = {
    count,
    histogram: { variable: observer.variable, edges, counts: Array.from(counts) },
  };
  if (rules && withLuminosity) out.detectedLuminosity = detectedLuminosity;
  if (rules) {
    completenessWork.completenessEvaluations += rules.completenessEvaluations - work0[0]!;
    completenessWork.densityEvaluations += rules.densityEvaluations - work0[1]!;
  }
  return out;
}

/** Scratch for obsRange (histogramCount does not nest). */
const obsSpan = new Float64Array(2);

/**
 * The range of obs over a slice's nodes, from the limit to the bright end (u = uLim + 40 or 40),
 * into span ([Infinity, -Infinity] when no node detects anything). histogramCount's parts are
 * small functions: run cold, V8's optimising compiler costs more the larger the function
 * (DEVELOPERS.md, "Start-up time"); the arithmetic is the same, in the same order.
 */
function obsRange(nodes: NodeState[], slope: number, span: Float64Array): void {
  let obsMin = Infinity;
  let obsMax = -Infinity;
  for (const nd of nodes) {
    if (!Number.isFinite(nd.log10ULimit)) continue;
    const uLim = 10 ** nd.log10ULimit;
    const uBright = uLim > 1 ? uLim + U_BRIGHT_SPAN : U_BRIGHT_SPAN;
    const o1 = nd.a + slope * nd.log10ULimit;
    const o2 = nd.a + slope * Math.log10(uBright);
    obsMin = Math.min(obsMin, o1, o2);
    obsMax = Math.max(obsMax, o1, o2);
  }
  span[0] = obsMin;
  span[1] = obsMax;
}

/**
 * One Schechter component's counts in the bins at a node without completeness, added to counts
 * (and row); returns nodeCount plus them, added bin by bin.
 */
function hardComponentBins(
  nd: NodeState,
  c: NodeState['components'][number],
  slope: number,
  edges: number[],
  nBins: number,
  brightBin: number,
  gammas: Float64Array,
  counts: Float64Array,
  row: number[] | undefined,
  nodeCount: number,
): number {
  const l10uLim = nd.log10ULimit;
  const s = c.alpha + 1;
  // Gamma(s, u) at every edge (u clipped below at the limit); the bright side is open.
  for (let k = 0; k <= nBins; k++) {
    const l10u = (edges[k]! - nd.a) / slope;
    gammas[k] = l10u <= l10uLim ? NaN : upperGamma(s, 10 ** l10u);
  }
  const gLim = upperGamma(s, 10 ** l10uLim);
  for (let b = 0; b < nBins; b++) {
    // Edge indices on the faint and bright side of bin b.
    const faint = slope > 0 ? b : b + 1;
    const bright = slope > 0 ? b + 1 : b;
    const gFaintRaw = gammas[faint]!;
    const gBrightRaw = gammas[bright]!;
    if (Number.isNaN(gBrightRaw) && b !== brightBin) continue; // whole bin below the limit
    const gFaint = Number.isNaN(gFaintRaw) ? gLim : gFaintRaw;
    const gBright = b === brightBin ? 0 : Number.isNaN(gBrightRaw) ? gLim : gBrightRaw;
    const d = gFaint - gBright;
    if (d > 0) {
      const v = nd.volumeWeight * c.phiStar * d;
      counts[b]! += v;
      nodeCount += v;
      if (row) row[b]! += v;
    }
  }
  return nodeCount;
}

/**
 * A node's counts in the bins with a completeness (rules set to the node), added to counts (and
 * row); returns their sum, added bin by bin from 0.
 */
function completeNodeBins(
  nd: NodeState,
  slope: number,
  edges: number[],
  nBins: number,
  brightBin: number,
  completeness: CompletenessFn,
  breaks: { points: number[]; scale: number; varying: [number, number] },
  rules: CompletenessQuadrature,
  counts: Float64Array,
  row: number[] | undefined,
): number {
  const l10uLim = nd.log10ULimit;
  const vLo = breaks.varying[0];
  const vHi = breaks.varying[1];
  const memo = edgeGammas(nd.components.length);
  // Where the open brightest bin ends when completeness varies in it: worked out for every node
  // and bin, used by few. V8's optimising compiler throws its code away at the first operation it
  // has not seen run: this function was compiled again when an open bin first reached the varying
  // range after it was compiled (a cold predict of the narrow-band interlopers sample).
  const uLim = 10 ** l10uLim;
  const uBright = uLim + U_BRIGHT_SPAN;
  const l10uOpen = Math.log10(uLim > 1 ? uBright : U_BRIGHT_SPAN);
  let nodeCount = 0;
  for (let b = 0; b < nBins; b++) {
    const faintObs = slope > 0 ? edges[b]! : edges[b + 1]!;
    const brightObs = slope > 0 ? edges[b + 1]! : edges[b]!;
    const l10uLo = Math.max((faintObs - nd.a) / slope, l10uLim);
    let l10uHi = (brightObs - nd.a) / slope;
    const open = b === brightBin;
    if (!(l10uHi > l10uLo) && !open) continue;
    const lowObs = Math.min(faintObs, brightObs);
    const highObs = Math.max(faintObs, brightObs);
    if (open || highObs <= vLo || lowObs >= vHi) {
      // Completeness is constant over this bin (or, for the open brightest bin, beyond its
      // edge): the closed form times that constant.
      const cBin = completeness(0.5 * (faintObs + brightObs));
      if (!open || highObs <= vLo || lowObs >= vHi) {
        const n = numberBetween(nd.components, l10uLo, open ? Infinity : l10uHi, memo);
        if (n > 0) {
          const v = nd.volumeWeight * cBin * n;
          counts[b]! += v;
          nodeCount += v;
          if (row) row[b]! += v;
        }
        continue;
      }
    }
    const l10uHiOpen = Math.max(l10uHi, l10uOpen);
    if (open) l10uHi = l10uHiOpen;
    if (!(l10uHi > l10uLo)) continue;
    // The bin in obs: its faint edge (or the limit) to its bright edge.
    const oA = l10uLo === l10uLim ? nd.obsLimit : faintObs;
    const oOpen = nd.a + slope * l10uHi;
    const oB = open ? oOpen : brightObs;
    const v = nd.volumeWeight * rules.integrate(oA, oB, 0);
    counts[b]! += v;
    nodeCount += v;
    if (row) row[b]! += v;
  }
  return nodeCount;
}

/**
 * Gamma(alpha_c + 1, 10^x) of every component of one node at the two ends of the last bin
 * numberBetween was given: neighbouring bins share an edge, whose gammas are then computed once,
 * not twice.
 */
interface EdgeGammas {
  x0: number;
  g0: Float64Array;
  x1: number;
  g1: Float64Array;
}

function edgeGammas(components: number): EdgeGammas {
  return { x0: NaN, g0: new Float64Array(components), x1: NaN, g1: new Float64Array(components) };
}

/** The memo's gammas at x, or undefined. */
function memoAt(memo: EdgeGammas, x: number): Float64Array | undefined {
  if (memo.x0 === x) return memo.g0;
  if (memo.x1 === x) return memo.g1;
  return undefined;
}

/** The gammas at x computed into the memo's slot 0 or 1. */
function fillAt(memo: EdgeGammas, slot: 0 | 1, components: NodeState['components'], x: number): Float64Array {
  const g = slot === 0 ? memo.g0 : memo.g1;
  for (let i = 0; i < components.length; i++) g[i] = upperGamma(components[i]!.alpha + 1, 10 ** x);
  if (slot === 0) memo.x0 = x;
  else memo.x1 = x;
  return g;
}

/**
 * schechterBetween(components, p, q, 0) (p < q), the same arithmetic in the same order, with the
 * gammas of an end the memo holds (the neighbouring bin's) not computed again; a missing end is
 * written into the slot the other end does not occupy.
 */
function numberBetween(components: NodeState['components'], p: number, q: number, memo: EdgeGammas): number {
  const open = q === Infinity;
  let gp = memoAt(memo, p);
  let gq = open ? undefined : memoAt(memo, q);
  if (!gp) gp = fillAt(memo, gq === memo.g0 ? 1 : 0, components, p);
  if (!open && !gq) gq = fillAt(memo, gp === memo.g0 ? 1 : 0, components, q);
  let j = 0;
  for (let i = 0; i < components.length; i++) j += components[i]!.phiStar * (gp[i]! - (gq ? gq[i]! : 0));
  return j;
}

const PANEL_RULE = 8;
/** Nodes of completeIntegral's panels, reused from call to call (completeIntegral does not nest). */
const panels: PanelNodes = { x: new Float64Array(256), w: new Float64Array(256), count: 0 };

/**
 * integral over log10 u in [lo, hi] of phi(u) u^power c(obs(u)) du, by Gauss-Legendre panels in
 * log10 u: power 0 gives the number density, power 1 the luminosity density (units of L* Mpc^-3).
 */
function completeIntegral(
  nd: Pick<NodeState, 'a' | 'components'>,
  observer: Pick<Observer, 'slope'>,
  l10lo: number,
  l10hi: number,
  completeness: CompletenessFn,
  breaks: { points: number[]; scale: number },
  power: 0 | 1,
): number {
  const slope = observer.slope;
  // Panel boundaries: the bin ends, completeness break points inside, and a step no wider than
  // the logistic width (in log10 u) or 0.1 dex.
  const cuts = [l10lo, l10hi];
  for (const p of breaks.points) {
    const l = (p - nd.a) / slope;
    if (l > l10lo && l < l10hi) cuts.push(l);
  }
  const maxStep = Math.min(0.1, Number.isFinite(breaks.scale) ? breaks.scale / Math.abs(slope) : 0.1);
  let total = 0;
  const { x, w, count } = panelNodes(cuts, maxStep, PANEL_RULE, panels);
  for (let i = 0; i < count; i++) {
    const l10u = x[i]!;
    const u = 10 ** l10u;
    let phi = 0;
    for (const c of nd.components) phi += c.phiStar * u ** (c.alpha + 1 + power);
    // du = u ln10 dlog10u
    total += w[i]! * LN10 * phi * Math.exp(-u) * completeness(nd.a + slope * l10u);
  }
  return total;
}

/** Round an edge to the bin grid so that 26.750000000000004 prints as 26.75. */
export function roundEdge(x: number): number {
  return Number(x.toPrecision(12));
}
