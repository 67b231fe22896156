/**
 * Integrals of the Schechter density times the completeness over a range of the observed value,
 * for the count engine where the completeness varies.
 *
 * At a redshift node the observed value is obs = a + slope log10 u, so with U(obs) = 10^(obs/slope)
 * and s = 10^(-a/slope), u = U s and ln u = ln U + ln s. Over obs in [o1, o2] (sorted):
 *
 *   ∫ phi(u) u^power c(obs) du  =  ln10/|slope| ∫ Σ_k phi*_k e^((alpha_k + 1 + power) ln u - u) c(obs) dobs
 *
 * (phi per unit u = Σ phi*_k u^alpha_k e^-u). The quadrature rule in obs (nodes, weights, U and
 * c at every node) depends only on the range and is kept for the whole slice, so the completeness
 * is evaluated once per node of the rule, not once per redshift node (the rules are kept with the
 * completeness curve, for every slice and later calls), and each point costs one exponential per
 * component. A redshift node's integral over the same range is kept too (count
 * and luminosity come from the same points).
 *
 * Rule: 8-point Gauss-Legendre panels, split at the completeness break points (table nodes, the
 * logistic's half point) and no wider than 1.5 logistic widths (the logistic's poles lie pi widths
 * off the real axis, so the error per panel falls below 1e-13) nor than 2 / lambda, lambda =
 * (u + |alpha + 2| + 2) ln10 / |slope| the steepest logarithmic slope of the Schechter factor at
 * the node (u at the range's bright end). The number of panels per piece is rounded up to a power
 * of two, so that the nodes of a slice share a few rules. A node whose u over the whole range
 * exceeds by 50 the u of the slice's node that sees the smallest u adds less than e^-50 of that
 * node's integral (the volume weights and normalisations of a slice's nodes are alike) and is
 * left out, as is one where e^-u underflows (u > 745).
 */
import type { CompletenessFn } from '../selection/completeness.js';
import { ascending, gaussLegendreRule } from '../numerics/quadrature.js';

const POINTS = 8;
const LN10 = Math.LN10;

interface Rule {
  count: number;
  lnU: Float64Array;
  u: Float64Array;
  /** Gauss-Legendre weight x ln10/|slope| x completeness at the node. */
  wc: Float64Array;
  /** The redshift node whose integrals are kept below (see CompletenessQuadrature.stamp). */
  stamp: number;
  number: number;
  luminosity: number;
}

export interface QuadratureNode {
  a: number;
  components: { phiStar: number; alpha: number }[];
}

const kept = new WeakMap<object, Map<string, CompletenessQuadrature>>();

/**
 * The quadrature of one completeness curve (the survey's completeness object, `spec`) for one
 * detection kind and variable (`key`), made once and kept with the curve.
 */
export function completenessQuadrature(
  spec: object,
  key: string,
  slope: number,
  completeness: CompletenessFn,
  breaks: { points: number[]; scale: number },
): CompletenessQuadrature {
  let byKey = kept.get(spec);
  if (!byKey) kept.set(spec, (byKey = new Map<string, CompletenessQuadrature>()));
  let q = byKey.get(key);
  if (!q) byKey.set(key, (q = new CompletenessQuadrature(slope, completeness, breaks)));
  return q;
}

export class CompletenessQuadrature {
  private readonly rules = new Map<number, Map<number, (Rule | undefined)[]>>();
  private readonly maxPanel: number;
  /** The smallest ln s over the slice's nodes: the node that sees the smallest u at any obs. */
  private lnSMin = Infinity;
  private ruleCount = 0;
  private alphaSpan = 0;
  private stamp = 0;
  private lnS = 0;
  private s = 1;
  private components: { phiStar: number; alpha: number }[] = [];
  /** Completeness evaluations and Schechter-factor evaluations made so far (for benchmarks). */
  completenessEvaluations = 0;
  densityEvaluations = 0;

  constructor(
    private readonly slope: number,
    private readonly completeness: CompletenessFn,
    private readonly breaks: { points: number[]; scale: number },
  ) {
    this.maxPanel = Number.isFinite(breaks.scale) ? 1.5 * breaks.scale : Infinity;
  }

  /** Start a slice: its nodes decide which of them are negligible in a range. */
  setSlice(nodes: readonly QuadratureNode[]): void {
    let lnSMin = Infinity;
    for (const nd of nodes) if (Number.isFinite(nd.a)) lnSMin = Math.min(lnSMin, (-nd.a * LN10) / this.slope);
    this.lnSMin = lnSMin;
    // Rules are kept from slice to slice and call to call; a limit that keeps moving makes new ones.
    if (this.ruleCount > 4096) {
      this.rules.clear();
      this.ruleCount = 0;
    }
  }

  /** Start the integrals of one redshift node. */
  setNode(nd: QuadratureNode): void {
    this.stamp++;
    this.lnS = (-nd.a * LN10) / this.slope;
    this.s = Math.exp(this.lnS);
    this.components = nd.components;
    let span = 0;
    for (const c of nd.components) span = Math.max(span, Math.abs(c.alpha + 2));
    this.alphaSpan = span;
  }

  /**
   * ∫ phi(u) u^power c du over obs between o1 and o2 (either order) at the current node, in
   * units of phi* (power 0: number density; power 1: luminosity density in units of L*).
   */
  integrate(o1: number, o2: number, power: 0 | 1): number {
    const lo = Math.min(o1, o2);
    const hi = Math.max(o1, o2);
    if (!(hi > lo)) return 0;
    const slope = this.slope;
    // u at the faint and bright ends of the range for this node
    const lnUFaint = ((slope > 0 ? lo : hi) * LN10) / slope;
    const uFaint = Math.exp(lnUFaint + this.lnS);
    // Negligible beside the node with the smallest u (e^-50 of it), or underflowing.
    if (!(uFaint <= 745) || uFaint > Math.exp(lnUFaint + this.lnSMin) + 50) return 0;
    const uBright = Math.exp(((slope > 0 ? hi : lo) * LN10) / slope + this.lnS);
    const lambda = (uBright + this.alphaSpan + 2) * (LN10 / Math.abs(slope));
    const r = this.rule(lo, hi, Math.min(this.maxPanel, 2 / lambda));
    if (r.stamp !== this.stamp) {
      let n = 0;
      let l = 0;
      const comps = this.components;
      const s = this.s;
      const lnS = this.lnS;
      for (let i = 0; i < r.count; i++) {
        const u = r.u[i]! * s;
        const lnu = r.lnU[i]! + lnS;
        let f = 0;
        for (let k = 0; k < comps.length; k++) f += comps[k]!.phiStar * Math.exp((comps[k]!.alpha + 1) * lnu - u);
        const t = r.wc[i]! * f;
        n += t;
        l += t * u;
      }
      this.densityEvaluations += r.count * comps.length;
      r.stamp = this.stamp;
      r.number = n;
      r.luminosity = l;
    }
    return power === 0 ? r.number : r.luminosity;
  }

  private rule(lo: number, hi: number, maxPanel: number): Rule {
    // panels per piece between cuts: a power of two, enough for the whole range
    const need = Math.ceil((hi - lo) / maxPanel);
    let level = 0;
    while (2 ** level < need) level++;
    let byHi = this.rules.get(lo);
    if (!byHi) this.rules.set(lo, (byHi = new Map<number, (Rule | undefined)[]>()));
    let byLevel = byHi.get(hi);
    if (!byLevel) byHi.set(hi, (byLevel = []));
    let r = byLevel[level];
    if (r) return r;
    r = this.makeRule(lo, hi, level);
    byLevel[level] = r;
    this.ruleCount++;
    return r;
  }

  /**
   * A new rule (see rule), a function of its own: \`rule\` is called for every integral and
   * optimised early, and V8 compiles whatever a function reaches, so that this loop, run once
   * per rule, was compiled into it with the completeness curve inlined.
   */
  private makeRule(lo: number, hi: number, level: number): Rule {
    const cuts = [lo];
    for (const p of this.breaks.points) if (p > lo && p < hi) cuts.push(p);
    cuts.push(hi);
    if (!ascending(cuts)) cuts.sort((x, y) => x - y);
    const nSub = 2 ** level;
    const count = (cuts.length - 1) * nSub * POINTS;
    const lnU = new Float64Array(count);
    const u = new Float64Array(count);
    const wc = new Float64Array(count);
    const { nodes, weights } = gaussLegendreRule(POINTS);
    const slope = this.slope;
    const scale = LN10 / Math.abs(slope);
    let k = 0;
    for (let i = 0; i + 1 < cuts.length; i++) {
      const a = cuts[i]!;
      const b = cuts[i + 1]!;
      const h = (b - a) / nSub;
      for (let j = 0; j < nSub; j++) {
        const pa = a + j * h;
        for (let q = 0; q < POINTS; q++, k++) {
          const x = pa + 0.5 * h * (nodes[q]! + 1);
          lnU[k] = (x * LN10) / slope;
          u[k] = Math.exp(lnU[k]!);
          wc[k] = 0.5 * h * weights[q]! * scale * this.completeness(x);
        }
      }
    }
    this.completenessEvaluations += count;
    return { count, lnU, u, wc, stamp: 0, number: 0, luminosity: 0 };
  }
}
