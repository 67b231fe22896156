/**
 * The expected density of detected sources of one population, tabulated once on a quadrature grid
 * in (z, t = ln u) so that the Fisher matrix, the expected counts at shifted parameters and the
 * mock surveys all integrate the same thing.
 *
 *   lambda(z, t) dz dt = area_sr dV_C/dz/dOmega(z) phi*(z) u^(alpha(z)+1) exp(-u) c(obs(z, t)) dz dt
 *
 * with u = L/L*(z) (or 10^(0.4 (M*(z) - M))) at the INPUT parameters, t >= t_lim(z) (the hard limit),
 * times the selection weight S(z) E(z) (redshift selection and equivalent-width cut, src/selection/effects.ts),
 * which enters like a completeness that depends on z only.
 * z: the count engine's Gauss-Legendre nodes for each slice (`chooseRedshiftNodes`), so the grid's slice
 * totals are the engine's counts. t: 8-point Gauss-Legendre panels no wider than 0.6 (and, for a
 * logistic completeness narrower than that, no wider than one width within 8 widths of its half
 * point and wherever u > 1), split at completeness break points, from t_lim to
 * ln(max(u_lim, 1) + 40) (exp(-40) ~ 4e-18 relative beyond). Below u = 1 and beyond 8 widths the
 * integrand's logarithmic slope is under 2 and the completeness differs from 1 (or from 0) by
 * e^-8 of its size times e^(-distance / width), which 8 points on 0.6 integrate to about 1e-7 of
 * itself (the rule on exp(lambda x) errs by about (lambda h)^16 / 16!): the grid equals the one
 * with every panel one width wide to 1e-9 on every sample (test/forecast/grid-panels.test.ts),
 * with fewer points where the limit lies far below L*. Where the limit is one observed value (a flux
 * or magnitude limit), the nodes' segments between the same cuts cover the same observed values, and
 * the completeness is evaluated on them once for every node (ln w and ln c then add per point).
 *
 * The grid is plain data (typed arrays and numbers) so that it can be sent to worker threads.
 *
 * At parameter offsets theta = [d log10 phi*, d characteristic, d alpha] the density at a grid point
 * (fixed observed value) is
 *   lambda_q(theta) = exp(logW_q + ln10 d_phi + (a1_q + d_alpha) (t_q + s d_c) - e^(t_q) e^(s d_c))
 * where logW_q = ln(weight_z weight_t V phi* c) and a1 = alpha + 1 at the input, s = d ln u / d_c.
 */
import type { FlatCosmology } from '../cosmology/flat-cosmology.js';
import type { Completeness, DetectionKind } from '../model/detection.js';
import type { Population, PopulationVariable } from '../model/population.js';
import type { Survey } from '../model/survey.js';
import {
  featureBreaks,
  filterBreaks,
  igmBreaks,
  MAX_HALVINGS,
  piecewiseRedshiftNodes,
  UNCONVERGED_SHARE,
  unconvergedShare,
} from '../counts/engine.js';
import { unconvergedWarning } from '../counts/warnings.js';
import type { Warning } from '../warnings.js';
import { upperGamma } from '../numerics/gamma.js';
import { keptBreaks, panelNodes, type PanelNodes } from '../numerics/quadrature.js';
import { makeObserver, type Observation, type Observer } from '../selection/observe.js';
import { selectionEffects, type SelectionEffects } from '../selection/effects.js';
import { completenessBreaks, completenessFunction, type CompletenessFn } from '../selection/completeness.js';
import { populationAt, type PopulationAtZ } from '../population/model.js';
import { characteristicShift } from './parameters.js';
import type { FisherParts } from './fisher.js';
import { zeros } from '../numerics/linalg.js';
import { addSliceSums } from './slice-sums.js';

const LN10 = Math.LN10;
const PANEL_POINTS = 8;
const MAX_PANEL_T = 0.6;
const U_BRIGHT_SPAN = 40;
/** Logistic widths either side of the half point within which panels are one width wide. */
const FINE_WIDTHS = 16;

export interface DensityGrid {
  /** d ln u / d characteristic: -ln 10 (log10 L*) or 0.4 ln 10 (M*). */
  shift: number;
  /** Slope of obs = a + slope log10 u. */
  slope: number;
  edges: number[];
  /** Node j belongs to slice nodeSlice[j]; nodes of slice s are sliceNodeStart[s] .. sliceNodeStart[s+1]-1. */
  sliceNodeStart: Int32Array;
  nodeZ: Float64Array;
  /** alpha(z) + 1 at the input. */
  nodeA1: Float64Array;
  /** a(z) of obs = a + slope log10 u, at the input L* or M*. */
  nodeObsA: Float64Array;
  /** ln(area dV/dz weight_z phi*(z)): the node's factor in front of u^(alpha+1) e^-u c dt. */
  nodeLogV: Float64Array;
  nodeTLim: Float64Array;
  nodeTMax: Float64Array;
  /** Points of node j: nodePointStart[j] .. nodePointStart[j+1]-1. */
  nodePointStart: Int32Array;
  pointT: Float64Array;
  pointExpT: Float64Array;
  pointLogW: Float64Array;
  pointA1: Float64Array;
  /** Completeness model and the orientation data needed to rebuild c(obs) in a worker. */
  completeness?: Completeness;
  kind: DetectionKind;
  variable: PopulationVariable;
  /** The slices whose nodes' order did not converge (src/counts/engine.ts unconvergedShare); absent when all did. */
  quadratureMissed?: QuadratureMissed[];
}

/** A slice (its index) whose redshift quadrature did not converge: by what share of its integral, near which z. */
export interface QuadratureMissed {
  slice: number;
  share: number;
  z: number;
}

/**
 * The warning for the slices (on `edges`) of a density grid whose redshift quadrature did not
 * converge, as predict gives it for its own slices (unconvergedWarning); none: []. Forecasts and
 * plans (whose grid is at the plan's deepest limit) give it.
 */
export function quadratureWarnings(
  name: string,
  edges: readonly number[],
  missed: readonly QuadratureMissed[] | undefined,
): Warning[] {
  if (!missed) return [];
  const slices = missed.map((m) => ({
    zMin: edges[m.slice]!,
    zMax: edges[m.slice + 1]!,
    quadratureMissed: { share: m.share, z: m.z },
  }));
  const w = unconvergedWarning(name, slices, UNCONVERGED_SHARE, MAX_HALVINGS);
  return w ? [w] : [];
}

/**
 * Where walkDensity puts the grid: each point (in order: slice by slice, node by node), each
 * node after its points, each slice after its nodes.
 */
interface DensitySink {
  /** Room for `count` more points. */
  reserve(count: number): void;
  point(t: number, logW: number, a1: number): void;
  node(z: number, a1: number, obsA: number, logV: number, tLim: number, tMax: number): void;
  sliceEnd(): void;
  /** The current slice's redshift quadrature did not converge (before its nodes come). */
  missed(share: number, z: number): void;
}

/** Tabulate the density of detected sources of `population` on `edges`. */
export function buildDensityGrid(
  survey: Survey,
  population: Population,
  cosmo: FlatCosmology,
  edges: readonly number[],
  /**
   * Panels up to this many times the completeness width (default 1). Gauss-Legendre's 8 points
   * on a panel of half-width pi times a logistic's width (its poles' distance from the real
   * axis) err by about (1 + sqrt 2)^-16 ~ 1e-6 of the panel: 2 pi suits sums that tolerate that
   * (plan.robust's draws, src/planning/robust.ts).
   */
  panelWidths = 1,
  /**
   * The node-order search's integrand by z, shared with another grid of the same survey and
   * population (a plan's design model and its draws' grid, src/planning/robust.ts).
   */
  hardCounts?: Map<number, number>,
): DensityGrid {
  const sink = new GridArrays();
  const slope = walkDensity(survey, population, cosmo, edges, panelWidths, sink, hardCounts);
  const npt = sink.npt;
  const grid: DensityGrid = {
    shift: characteristicShift(population),
    slope,
    edges: [...edges],
    sliceNodeStart: Int32Array.from(sink.sliceNodeStart),
    nodeZ: Float64Array.from(sink.nodeZ),
    nodeA1: Float64Array.from(sink.nodeA1),
    nodeObsA: Float64Array.from(sink.nodeObsA),
    nodeLogV: Float64Array.from(sink.nodeLogV),
    nodeTLim: Float64Array.from(sink.nodeTLim),
    nodeTMax: Float64Array.from(sink.nodeTMax),
    nodePointStart: Int32Array.from(sink.nodePointStart),
    pointT: sink.pointT.slice(0, npt),
    pointExpT: expOf(sink.pointT, npt),
    pointLogW: sink.pointLogW.slice(0, npt),
    pointA1: sink.pointA1.slice(0, npt),
    kind: survey.detection.kind,
    variable: population.variable,
  };
  const comp = survey.detection.completeness;
  if (comp) grid.completeness = comp;
  if (sink.quadratureMissed.length > 0) grid.quadratureMissed = sink.quadratureMissed;
  return grid;
}

/** The grid's points and nodes in arrays (the points' grown by doubling, npt held). */
class GridArrays implements DensitySink {
  readonly sliceNodeStart: number[] = [0];
  readonly nodeZ: number[] = [];
  readonly nodeA1: number[] = [];
  readonly nodeObsA: number[] = [];
  readonly nodeLogV: number[] = [];
  readonly nodeTLim: number[] = [];
  readonly nodeTMax: number[] = [];
  readonly nodePointStart: number[] = [0];
  npt = 0;
  pointT = new Float64Array(4096);
  pointLogW = new Float64Array(4096);
  pointA1 = new Float64Array(4096);

  reserve(more: number): void {
    const npt = this.npt;
    if (npt + more <= this.pointT.length) return;
    const size = Math.max(2 * this.pointT.length, npt + more);
    const grow = (a: Float64Array) => {
      const b = new Float64Array(size);
      b.set(a.subarray(0, npt));
      return b;
    };
    this.pointT = grow(this.pointT);
    this.pointLogW = grow(this.pointLogW);
    this.pointA1 = grow(this.pointA1);
  }

  point(t: number, logW: number, a1: number): void {
    const n = this.npt++;
    this.pointT[n] = t;
    this.pointLogW[n] = logW;
    this.pointA1[n] = a1;
  }

  node(z: number, a1: number, obsA: number, logV: number, tLim: number, tMax: number): void {
    this.nodeZ.push(z);
    this.nodeA1.push(a1);
    this.nodeObsA.push(obsA);
    this.nodeLogV.push(logV);
    this.nodeTLim.push(tLim);
    this.nodeTMax.push(tMax);
    this.nodePointStart.push(this.npt);
  }

  sliceEnd(): void {
    this.sliceNodeStart.push(this.nodeZ.length);
  }

  readonly quadratureMissed: QuadratureMissed[] = [];

  missed(share: number, z: number): void {
    this.quadratureMissed.push({ slice: this.sliceNodeStart.length - 1, share, z });
  }
}

/**
 * fisherParts(buildDensityGrid(survey, population, cosmo, edges)) without the grid: the same
 * points in the same order, each one's terms summed as it is made (fisherPartsAt's arithmetic at
 * zero offsets, term for term), so the sums are those of the grid bit for bit
 * (test/forecast/grid-sums.test.ts) without writing, copying and reading the points' arrays.
 */
export function densityFisherParts(
  survey: Survey,
  population: Population,
  cosmo: FlatCosmology,
  edges: readonly number[],
): FisherParts {
  const sink = new FisherSums(characteristicShift(population));
  walkDensity(survey, population, cosmo, edges, 1, sink);
  return sink.parts;
}

/** The Poisson Fisher sums of the points as they come (fisherPartsAt's terms at theta = 0). */
class FisherSums implements DensitySink {
  readonly parts: FisherParts = { matrix: zeros(3), slices: [], count: 0 };
  private n = 0;
  private bc = 0;
  private ba = 0;
  private fcc = 0;
  private fca = 0;
  private faa = 0;

  constructor(private readonly s: number) {}

  reserve(): void {}

  point(t: number, logW: number, a1: number): void {
    const u = Math.exp(t);
    const g = Math.exp(logW + a1 * t - u);
    const dc = this.s * (a1 - u);
    this.n += g;
    this.bc += g * dc;
    this.ba += g * t;
    this.fcc += g * dc * dc;
    this.fca += g * dc * t;
    this.faa += g * t * t;
  }

  node(): void {}

  sliceEnd(): void {
    addSliceSums(this.parts, this.n, this.bc, this.ba, this.fcc, this.fca, this.faa);
    this.n = this.bc = this.ba = this.fcc = this.fca = this.faa = 0;
  }

  missed(share: number, z: number): void {
    (this.parts.quadratureMissed ??= []).push({ slice: this.parts.slices.length, share, z });
  }
}

/**
 * What walkDensity's parts share: the arguments, the selection and the scratch arrays. Run cold
 * (every forecast is a new process), V8's optimising compiler costs more the larger the function
 * it optimises, so the walk is small functions (a slice, a node, a segment, its completeness, its
 * points) passing this record rather than one function with closures (DEVELOPERS.md, "Start-up
 * time"); the arithmetic is the single function's, operation for operation, in the same order.
 */
interface Walk {
  survey: Survey;
  population: Population;
  cosmo: FlatCosmology;
  observer: Observer;
  effects: SelectionEffects;
  cfn: CompletenessFn | undefined;
  breaks: CompletenessBreaks | undefined;
  slope: number;
  maxStep: number;
  /** Fine panels only near a logistic's half point (maxStep < MAX_PANEL_T only for a narrow logistic). */
  fineBand: number;
  panels: PanelNodes;
  segment: number[];
  lnW: Float64Array;
  /**
   * ln c at the points of a segment between two named cuts (the limit, a break point, a fine band's
   * edge): where the limit is one observed value (a flux or magnitude limit) every node's segment
   * between the same cuts covers the same observed values in the same panels, so the completeness
   * is evaluated once for all nodes; reused only when the segment's ends agree to 1e-14 of the
   * observed value (else evaluated afresh: a limit tabulated in z)
   */
  shared: Map<string, SharedLogC>;
  sink: DensitySink;
  /** The node-order search's integrand by z (shared with another grid when given, else this walk's own). */
  hardCounts: Map<number, number>;
}

interface SharedLogC {
  oLo: number;
  oHi: number;
  count: number;
  values: Float64Array;
}

type CompletenessBreaks = ReturnType<typeof completenessBreaks>;

/** A panel cut and its name (see Walk.shared). */
interface Cut {
  t: number;
  name: string;
}

/**
 * The grid's points, nodes and slices, in order, into `sink` (buildDensityGrid's arguments);
 * returns the slope of obs = a + slope log10 u.
 */
function walkDensity(
  survey: Survey,
  population: Population,
  cosmo: FlatCosmology,
  edges: readonly number[],
  panelWidths: number,
  sink: DensitySink,
  hardCounts?: Map<number, number>,
): number {
  const observer = makeObserver(survey.detection, population, cosmo);
  // The redshift selection and the equivalent-width cut multiply the density like a completeness.
  const effects = selectionEffects(survey.detection, population);
  const comp = survey.detection.completeness;
  const cfn = comp ? completenessFunction(comp, survey.detection.kind, population.variable) : undefined;
  const breaks = comp ? completenessBreaks(comp, survey.detection.kind, population.variable) : undefined;
  const slope = observer.slope;
  const maxStep = Math.min(
    MAX_PANEL_T,
    breaks && Number.isFinite(breaks.scale) ? (panelWidths * breaks.scale * LN10) / Math.abs(slope) : MAX_PANEL_T,
  );
  const walk: Walk = {
    survey,
    population,
    cosmo,
    observer,
    effects,
    cfn,
    breaks,
    slope,
    maxStep,
    fineBand: maxStep < MAX_PANEL_T ? FINE_WIDTHS * maxStep : 0,
    panels: { x: new Float64Array(256), w: new Float64Array(256), count: 0 },
    segment: [0, 0],
    lnW: new Float64Array(PANEL_POINTS),
    shared: new Map<string, SharedLogC>(),
    sink,
    hardCounts: hardCounts ?? new Map<number, number>(),
  };
  for (let s = 0; s + 1 < edges.length; s++) {
    const lo = Math.max(edges[s]!, population.window.min);
    const hi = Math.min(edges[s + 1]!, population.window.max);
    if (hi > lo) walkSlice(walk, lo, hi);
    sink.sliceEnd();
  }
  return slope;
}

/** Model and observation at a redshift node. */
interface NodeModel {
  p: PopulationAtZ;
  obs: Observation;
}

/** The points and nodes of the slice [lo, hi]. */
function walkSlice(walk: Walk, lo: number, hi: number): void {
  const { population, observer, effects, cosmo } = walk;
  // The count engine's redshift nodes (the order chosen by convergence of the hard-limit count).
  // Model and observation at z, cached: the chosen nodes are among those the order search visits.
  const cache = new Map<number, NodeModel>();
  const at = (zi: number): NodeModel => {
    let hit = cache.get(zi);
    if (!hit) {
      const p = populationAt(population, zi);
      hit = { p, obs: observer.at(zi, p.characteristic) };
      cache.set(zi, hit);
    }
    return hit;
  };
  // The count engine's integrand (buildNodes' hardCount: the same number), kept by z
  const hardCounts = walk.hardCounts;
  const hardCount = (zi: number): number => {
    const known = hardCounts.get(zi);
    if (known !== undefined) return known;
    const { p, obs } = at(zi);
    if (!Number.isFinite(obs.log10ULimit)) return 0;
    const u = 10 ** obs.log10ULimit;
    let n = 0;
    for (const c of p.components) n += c.phiStar * upperGamma(c.alpha + 1, u);
    const f = cosmo.volumeElementMpc3Sr(zi) * n * effects.weight(zi);
    hardCounts.set(zi, f);
    return f;
  };
  // the cuts the selection effects ask for, those around a parameter's or a threshold limit's
  // narrow feature (none for a smooth expression: the nodes are then the selection's alone), a
  // tabulated filter's rows, where the transmission has a kink (the count engine's filterBreaks:
  // without them 256 nodes did not converge across the rows, and the slices of the sample
  // narrowband-interlopers.yaml were 5.6e-6 below predict's), and where the Madau 1995 transmission
  // jumps or has a kink (igmBreaks: a slice holding Lyman alpha's jump across a 0.55 um band was
  // 1.7e-4 off predict's). A parameter's or a threshold limit's table rows and kinks are not cut
  // here: where the nodes do not converge across them their pieces are halved (chooseRedshiftNodes)
  const extra = [
    ...featureBreaks(walk.survey, population, lo, hi),
    ...filterBreaks(walk.survey, population, lo, hi),
    ...igmBreaks(walk.survey, lo, hi, population),
  ];
  const cuts = extra.length > 0 ? keptBreaks([...effects.breaks(lo, hi), ...extra], lo, hi) : effects.breaks(lo, hi);
  const rule = piecewiseRedshiftNodes([lo, ...cuts, hi], hardCount);
  const { z, w } = rule;
  if (rule.unconverged) {
    const m = unconvergedShare(rule, hardCount);
    if (m) walk.sink.missed(m.share, m.z);
  }
  for (let i = 0; i < z.length; i++) {
    const zi = z[i]!;
    walkNode(walk, zi, w[i]!, at(zi));
  }
}

/** The points of the redshift node zi (quadrature weight wi), then the node. */
function walkNode(walk: Walk, zi: number, wi: number, { p, obs }: NodeModel): void {
  const kept = walk.effects.weight(zi);
  if (!Number.isFinite(obs.log10ULimit) || !(kept > 0)) return;
  const c0 = p.components[0]!;
  const tLim = LN10 * obs.log10ULimit;
  const uLim = Math.exp(tLim);
  const tMax = Math.log((uLim > 1 ? uLim : 1) + U_BRIGHT_SPAN);
  const logV = Math.log(walk.survey.areaSr * walk.cosmo.volumeElementMpc3Sr(zi) * wi * c0.phiStar * kept);
  const a1 = c0.alpha + 1;
  // Panel cuts: the ends and completeness break points in between (each named, see Walk.shared).
  const cuts: Cut[] = [
    { t: tLim, name: 'limit' },
    { t: tMax, name: '' },
  ];
  const halves: number[] = [];
  if (walk.breaks) addBreakCuts(walk, walk.breaks, obs, tLim, tMax, cuts, halves);
  // u > 1: the Schechter factor's slope a1 - u grows with u: the fine panels stay there
  // (no cut at u = 1)
  if (!cutsAscending(cuts)) cuts.sort((x, y) => x.t - y.t);
  for (let k = 0; k + 1 < cuts.length; k++) walkSegment(walk, obs, cuts[k]!, cuts[k + 1]!, halves, logV, a1);
  walk.sink.node(zi, a1, obs.a, logV, tLim, tMax);
}

/** True when the cuts are in order already, as they mostly are (the sort then changes nothing: see `ascending`). */
function cutsAscending(cuts: readonly Cut[]): boolean {
  for (let k = 0; k + 1 < cuts.length; k++) if (!(cuts[k]!.t <= cuts[k + 1]!.t)) return false;
  return true;
}

/** The completeness break points between tLim and tMax as cuts (and the fine bands' edges). */
function addBreakCuts(
  walk: Walk,
  breaks: CompletenessBreaks,
  obs: Observation,
  tLim: number,
  tMax: number,
  cuts: Cut[],
  halves: number[],
): void {
  const { slope, fineBand } = walk;
  breaks.points.forEach((bp, b) => {
    const t = (LN10 * (bp - obs.a)) / slope;
    if (t > tLim && t < tMax) cuts.push({ t, name: `${b}` });
    if (fineBand > 0) {
      halves.push(t);
      if (t - fineBand > tLim && t - fineBand < tMax) cuts.push({ t: t - fineBand, name: `${b}-` });
      if (t + fineBand > tLim && t + fineBand < tMax) cuts.push({ t: t + fineBand, name: `${b}+` });
    }
  });
}

/** The points of the panels between two cuts. */
function walkSegment(
  walk: Walk,
  obs: Observation,
  from: Cut,
  to: Cut,
  halves: number[],
  logV: number,
  a1: number,
): void {
  const { segment, fineBand, slope, lnW, sink } = walk;
  segment[0] = from.t;
  segment[1] = to.t;
  const mid = 0.5 * (segment[0] + segment[1]);
  const fine = fineBand === 0 || halves.some((h) => Math.abs(mid - h) < fineBand);
  const pn = panelNodes(segment, fine ? walk.maxStep : MAX_PANEL_T, PANEL_POINTS, walk.panels);
  sink.reserve(pn.count);
  // ln c at the points: from a segment between the same named cuts at the same observed
  // values (another node's), or evaluated here
  const oLo = obs.a + (slope * segment[0]) / LN10;
  const oHi = obs.a + (slope * segment[1]) / LN10;
  const name = from.name && to.name ? `${from.name}|${to.name}` : '';
  let lnC = name ? walk.shared.get(name) : undefined;
  if (!lnC || lnC.count !== pn.count || !sameObs(lnC.oLo, oLo) || !sameObs(lnC.oHi, oHi)) {
    lnC = { oLo, oHi, count: pn.count, values: logCompleteness(walk.cfn, obs.a, slope, pn) };
    if (name) walk.shared.set(name, lnC);
  }
  // the Gauss-Legendre weights repeat from panel to panel: their logarithms once
  for (let q = 0; q < PANEL_POINTS && q < pn.count; q++) lnW[q] = Math.log(pn.w[q]!);
  emitPoints(sink, pn, lnC.values, logV, lnW, a1);
}

function sameObs(x: number, y: number): boolean {
  return Math.abs(x - y) <= 1e-14 * Math.max(1, Math.abs(x));
}

/** ln c at the panels' points (0 without a completeness). */
function logCompleteness(cfn: CompletenessFn | undefined, a: number, slope: number, pn: PanelNodes): Float64Array {
  const values = new Float64Array(pn.count);
  for (let q = 0; q < pn.count; q++) values[q] = cfn ? Math.log(cfn(a + (slope * pn.x[q]!) / LN10)) : 0;
  return values;
}

/** The panels' points with their ln weights into the sink (none where c = 0). */
function emitPoints(
  sink: DensitySink,
  pn: PanelNodes,
  values: Float64Array,
  logV: number,
  lnW: Float64Array,
  a1: number,
): void {
  for (let q = 0; q < pn.count; q++) {
    const lc = values[q]!;
    if (!(lc > -Infinity)) continue;
    sink.point(pn.x[q]!, logV + lnW[q % PANEL_POINTS]! + lc, a1);
  }
}

function expOf(xs: Float64Array, n: number): Float64Array {
  const out = new Float64Array(n);
  for (let i = 0; i < n; i++) out[i] = Math.exp(xs[i]!);
  return out;
}

export function sliceCount(grid: DensityGrid): number {
  return grid.sliceNodeStart.length - 1;
}

/**
 * Expected counts per slice at offsets theta, with their gradient and Hessian in theta.
 * `out` receives, per slice, 10 numbers: Lambda, dLambda[3], then the Hessian's upper triangle
 * (00, 01, 02, 11, 12, 22).
 */
export function expectedCounts(
  grid: DensityGrid,
  theta: ArrayLike<number>,
  out: Float64Array = new Float64Array(10 * sliceCount(grid)),
): Float64Array {
  const dPhi = theta[0]!;
  const dC = theta[1]!;
  const dA = theta[2]!;
  const s = grid.shift;
  const eShift = Math.exp(s * dC);
  const lnPhi = LN10 * dPhi;
  const { pointT, pointExpT, pointLogW, pointA1, nodePointStart, sliceNodeStart } = grid;
  const nS = sliceCount(grid);
  for (let sl = 0; sl < nS; sl++) {
    let L = 0,
      g1 = 0,
      g2 = 0,
      h11 = 0,
      h12 = 0,
      h22 = 0;
    const q0 = nodePointStart[sliceNodeStart[sl]!]!;
    const q1 = nodePointStart[sliceNodeStart[sl + 1]!]!;
    for (let q = q0; q < q1; q++) {
      const y = pointT[q]! + s * dC;
      const a = pointA1[q]! + dA;
      const u = pointExpT[q]! * eShift;
      const g = Math.exp(pointLogW[q]! + lnPhi + a * y - u);
      // d exponent: phi -> ln10, c -> s (a - u), alpha -> y ; second: cc -> -s^2 u, c alpha -> s
      const dc = s * (a - u);
      L += g;
      g1 += g * dc;
      g2 += g * y;
      h11 += g * (dc * dc - s * s * u);
      h12 += g * (dc * y + s);
      h22 += g * y * y;
    }
    const o = 10 * sl;
    out[o] = L;
    out[o + 1] = LN10 * L;
    out[o + 2] = g1;
    out[o + 3] = g2;
    out[o + 4] = LN10 * LN10 * L;
    out[o + 5] = LN10 * g1;
    out[o + 6] = LN10 * g2;
    out[o + 7] = h11;
    out[o + 8] = h12;
    out[o + 9] = h22;
  }
  return out;
}
