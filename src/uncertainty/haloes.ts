/**
 * Dark-matter haloes: Sheth & Tormen mass function and bias, and abundance matching.
 *
 * Peak height convention: nu = delta_c / sigma(M, z) (NOT its square, which is what Sheth &
 * Tormen 1999 call nu), delta_c = 1.686 (Press & Schechter 1974; common practice), sigma from the
 * linear power spectrum (src/uncertainty/power-spectrum.ts) with the top-hat window of the
 * comoving radius enclosing M at the mean matter density.
 *
 * Multiplicity (Sheth & Tormen 1999, MNRAS 308, 119, eq. 10, rewritten for nu = delta_c/sigma):
 *     f(nu) = A sqrt(2a/pi) [1 + (a nu^2)^-p] exp(-a nu^2 / 2),   A = 0.3222, a = 0.707, p = 0.3,
 * the fraction of mass in haloes per unit nu (∫_0^∞ f dnu = 1 to 1e-4 with the rounded A).
 * Mass function: dn/dln M = (rho_m0 / M) f(nu) nu |d ln sigma / d ln M|   [comoving Mpc^-3].
 * Bias (Sheth, Mo & Tormen 2001, MNRAS 323, 1, eq. 8 with their c = 0; the peak-background split
 * of the same f, Sheth & Tormen 1999 eq. 12 with their nu = our nu^2):
 *     b(nu) = 1 + (a nu^2 - 1) / delta_c + 2p / (delta_c (1 + (a nu^2)^p)).
 *
 * Abundance matching (Trenti & Stiavelli 2008, ApJ 676, 767): galaxies of comoving density n_g
 * live in the most massive haloes, a fraction `occupation` of haloes above M_min hosting one:
 * n(> M_min) = n_g / occupation; the galaxies' bias is the abundance-weighted mean halo bias above
 * M_min. M_min is searched between 1e6 Msun (below the atomic-cooling scale, where the fit is
 * untested) and 1e16 Msun (above the most massive clusters known).
 *
 * Numerics: ln sigma(M, z=0) is tabulated on a uniform grid in ln M (1e3 .. 1e19 Msun, step 0.5)
 * and interpolated with a natural cubic spline, whose derivative gives d ln sigma / d ln M
 * (relative error < 1e-5 against finite differences of the direct integral); this table is made
 * once per cosmology (createLinearPower returns the same spectrum for the same parameters).
 *
 * n(>M) and the bias-weighted integral, for masses from 1e3 to 1e16 Msun: per growth factor D(z)
 * (kept for the last 64 redshifts of a cosmology), the cumulative integrals from each knot of the
 * spline up to the top of the table, summed from the top down (so that the small abundances of
 * massive haloes keep their relative accuracy) and made lazily down to the lowest mass asked for.
 * Between two knots the integrand is analytic, and it is integrated by 8-point Gauss-Legendre
 * panels no wider than 1.5 / lambda, lambda = 1 + a nu^2 |d ln sigma / d ln M| being its
 * logarithmic steepness (relative error below 1e-13 per knot interval against adaptive
 * quadrature). The top is where an interval above 1e16 Msun adds less than 1e-17 of what lies
 * above 1e16 Msun. n(>M) at any M is the cumulative at the next knot plus the piece up to it.
 * Abundance matching brackets the mass between two knots from the cumulative table and solves
 * within the interval by Newton's method on ln n(>M) (the derivative is -dn/dln M / n), each step
 * integrating only the piece from the iterate to the knot; it stops below 1e-12 in ln M.
 * Masses outside 1e3 .. 1e16 Msun use 8-point Gauss-Legendre panels of width 0.25 in ln M from M
 * upwards, stopping once a panel adds less than 1e-13 of the running total. matcherAt's sums take
 * ln sigma(M, 0) at their nodes from a table made once, so that (a nu^2)^-p and e^(-a nu^2 / 2)
 * cost two exponentials per node, and leave out the nodes where e^(-a nu^2 / 2) underflows to 0.
 */
import type { LinearPower } from './power-spectrum.js';
import {
  brentRoot,
  gaussLegendre,
  splineDerivative,
  splineEval,
  uniformSpline,
  type UniformSpline,
} from './quadrature.js';
import { powerKey, storedLnSigmaM } from './stored-tables.js';

export const SHETH_TORMEN = { A: 0.3222, a: 0.707, p: 0.3 } as const;
/** Critical linear overdensity for spherical collapse (Press & Schechter 1974; common practice). */
export const DELTA_C = 1.686;
/** Bounds of the abundance-matching search, Msun. */
export const MATCH_MASS_MIN_MSUN = 1e6;
export const MATCH_MASS_MAX_MSUN = 1e16;

const LN_M_TABLE_MIN = Math.log(1e3);
const LN_M_TABLE_MAX = Math.log(1e19);
const LN_M_TABLE_STEP = 0.5;
const PANEL = 0.25;

/** Sheth & Tormen 1999 multiplicity f(nu) per unit nu, nu = delta_c / sigma. */
export function shethTormenMultiplicity(nu: number): number {
  if (!(nu > 0)) return 0;
  const { A, a, p } = SHETH_TORMEN;
  const anu2 = a * nu * nu;
  return A * Math.sqrt((2 * a) / Math.PI) * (1 + anu2 ** -p) * Math.exp(-0.5 * anu2);
}

/** Sheth, Mo & Tormen 2001 / Sheth & Tormen 1999 large-scale halo bias b(nu), nu = delta_c / sigma. */
export function shethTormenBias(nu: number): number {
  const { a, p } = SHETH_TORMEN;
  const anu2 = a * nu * nu;
  return 1 + (anu2 - 1) / DELTA_C + (2 * p) / (DELTA_C * (1 + anu2 ** p));
}

export interface HaloMatch {
  /** Minimum mass of the haloes that host the galaxies, Msun. */
  haloMassMinMsun: number;
  /** Abundance-weighted mean Sheth-Tormen bias of haloes above that mass. */
  bias: number;
}

export interface HaloModel {
  readonly power: LinearPower;
  /** sigma(M, z) from the table (Msun). */
  sigma(massMsun: number, z: number): number;
  /** Peak height nu = delta_c / sigma(M, z). */
  peakHeight(massMsun: number, z: number): number;
  /** dn/dln M in comoving Mpc^-3. */
  massFunctionPerLnM(massMsun: number, z: number): number;
  /** ∫_M^∞ dn/dM dM, comoving Mpc^-3. */
  haloDensityAboveMpc3(massMsun: number, z: number): number;
  /**
   * Whether haloDensityAboveMpc3(massMsun, z) reaches densityMpc3 (is at least it with orEqual,
   * above it without): the same answer, with the abundance tables summed down only as far as
   * that needs.
   */
  densityAboveReaches(massMsun: number, z: number, densityMpc3: number, orEqual: boolean): boolean;
  /** Sheth-Tormen bias of haloes of mass M at z. */
  haloBias(massMsun: number, z: number): number;
  /** Abundance-weighted mean bias of haloes above M at z. */
  effectiveBiasAbove(massMsun: number, z: number): number;
  /**
   * Abundance matching: M_min with haloDensityAboveMpc3(M_min, z) = densityMpc3 / occupation, and
   * the effective bias above it. Throws an Error when the density cannot be matched between
   * 1e6 and 1e16 Msun.
   */
  matchHaloMass(densityMpc3: number, z: number, occupation: number): HaloMatch;
  /**
   * Abundance matching at one redshift for many densities: n(>M) and the bias-weighted integral
   * tabulated once on 0.25-wide panels in ln M from 1e6 Msun up (8-point Gauss-Legendre each, as
   * haloDensityAboveMpc3), then each match solves inside one panel. The returned function gives the
   * match for a halo density (galaxy density / occupation), or the bound it is held at
   * (`held`: 'min' when the density exceeds that of all haloes above 1e6 Msun, 'max' when it is
   * below that of haloes above 1e16 Msun). Agrees with matchHaloMass to ~1e-9. `massForBias` is
   * the inverse of effectiveBiasAbove on the same table: the mass whose haloes above it have the
   * given effective bias, undefined outside what masses from 1e6 to 1e16 Msun give.
   */
  matcherAt(z: number): {
    match(haloDensityMpc3: number): HaloMatch & { held?: 'min' | 'max' };
    massForBias(bias: number): number | undefined;
  };
}

function checkMass(m: number, who: string): void {
  if (!(m > 0) || !Number.isFinite(m))
    throw new RangeError(`${who}: halo mass must be a positive finite number of Msun, got ${m}`);
}
function checkZ(z: number, who: string): void {
  if (!(z >= 0) || !Number.isFinite(z)) throw new RangeError(`${who}: redshift must be finite and >= 0, got ${z}`);
}

const modelCache = new WeakMap<LinearPower, HaloModel>();

/** Highest mass of the cumulative tables, Msun (the matching bound). */
const LN_M_CUMULATIVE_MAX = Math.log(MATCH_MASS_MAX_MSUN);
/** Growth factors whose cumulative tables a model keeps. */
const CUMULATIVE_CACHE_SIZE = 64;
/** Matches a matcherAt keeps (by density), so that asking again costs a look-up. */
const MATCHES_KEPT = 64;
/** Gauss-Legendre points per panel of the cumulative tables. */
const CUMULATIVE_RULE = 8;

/** Cumulative abundance integrals of one growth factor, from knot j to the top (index top). */
interface Cumulative {
  /** n[j] = ∫_{x_j}^{x_top} dn/dln M dln M, valid for j >= lowest. */
  readonly n: Float64Array;
  /** nb[j] = the same integral weighted by the halo bias. */
  readonly nb: Float64Array;
  lowest: number;
  top: number;
}

/** Where haloIntegrand leaves the peak height, the halo bias and the steepness, and the sums of panelSums and pieceSums. */
const NU = 0;
const BIAS = 1;
const STEEPNESS = 2;
const SUM_N = 3;
const SUM_NB = 4;
const SCRATCH_SIZE = 5;
const { A: ST_A, a: ST_a, p: ST_p } = SHETH_TORMEN;
/** f's normalisation A sqrt(2 a / pi). */
const F_NORM = ST_A * Math.sqrt((2 * ST_a) / Math.PI);

/*
 * The halo model's loops are small functions of their own (not closures of createHaloModel), so
 * that the engine optimises each quickly at start-up; they leave their by-products in a scratch
 * array rather than in variables of a closure.
 */

/**
 * dn/dln M at ln M for growth d (comoving Mpc^-3), with ln sigma(M, 0) and its slope from the
 * spline; in out: the peak height nu, the Sheth-Tormen bias and the steepness
 * 1 + a nu^2 |d ln sigma / d ln M| (see the module comment).
 */
function haloIntegrand(s: UniformSpline, rho: number, lnM: number, d: number, out: Float64Array): number {
  const last = s.y.length - 2;
  let i = Math.floor((lnM - s.x0) / s.dx);
  if (i < 0) i = 0;
  if (i > last) i = last;
  const t = (lnM - (s.x0 + i * s.dx)) / s.dx;
  const u = 1 - t;
  const yi = s.y[i]!;
  const yj = s.y[i + 1]!;
  const mi = s.m[i]!;
  const mj = s.m[i + 1]!;
  const lnSigma = u * yi + t * yj + ((u * u * u - u) * mi + (t * t * t - t) * mj) * ((s.dx * s.dx) / 6);
  const slope = -((yj - yi) / s.dx + (-(3 * u * u - 1) * mi + (3 * t * t - 1) * mj) * (s.dx / 6)); // -d ln sigma / d ln M
  const nu = DELTA_C / (Math.exp(lnSigma) * d);
  out[NU] = nu;
  if (!(nu > 0)) {
    out[BIAS] = 1;
    out[STEEPNESS] = 1;
    return 0;
  }
  const anu2 = ST_a * nu * nu;
  const q = anu2 ** -ST_p;
  out[BIAS] = 1 + (anu2 - 1) / DELTA_C + (2 * ST_p * q) / (DELTA_C * (q + 1));
  out[STEEPNESS] = 1 + anu2 * slope;
  return (rho / Math.exp(lnM)) * F_NORM * (1 + q) * Math.exp(-0.5 * anu2) * nu * slope;
}

/** ∫_lo^hi dn/dlnM (1, b) dln M by one 8-point Gauss-Legendre panel, into out[SUM_N], out[SUM_NB]. */
function panelSums(s: UniformSpline, rho: number, lo: number, hi: number, d: number, out: Float64Array): void {
  const { x, w } = gaussLegendre(8);
  const c = 0.5 * (lo + hi);
  const h = 0.5 * (hi - lo);
  let n = 0;
  let nb = 0;
  for (let i = 0; i < 8; i++) {
    const g = haloIntegrand(s, rho, c + h * x[i]!, d, out);
    n += w[i]! * g;
    nb += w[i]! * g * out[BIAS]!;
  }
  out[SUM_N] = n * h;
  out[SUM_NB] = nb * h;
}

/**
 * The same integrals within one knot interval [lo, hi]: panels no wider than 1.5 / steepness (the
 * steepness grows with M, so it is taken at hi), into out[SUM_N], out[SUM_NB].
 */
function pieceSums(s: UniformSpline, rho: number, lo: number, hi: number, d: number, out: Float64Array): void {
  let sumN = 0;
  let sumNb = 0;
  if (hi > lo) {
    const gHi = haloIntegrand(s, rho, hi, d, out);
    const panels = Math.max(1, Math.ceil(((hi - lo) * Math.max(1, out[STEEPNESS]!)) / 1.5));
    if (!(gHi >= 0))
      throw new Error(`halo abundance: the mass function is not finite at ${Math.exp(hi).toExponential(3)} Msun`);
    const { x, w } = gaussLegendre(CUMULATIVE_RULE);
    const h = (hi - lo) / panels;
    for (let k = 0; k < panels; k++) {
      const c = lo + (k + 0.5) * h;
      let pn = 0;
      let pb = 0;
      for (let i = 0; i < CUMULATIVE_RULE; i++) {
        const g = haloIntegrand(s, rho, c + 0.5 * h * x[i]!, d, out);
        pn += w[i]! * g;
        pb += w[i]! * g * out[BIAS]!;
      }
      sumN += 0.5 * h * pn;
      sumNb += 0.5 * h * pb;
    }
  }
  out[SUM_N] = sumN;
  out[SUM_NB] = sumNb;
}

/**
 * matcherAt's cumulative sums from panel `from` - 1 down to panel `to`: cumN[i] = cumN[i + 1] plus
 * panel i's nodes (cumB the same weighted by the bias), stopping early at the first panel whose
 * cumN reaches `target`; returns the last panel summed. ln(a nu^2) = ln a + 2 (ln delta_c -
 * ln sigma0 - ln d) = lnAD - 2 ln sigma0: (a nu^2)^-p and e^(-a nu^2 / 2) by two exponentials;
 * where the latter underflows (a nu^2 / 2 > 746) a node adds exactly 0.
 */
function sumPanelsDown(
  nodes: { sigma0: Float64Array; lnSigma0: Float64Array; weight: Float64Array },
  lnAD: number,
  d: number,
  from: number,
  to: number,
  cumN: Float64Array,
  cumB: Float64Array,
  target: number,
): number {
  for (let i = from - 1; i >= to; i--) {
    let pn = 0;
    let pb = 0;
    for (let k = 8 * i; k < 8 * i + 8; k++) {
      const lnAnu2 = lnAD - 2 * nodes.lnSigma0[k]!;
      const anu2 = Math.exp(lnAnu2);
      if (!(anu2 <= 1492)) continue;
      const nu = DELTA_C / (nodes.sigma0[k]! * d);
      const q = Math.exp(-ST_p * lnAnu2);
      const n = nodes.weight[k]! * F_NORM * (1 + q) * Math.exp(-0.5 * anu2) * nu;
      pn += n;
      pb += n * (1 + (anu2 - 1) / DELTA_C + (2 * ST_p * q) / (DELTA_C * (q + 1)));
    }
    cumN[i] = cumN[i + 1]! + pn;
    cumB[i] = cumB[i + 1]! + pb;
    if (cumN[i]! >= target) return i;
  }
  return to;
}

/** ln sigma(M, z = 0) at the knots of the halo model's spline (1e3 .. 1e19 Msun, 0.5 apart in ln M). */
export function computeLnSigmaTable(power: LinearPower): Float64Array {
  const n = Math.round((LN_M_TABLE_MAX - LN_M_TABLE_MIN) / LN_M_TABLE_STEP) + 1;
  const y = new Float64Array(n);
  for (let i = 0; i < n; i++) y[i] = Math.log(power.sigmaM(Math.exp(LN_M_TABLE_MIN + i * LN_M_TABLE_STEP), 0));
  return y;
}

/** Build (or reuse) the halo model of one linear power spectrum. */
export function createHaloModel(power: LinearPower): HaloModel {
  const cached = modelCache.get(power);
  if (cached) return cached;
  let table: UniformSpline | undefined;
  const spline = (): UniformSpline => {
    if (table) return table;
    // stored for the common cosmologies (the same numbers, made by the same code), else made here
    const y = storedLnSigmaM(powerKey(power.cosmology, power.form)) ?? computeLnSigmaTable(power);
    table = uniformSpline(LN_M_TABLE_MIN, LN_M_TABLE_STEP, y);
    return table;
  };
  const rho = power.rhoM0MsunMpc3;

  // One evaluation of the integrand at ln M for growth d: dn/dln M (returned), and in `scratch`
  // the peak height, the halo bias and the steepness (haloIntegrand).
  const scratch = new Float64Array(SCRATCH_SIZE);
  const integrand = (lnM: number, d: number): number => haloIntegrand(spline(), rho, lnM, d, scratch);
  /** dn/dln M and the peak height at ln M for growth d. */
  const perLnM = (lnM: number, d: number): { n: number; nu: number } => {
    const n = integrand(lnM, d);
    return { n, nu: scratch[NU]! };
  };

  /** ∫_{ln M}^∞ dn/dlnM (1, b) dln M by panels of width 0.25 from ln M up (masses off the tables). */
  const above = (lnM0: number, d: number): { n: number; nb: number } => {
    const { x, w } = gaussLegendre(8);
    let n = 0;
    let nb = 0;
    for (let lo = lnM0; lo < LN_M_TABLE_MAX; lo += PANEL) {
      const hi = Math.min(lo + PANEL, LN_M_TABLE_MAX);
      const c = 0.5 * (lo + hi);
      const h = 0.5 * (hi - lo);
      let pn = 0;
      let pb = 0;
      for (let i = 0; i < 8; i++) {
        const r = integrand(c + h * x[i]!, d);
        pn += w[i]! * r;
        pb += w[i]! * r * shethTormenBias(scratch[NU]!);
      }
      n += pn * h;
      nb += pb * h;
      if (pn * h <= 1e-13 * n || (n === 0 && pn === 0)) break;
    }
    return { n, nb };
  };

  /** ∫_a^b dn/dlnM (1, b) dln M by one 8-point Gauss-Legendre panel (b - a <= PANEL). */
  const panel = (a: number, b: number, d: number): { n: number; nb: number } => {
    panelSums(spline(), rho, a, b, d, scratch);
    return { n: scratch[SUM_N]!, nb: scratch[SUM_NB]! };
  };

  /**
   * The panels of matcherAt (0.25 wide in ln M from 1e6 Msun to the table's top) and, at their
   * 8-point Gauss-Legendre nodes, sigma(M, 0) and the weight (rho / M) |d ln sigma / d ln M| times
   * the panel's quadrature weight: dn/dlnM = weight f(nu) nu, nu = delta_c / (sigma d).
   */
  let grid:
    { edges: number[]; nodes: { sigma0: Float64Array; lnSigma0: Float64Array; weight: Float64Array } } | undefined;
  const matchGrid = () => {
    if (grid) return grid;
    const edges: number[] = [];
    for (let e = Math.log(MATCH_MASS_MIN_MSUN); e < LN_M_TABLE_MAX; e += PANEL) edges.push(e);
    edges.push(LN_M_TABLE_MAX);
    const m = edges.length - 1;
    const sigma0 = new Float64Array(8 * m);
    const lnSigma0 = new Float64Array(8 * m);
    const weight = new Float64Array(8 * m);
    const { x, w } = gaussLegendre(8);
    const s = spline();
    for (let i = 0; i < m; i++) {
      const c = 0.5 * (edges[i]! + edges[i + 1]!);
      const h = 0.5 * (edges[i + 1]! - edges[i]!);
      for (let k = 0; k < 8; k++) {
        const lnM = c + h * x[k]!;
        lnSigma0[8 * i + k] = splineEval(s, lnM);
        sigma0[8 * i + k] = Math.exp(lnSigma0[8 * i + k]!);
        weight[8 * i + k] = w[k]! * h * (rho / Math.exp(lnM)) * -splineDerivative(s, lnM);
      }
    }
    grid = { edges, nodes: { sigma0, lnSigma0, weight } };
    return grid;
  };

  // Piece integrals within one knot interval (pieceSums), left in pieceN and pieceNb.
  let pieceN = 0;
  let pieceNb = 0;
  const piece = (lo: number, hi: number, d: number): void => {
    pieceSums(spline(), rho, lo, hi, d, scratch);
    pieceN = scratch[SUM_N]!;
    pieceNb = scratch[SUM_NB]!;
  };

  const knotCount = Math.round((LN_M_TABLE_MAX - LN_M_TABLE_MIN) / LN_M_TABLE_STEP) + 1;
  /** Cut points of the cumulative tables: the spline's knots, the last one moved to the table's top. */
  const cut = (j: number): number => (j >= knotCount - 1 ? LN_M_TABLE_MAX : LN_M_TABLE_MIN + j * LN_M_TABLE_STEP);
  const jMatchMax = Math.floor((LN_M_CUMULATIVE_MAX - LN_M_TABLE_MIN) / LN_M_TABLE_STEP);
  const cumulatives = new Map<number, Cumulative>();

  /** The cumulative table of growth d, made down to knot `down` at least. */
  const cumulative = (d: number, down: number): Cumulative => {
    let c = cumulatives.get(d);
    if (!c) {
      const n = new Float64Array(knotCount);
      const nb = new Float64Array(knotCount);
      // From the interval holding 1e16 Msun upwards until an interval adds < 1e-17 of the sum.
      const pieces: [number, number][] = [];
      let sum = 0;
      let top = jMatchMax;
      while (top < knotCount - 1) {
        piece(cut(top), cut(top + 1), d);
        pieces.push([pieceN, pieceNb]);
        sum += pieceN;
        top++;
        if (pieceN <= 1e-17 * sum) break;
      }
      for (let j = top - 1; j >= jMatchMax; j--) {
        const [pn, pb] = pieces[j - jMatchMax]!;
        n[j] = n[j + 1]! + pn;
        nb[j] = nb[j + 1]! + pb;
      }
      c = { n, nb, lowest: jMatchMax, top };
      cumulatives.set(d, c);
      if (cumulatives.size > CUMULATIVE_CACHE_SIZE) cumulatives.delete(cumulatives.keys().next().value!);
    }
    while (c.lowest > down) {
      const j = c.lowest - 1;
      piece(cut(j), cut(j + 1), d);
      c.n[j] = c.n[j + 1]! + pieceN;
      c.nb[j] = c.nb[j + 1]! + pieceNb;
      c.lowest = j;
    }
    return c;
  };

  /** Knot interval holding ln M (for masses on the tables). */
  const knotBelow = (lnM: number): number => Math.min(jMatchMax, Math.floor((lnM - LN_M_TABLE_MIN) / LN_M_TABLE_STEP));
  const onTables = (lnM: number): boolean => lnM >= LN_M_TABLE_MIN && lnM <= LN_M_CUMULATIVE_MAX;

  /**
   * ∫_{ln M}^∞ dn/dlnM (1, b) dln M: from the tables where they reach, by panels otherwise. The
   * last answer is kept (a match asks for the bounds' abundances after its caller did).
   */
  let lastAbove: { lnM: number; d: number; n: number; nb: number } | undefined;
  const aboveFast = (lnM: number, d: number): { n: number; nb: number } => {
    if (lastAbove && lastAbove.lnM === lnM && lastAbove.d === d) return { n: lastAbove.n, nb: lastAbove.nb };
    const r = aboveUncached(lnM, d);
    lastAbove = { lnM, d, n: r.n, nb: r.nb };
    return r;
  };
  const aboveUncached = (lnM: number, d: number): { n: number; nb: number } => {
    if (!onTables(lnM)) return above(lnM, d);
    const j = knotBelow(lnM);
    const c = cumulative(d, j);
    if (j + 1 >= c.top) {
      piece(lnM, cut(c.top), d);
      return { n: pieceN, nb: pieceNb };
    }
    piece(lnM, cut(j + 1), d);
    return { n: c.n[j + 1]! + pieceN, nb: c.nb[j + 1]! + pieceNb };
  };

  /**
   * Whether n(>M) (aboveFast) reaches target: n >= target with orEqual, n > target without. n(>M)
   * is the cumulative at the knot above M plus a piece, and the cumulative only grows as the
   * tables are summed down (every piece is a sum of non-negative terms), so once the cumulative
   * at a knot above M reaches the target the answer is known without summing further down;
   * otherwise n(>M) itself decides.
   */
  const reaches = (lnM: number, d: number, target: number, orEqual: boolean): boolean => {
    const hit = (n: number): boolean => (orEqual ? n >= target : n > target);
    if (onTables(lnM)) {
      const j = knotBelow(lnM);
      const c = cumulative(d, jMatchMax);
      if (j + 1 < c.top) {
        for (let k = Math.max(c.lowest, j + 1); ; k--) {
          if (k < c.lowest) cumulative(d, k);
          if (hit(c.n[k]!)) return true;
          if (k === j + 1) break;
        }
      }
    }
    return hit(aboveFast(lnM, d).n);
  };

  /** ln M in [1e6, 1e16] Msun where n(>M) = target (known to lie between the two bounds' abundances). */
  const solveMass = (target: number, d: number, lnLo: number, lnHi: number): { lnM: number; n: number; nb: number } => {
    // Bracket between knots: the highest knot j with n[j] >= target (the tables fall with j).
    let j = knotBelow(lnHi);
    let c = cumulative(d, j);
    const jLo = knotBelow(lnLo);
    while (j > jLo && c.n[j]! < target) {
      j--;
      c = cumulative(d, j);
    }
    const lo = Math.max(cut(j), lnLo);
    const hi = Math.min(cut(j + 1), lnHi, cut(c.top));
    const tail = j + 1 < c.top ? c.n[j + 1]! : 0;
    const tailB = j + 1 < c.top ? c.nb[j + 1]! : 0;
    const hiEdge = j + 1 < c.top ? cut(j + 1) : cut(c.top);
    const at = (lnM: number): { n: number; nb: number } => {
      piece(lnM, hiEdge, d);
      return { n: tail + pieceN, nb: tailB + pieceNb };
    };
    // Newton on ln n(>M) - ln target, safeguarded by bisection inside [lo, hi].
    let bLo = lo;
    let bHi = hi;
    let x = 0.5 * (lo + hi);
    const nLo = at(lo).n;
    const nHi = hi < hiEdge ? at(hi).n : tail;
    if (nLo > 0 && nHi > 0) {
      // first guess: ln n linear between the bracket's ends
      const f = (Math.log(target) - Math.log(nLo)) / (Math.log(nHi) - Math.log(nLo));
      if (f > 0 && f < 1) x = lo + f * (hi - lo);
    }
    const lnTarget = Math.log(target);
    for (let iter = 0; iter < 60; iter++) {
      const r = at(x);
      const g = integrand(x, d);
      if (r.n > target) bLo = x;
      else if (r.n < target) bHi = x;
      const step = r.n > 0 && g > 0 ? ((Math.log(r.n) - lnTarget) * r.n) / g : NaN;
      if (Math.abs(step) <= 1e-12) {
        const s = at(x + step);
        return { lnM: x + step, n: s.n, nb: s.nb };
      }
      let next = x + step;
      if (!(next > bLo && next < bHi)) next = 0.5 * (bLo + bHi);
      if (bHi - bLo <= 1e-12) return { lnM: x, n: r.n, nb: r.nb };
      x = next;
    }
    const s = at(x);
    return { lnM: x, n: s.n, nb: s.nb };
  };

  const model: HaloModel = {
    power,
    sigma(massMsun, z) {
      checkMass(massMsun, 'sigma');
      checkZ(z, 'sigma');
      return Math.exp(splineEval(spline(), Math.log(massMsun))) * power.growth(z);
    },
    peakHeight(massMsun, z) {
      return DELTA_C / model.sigma(massMsun, z);
    },
    massFunctionPerLnM(massMsun, z) {
      checkMass(massMsun, 'massFunctionPerLnM');
      checkZ(z, 'massFunctionPerLnM');
      return perLnM(Math.log(massMsun), power.growth(z)).n;
    },
    haloDensityAboveMpc3(massMsun, z) {
      checkMass(massMsun, 'haloDensityAboveMpc3');
      checkZ(z, 'haloDensityAboveMpc3');
      return aboveFast(Math.log(massMsun), power.growth(z)).n;
    },
    densityAboveReaches(massMsun, z, densityMpc3, orEqual) {
      checkMass(massMsun, 'densityAboveReaches');
      checkZ(z, 'densityAboveReaches');
      return reaches(Math.log(massMsun), power.growth(z), densityMpc3, orEqual);
    },
    haloBias(massMsun, z) {
      return shethTormenBias(model.peakHeight(massMsun, z));
    },
    effectiveBiasAbove(massMsun, z) {
      checkMass(massMsun, 'effectiveBiasAbove');
      checkZ(z, 'effectiveBiasAbove');
      const r = aboveFast(Math.log(massMsun), power.growth(z));
      if (!(r.n > 0)) {
        throw new Error(
          `effectiveBiasAbove: no haloes above ${massMsun.toExponential(3)} Msun at z = ${z} in this cosmology; choose a lower mass`,
        );
      }
      return r.nb / r.n;
    },
    matchHaloMass(densityMpc3, z, occupation) {
      checkZ(z, 'matchHaloMass');
      if (!(densityMpc3 > 0) || !Number.isFinite(densityMpc3)) {
        throw new RangeError(
          `matchHaloMass: galaxy density must be a positive finite number per Mpc^3, got ${densityMpc3}`,
        );
      }
      if (!(occupation > 0 && occupation <= 1)) {
        throw new RangeError(`matchHaloMass: occupation must be in (0, 1], got ${occupation}`);
      }
      const target = densityMpc3 / occupation;
      const d = power.growth(z);
      const lnLo = Math.log(MATCH_MASS_MIN_MSUN);
      const lnHi = Math.log(MATCH_MASS_MAX_MSUN);
      if (!reaches(lnLo, d, target, true)) {
        const nLo = aboveFast(lnLo, d).n;
        throw new Error(
          `halo abundance matching at z = ${z}: the required halo density ${target.toExponential(3)} Mpc^-3 ` +
            `(galaxy density / occupation) exceeds the ${nLo.toExponential(3)} Mpc^-3 of all haloes above ` +
            `${MATCH_MASS_MIN_MSUN.toExponential(0)} Msun; lower the galaxy density or raise the occupation, or give the bias directly`,
        );
      }
      const nHi = aboveFast(lnHi, d).n;
      if (target < nHi) {
        throw new Error(
          `halo abundance matching at z = ${z}: the required halo density ${target.toExponential(3)} Mpc^-3 ` +
            `is below the ${nHi.toExponential(3)} Mpc^-3 of haloes above ${MATCH_MASS_MAX_MSUN.toExponential(0)} Msun; ` +
            `the population is too rare to match, give the bias directly`,
        );
      }
      const r = solveMass(target, d, lnLo, lnHi);
      return { haloMassMinMsun: Math.exp(r.lnM), bias: r.nb / r.n };
    },
    matcherAt(z) {
      checkZ(z, 'matcherAt');
      const d = power.growth(z);
      const lnLo = Math.log(MATCH_MASS_MIN_MSUN);
      const lnHi = Math.log(MATCH_MASS_MAX_MSUN);
      const { edges, nodes } = matchGrid();
      const m = edges.length - 1;
      // Cumulative sums from the top down; at the grid's nodes only the peak height depends on z.
      // Summed down only as far as a question needs (a match stops at the panel holding its
      // density): the same sums in the same order as the whole table.
      const cumN = new Float64Array(m + 1);
      const cumB = new Float64Array(m + 1);
      let summed = m;
      // ln(a nu^2) = ln a + 2 (ln delta_c - ln sigma0 - ln d): (a nu^2)^-p and e^(-a nu^2 / 2) by
      // two exponentials; where the latter underflows (a nu^2 / 2 > 746) a node adds exactly 0
      const lnAD = Math.log(ST_a) + 2 * (Math.log(DELTA_C) - Math.log(d));
      const sumDownTo = (j: number): void => {
        if (j < summed) summed = sumPanelsDown(nodes, lnAD, d, summed, j, cumN, cumB, Infinity);
      };
      /** n(>M) and nb(>M) at ln M inside panel i. */
      const at = (lnM: number, i: number): { n: number; nb: number } => {
        const r = lnM < edges[i + 1]! ? panel(lnM, edges[i + 1]!, d) : { n: 0, nb: 0 };
        return { n: cumN[i + 1]! + r.n, nb: cumB[i + 1]! + r.nb };
      };
      const panelOf = (lnM: number) => Math.min(m - 1, Math.max(0, Math.floor((lnM - lnLo) / PANEL)));
      sumDownTo(Math.min(m, panelOf(lnHi) + 1));
      const top = at(lnHi, panelOf(lnHi));
      // The matches made (a prediction asks the same densities again when repeated: a warm predict)
      const made = new Map<number, HaloMatch & { held?: 'min' | 'max' }>();
      const match = (target: number): HaloMatch & { held?: 'min' | 'max' } => {
        const known = made.get(target);
        if (known) return { ...known };
        const m = solve(target);
        if (made.size >= MATCHES_KEPT) made.clear();
        made.set(target, m);
        return { ...m };
      };
      const solve = (target: number): HaloMatch & { held?: 'min' | 'max' } => {
        if (!(target > 0) || !Number.isFinite(target))
          throw new RangeError(`matcherAt: halo density must be a positive finite number per Mpc^3, got ${target}`);
        // the panel whose cumulative range holds the target: cumN[i] >= target > cumN[i + 1]
        // (the largest such i; cumN grows as i falls), summing down until it is reached
        // (top.n <= cumN[0]: a density at or below the top's is held there, one at or above the
        // whole table's at the lowest mass)
        if (target <= top.n) return { haloMassMinMsun: MATCH_MASS_MAX_MSUN, bias: top.nb / top.n, held: 'max' };
        let i = m - 1;
        while (i >= summed && i > 0 && !(cumN[i]! >= target)) i--;
        if (i < summed) summed = i = sumPanelsDown(nodes, lnAD, d, summed, 0, cumN, cumB, target);
        if (i > 0 && cumN[i] === target) sumDownTo(0);
        if (summed === 0 && target >= cumN[0]!)
          return { haloMassMinMsun: MATCH_MASS_MIN_MSUN, bias: cumB[0]! / cumN[0]!, held: 'min' };
        const lnTarget = Math.log(target);
        const a = edges[i]!;
        const b = Math.min(edges[i + 1]!, lnHi);
        const lnM = brentRoot((x) => Math.log(at(x, i).n) - lnTarget, a, b, 1e-9);
        const r = at(lnM, i);
        return { haloMassMinMsun: Math.exp(lnM), bias: r.nb / r.n };
      };
      const massForBias = (bias: number): number | undefined => {
        sumDownTo(0);
        // the effective bias above M grows with M: at panel edges it is cumB / cumN
        const hiEdge = panelOf(lnHi);
        const edgeBias = (i: number) => cumB[i]! / cumN[i]!;
        if (!(bias >= edgeBias(0)) || !(bias <= top.nb / top.n)) return undefined;
        let i = 0;
        while (i < hiEdge && edgeBias(i + 1) < bias) i++;
        const b = Math.min(edges[i + 1]!, lnHi);
        const f = (x: number) => {
          const r = at(x, i);
          return r.nb / r.n - bias;
        };
        return Math.exp(brentRoot(f, edges[i]!, b, 1e-9));
      };
      return { match, massForBias };
    },
  };
  modelCache.set(power, model);
  return model;
}
