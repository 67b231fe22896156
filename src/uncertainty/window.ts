/**
 * rms linear matter fluctuation in a rectangular box (a survey field's comoving volume).
 *
 *     sigma^2 = ∫ d^3k / (2 pi)^3  P(|k|, z) |W(k)|^2,   W(k) = Π_i sinc(k_i L_i / 2),
 *
 * sides L_i in comoving Mpc, P in Mpc^3 (src/uncertainty/power-spectrum.ts). This is the
 * variance of the mean density contrast in the box (common practice; e.g. Newman & Davis 2002,
 * ApJ 564, 567, and Trenti & Stiavelli 2008, ApJ 676, 767, use the same box window for pencil
 * beams). P depends only on |k|, so the integrand is even in every k_i:
 *
 *     sigma^2 = (1/pi^3) ∫_0^∞∫_0^∞∫_0^∞ P Π sinc^2(k_i L_i / 2) dk
 *             = 8 / (pi^3 V) ∫ d^3u  P(sqrt(Σ (2 u_i / L_i)^2)) Π sinc^2(u_i),   u_i = k_i L_i / 2.
 *
 * Fast method (boxSigma): a product rule built from one 1-D rule per axis for the weight
 * sinc^2(u) on [0, ∞):
 *   - Gauss-Legendre panels on the first lobes [j pi, (j+1) pi] (the first lobe split at pi/4
 *     to resolve the small-u behaviour that the other axes induce), and
 *   - beyond N pi, the averaged weight <sin^2> = 1/2, i.e. ∫ f(u) / (2 u^2) du, integrated in
 *     t = 1/u by Gauss-Legendre on geometric panels (so that features at any large u, such as the
 *     transverse scale seen along a long radial axis, are resolved); the tail weights are rescaled
 *     so that the rule integrates sinc^2 exactly, which removes the leading error -f/(4 (N pi)^3)
 *     of the averaging.
 * The axes are ordered so that the longest side is innermost. Cost: (nodes per axis)^2 times the
 * number of ln K table points, evaluations of P from the interpolation table (the double sum
 * halved when the two shorter sides are equal); a box already computed with the default rules is
 * read back (sigma at z = 0 by spectrum and sides), and the per-axis rules are kept by side; accuracy ~1e-4 against a
 * brute-force reference (a direct triple sum over a much finer tensor product with the exact
 * transfer function, test/reference/generate/box_sigma.py) for cubes, pencils (5 x 5 x 1000 Mpc),
 * slabs and the full (oscillating) form (see test/uncertainty/window.test.ts).
 */
import type { LinearPower } from './power-spectrum.js';
import { lagrangeCubicAt, lagrangeCubics } from '../numerics/interpolate.js';
import { gaussLegendre } from './quadrature.js';

export interface SincRuleOptions {
  /** Number of sinc^2 lobes [j pi, (j+1) pi] integrated explicitly (default 4). */
  lobes?: number;
  /** Gauss-Legendre points per lobe panel (default 6). */
  pointsPerLobe?: number;
  /**
   * Wavenumber (1/Mpc) down to which the first lobe is graded geometrically, u_g = k_g L / 2
   * (default 1e-3, an order of magnitude below the peak of P(k) near k_eq ~ 0.01/Mpc).
   */
  gradeWavenumber?: number;
  /** Ratio of successive graded panels near u = 0 (default 4). */
  gradeRatio?: number;
  /** Gauss-Legendre points per graded panel (default 4). */
  pointsPerGradedPanel?: number;
  /** Number of geometric panels in t = 1/u for the tail (default 3). */
  tailPanels?: number;
  /** Gauss-Legendre points per tail panel (default 4). */
  pointsPerTailPanel?: number;
  /** Ratio between successive tail panels in t (default 4). */
  tailRatio?: number;
}

/** A 1-D rule: ∫_0^∞ sinc^2(u) f(u) du ≈ Σ_j w_j f(u_j). */
export interface SincRule {
  readonly u: Float64Array;
  readonly w: Float64Array;
}

function sinc2(u: number): number {
  if (u < 1e-4) return 1 - (u * u) / 3;
  const s = Math.sin(u) / u;
  return s * s;
}

const tailScaleCache = new Map<number, number>();

/**
 * Ratio of the exact tail weight ∫_U^∞ sinc^2 = pi/2 - Si(2U) (U = N pi, sin U = 0) to the
 * averaged one 1/(2U); ∫_0^U sinc^2 by 30-point Gauss-Legendre per lobe (~1e-15).
 */
function tailScale(lobes: number): number {
  const cached = tailScaleCache.get(lobes);
  if (cached !== undefined) return cached;
  const U = lobes * Math.PI;
  const glHi = gaussLegendre(30);
  let head = 0;
  for (let j = 0; j < lobes; j++) {
    const c = (j + 0.5) * Math.PI;
    for (let i = 0; i < 30; i++) head += glHi.w[i]! * (Math.PI / 2) * sinc2(c + (Math.PI / 2) * glHi.x[i]!);
  }
  const scale = (Math.PI / 2 - head) * 2 * U;
  tailScaleCache.set(lobes, scale);
  return scale;
}

/**
 * The per-axis rule for the weight sinc^2(u) on [0, ∞), for an axis of length lengthMpc
 * (the grading near u = 0 depends on it): graded Gauss-Legendre panels from u = 0 to pi/4,
 * one panel [pi/4, pi], one per further lobe, and the rescaled averaged tail in t = 1/u.
 */
export function sincSquaredRule(lengthMpc: number, options: SincRuleOptions = {}): SincRule {
  const lobes = options.lobes ?? 4;
  const m = options.pointsPerLobe ?? 6;
  const kg = options.gradeWavenumber ?? 1e-3;
  const gradeRatio = options.gradeRatio ?? 4;
  const mg = options.pointsPerGradedPanel ?? 4;
  const tailPanels = options.tailPanels ?? 3;
  const mt = options.pointsPerTailPanel ?? 4;
  const ratio = options.tailRatio ?? 4;
  if (!(lobes >= 1 && m >= 1 && mg >= 1 && tailPanels >= 1 && mt >= 1 && ratio > 1 && gradeRatio > 1 && kg > 0)) {
    throw new RangeError('sincSquaredRule: bad options');
  }
  const us: number[] = [];
  const ws: number[] = [];
  const addPanel = (a: number, b: number, points: number): void => {
    const gl = gaussLegendre(points);
    const c = 0.5 * (a + b);
    const h = 0.5 * (b - a);
    for (let i = 0; i < points; i++) {
      const u = c + h * gl.x[i]!;
      us.push(u);
      ws.push(gl.w[i]! * h * sinc2(u));
    }
  };
  // Graded panels on [0, pi/4]: [0, u_g], then geometric steps of about gradeRatio up to pi/4.
  const quarter = Math.PI / 4;
  const ug = 0.5 * kg * lengthMpc;
  if (ug < quarter / gradeRatio) {
    const nSteps = Math.ceil(Math.log(quarter / ug) / Math.log(gradeRatio));
    const r = (quarter / ug) ** (1 / nSteps);
    addPanel(0, ug, mg);
    let a = ug;
    for (let j = 0; j < nSteps; j++) {
      const b = j === nSteps - 1 ? quarter : a * r;
      addPanel(a, b, mg);
      a = b;
    }
  } else {
    addPanel(0, quarter, m);
  }
  addPanel(quarter, Math.PI, m);
  for (let j = 1; j < lobes; j++) addPanel(j * Math.PI, (j + 1) * Math.PI, m);
  // Tail: ∫_U^∞ f(u) sin^2(u)/u^2 du ≈ c ∫_0^{1/U} f(1/t) / 2 dt, c rescales to the exact weight.
  const U = lobes * Math.PI;
  const scale = tailScale(lobes);
  const glt = gaussLegendre(mt);
  let tHi = 1 / U;
  for (let j = 0; j < tailPanels; j++) {
    const tLo = j === tailPanels - 1 ? 0 : tHi / ratio;
    const c = 0.5 * (tHi + tLo);
    const h = 0.5 * (tHi - tLo);
    for (let i = 0; i < mt; i++) {
      const t = c + h * glt.x[i]!;
      us.push(1 / t);
      ws.push(glt.w[i]! * h * 0.5 * scale);
    }
    tHi = tLo;
  }
  return { u: Float64Array.from(us), w: Float64Array.from(ws) };
}

function checkSides(sides: readonly number[], who: string): [number, number, number] {
  if (sides.length !== 3) throw new RangeError(`${who}: a box needs three sides, got ${sides.length}`);
  for (const l of sides) {
    if (!(l > 0) || !Number.isFinite(l))
      throw new RangeError(`${who}: every box side must be a positive finite length in Mpc, got ${l}`);
  }
  const s = [...sides].sort((a, b) => a - b);
  return [s[0]!, s[1]!, s[2]!];
}

/**
 * rms linear matter fluctuation sigma in a box of sides [lx, ly, lz] (comoving Mpc) at redshift
 * z, for the given linear power spectrum (fast product rule; see the module comment).
 * Example: a 100 Mpc cube at z = 0 in Planck 2018 (no-wiggle) has sigma ≈ 0.1846.
 */
export function boxSigma(
  power: LinearPower,
  z: number,
  sides: readonly [number, number, number] | readonly number[],
  options: SincRuleOptions = {},
): number {
  const [l1, l2, l3] = checkSides(sides, 'boxSigma');
  const d = power.growth(z);
  const plain = Object.keys(options).length === 0;
  let byPower: Map<string, number> | undefined;
  const key = `${l1} ${l2} ${l3}`;
  if (plain) {
    byPower = boxCache.get(power);
    if (!byPower) boxCache.set(power, (byPower = new Map<string, number>()));
    const s0 = byPower.get(key);
    if (s0 !== undefined) return s0 * d;
  }
  const r1 = plain ? cachedRule(l1) : sincSquaredRule(l1, options);
  const r2 = plain ? cachedRule(l2) : sincSquaredRule(l2, options);
  const r3 = plain ? cachedRule(l3) : sincSquaredRule(l3, options);
  const n1 = r1.u.length;
  const n2 = r2.u.length;
  const n3 = r3.u.length;
  const q1 = new Float64Array(n1);
  const q2 = new Float64Array(n2);
  const q3 = new Float64Array(n3);
  for (let i = 0; i < n1; i++) q1[i] = ((2 * r1.u[i]!) / l1) ** 2;
  for (let i = 0; i < n2; i++) q2[i] = ((2 * r2.u[i]!) / l2) ** 2;
  for (let i = 0; i < n3; i++) q3[i] = ((2 * r3.u[i]!) / l3) ** 2;
  // Inner axis (longest side) summed into I(K) = Σ_c w_c P(K^2 + k_c^2), tabulated in ln K.
  const step = power.form === 'full' ? 0.02 : 0.1;
  // the smallest and largest K^2 = q1_a + q2_b (floating-point sums are monotone in each term)
  const lnKMin = 0.5 * Math.log(extreme(q1, -1) + extreme(q2, -1)) - 2 * step;
  const lnKMax = 0.5 * Math.log(extreme(q1, 1) + extreme(q2, 1)) + 2 * step;
  const nTab = Math.max(4, Math.ceil((lnKMax - lnKMin) / step) + 1);
  const lnI = innerTable(power.powerZ0FromK2, q3, r3.w, lnKMin, step, nTab);
  // Two equal sides: the double sum is symmetric in (a, b); each pair off the diagonal twice.
  const total = pairSum(lnI, lnKMin, step, q1, r1.w, q2, r2.w, l1 === l2);
  const sigma0 = Math.sqrt((8 / (Math.PI ** 3 * l1 * l2 * l3)) * total);
  if (byPower) {
    if (byPower.size >= BOX_CACHE_SIZE) byPower.delete(byPower.keys().next().value!);
    byPower.set(key, sigma0);
  }
  return sigma0 * d;
}

/**
 * The tabulated inner sum: ln I(K) at ln K = lnKMin + g step, g < nTab, with
 * I(K) = Σ_c w_c P(K^2 + q_c) (P at z = 0 from the squared wavenumber, q_c = k_c^2).
 * boxSigma's loops are small functions of their own, so that the engine optimises each quickly
 * (one function holding them all took tens of milliseconds to optimise at start-up).
 */
function innerTable(
  p0: (k2: number) => number,
  q3: Float64Array,
  w3: Float64Array,
  lnKMin: number,
  step: number,
  nTab: number,
): Float64Array {
  const lnI = new Float64Array(nTab);
  for (let g = 0; g < nTab; g++) {
    const s = innerSum(p0, Math.exp(2 * (lnKMin + g * step)), q3, w3);
    lnI[g] = s > 0 ? Math.log(s) : Number.NEGATIVE_INFINITY;
  }
  return lnI;
}

/** Σ_c w_c P(k2 + q_c). */
function innerSum(p0: (k2: number) => number, k2: number, q3: Float64Array, w3: Float64Array): number {
  let s = 0;
  for (let c = 0; c < q3.length; c++) s += w3[c]! * p0(k2 + q3[c]!);
  return s;
}

/**
 * I(K) from the table ln I(lnKMin + g step), g <= last + 2, and its 4-point Lagrange cubics, at
 * ln K = 0.5 ln k2: exp of the cubic through the four nearest nodes. (Plain arguments rather than
 * an object holding the table: the engine then never discards its optimised code over a table's
 * fields.)
 */
function innerAt(
  lnI: Float64Array,
  cubics: Float64Array,
  lnKMin: number,
  step: number,
  last: number,
  k2: number,
): number {
  const x = (0.5 * Math.log(k2) - lnKMin) / step;
  let i = Math.floor(x);
  if (i < 1) i = 1;
  if (i > last) i = last;
  const u = x - i;
  if (lnI[i - 1] === Number.NEGATIVE_INFINITY || lnI[i + 2] === Number.NEGATIVE_INFINITY) {
    // a spectrum that underflows to 0 (only synthetic test spectra do): linear in I, no overshoot
    return Math.exp(Math.log((1 - u) * Math.exp(lnI[i]!) + u * Math.exp(lnI[i + 1]!)));
  }
  return Math.exp(lagrangeCubicAt(cubics, i, u));
}

/**
 * The double sum over the two shorter axes, Σ_a Σ_b w1_a w2_b I(q1_a + q2_b), with I tabulated
 * (innerAt); for two equal axes (one rule, q2 = q1) the diagonal once and each pair off it twice.
 */
function pairSum(
  lnI: Float64Array,
  lnKMin: number,
  step: number,
  q1: Float64Array,
  w1: Float64Array,
  q2: Float64Array,
  w2: Float64Array,
  equal: boolean,
): number {
  const cubics = lagrangeCubics(lnI);
  const last = lnI.length - 3;
  let total = 0;
  for (let a = 0; a < q1.length; a++) {
    const qa = q1[a]!;
    if (equal) {
      const diagonal = 0.5 * w1[a]! * innerAt(lnI, cubics, lnKMin, step, last, qa + qa);
      total += 2 * w1[a]! * rowSum(lnI, cubics, lnKMin, step, last, qa, q1, w1, a + 1, diagonal);
    } else total += w1[a]! * rowSum(lnI, cubics, lnKMin, step, last, qa, q2, w2, 0, 0);
  }
  return total;
}

/** s0 + Σ_{b >= from} w_b I(qa + q_b). */
function rowSum(
  lnI: Float64Array,
  cubics: Float64Array,
  lnKMin: number,
  step: number,
  last: number,
  qa: number,
  q: Float64Array,
  w: Float64Array,
  from: number,
  s0: number,
): number {
  let sb = s0;
  for (let b = from; b < q.length; b++) sb += w[b]! * innerAt(lnI, cubics, lnKMin, step, last, qa + q[b]!);
  return sb;
}

/** The largest (sign 1) or smallest (sign -1) element. */
function extreme(q: Float64Array, sign: 1 | -1): number {
  let m = q[0]!;
  for (let a = 1; a < q.length; a++) if (sign * (q[a]! - m) > 0) m = q[a]!;
  return m;
}

/** sigma at z = 0 of boxes already computed with the default rules, by spectrum and sorted sides. */
const boxCache = new WeakMap<LinearPower, Map<string, number>>();
const BOX_CACHE_SIZE = 512;
/** Per-axis rules with the default options, by side length. */
const ruleCache = new Map<number, SincRule>();

function cachedRule(lengthMpc: number): SincRule {
  let r = ruleCache.get(lengthMpc);
  if (!r) {
    if (ruleCache.size >= BOX_CACHE_SIZE) ruleCache.delete(ruleCache.keys().next().value!);
    ruleCache.set(lengthMpc, (r = sincSquaredRule(lengthMpc)));
  }
  return r;
}

/**
 * sigma for the spherical top-hat of radius rMpc (for comparison with boxes); the same as
 * power.sigmaR(rMpc, z).
 */
export function sphereSigma(power: LinearPower, z: number, rMpc: number): number {
  return power.sigmaR(rMpc, z);
}

/** Radius of the sphere with the volume of the box (Mpc). */
export function equalVolumeRadiusMpc(sides: readonly number[]): number {
  const [a, b, c] = checkSides(sides, 'equalVolumeRadiusMpc');
  return Math.cbrt((3 * a * b * c) / (4 * Math.PI));
}
