/**
 * The Schechter function (Schechter 1976, ApJ 203, 297) and its integrals.
 *
 * Standard form with the same phi* in every variable (docs/survey-file.md, "The Schechter function in skytally"):
 *   luminosity: phi(L) dL = phi* (L/L*)^alpha exp(-L/L*) dL/L*
 *   magnitude:  phi(M) dM = 0.4 ln10 phi* 10^(0.4 (alpha+1) (M*-M)) exp(-10^(0.4 (M*-M))) dM
 *   per dex:    phi(log10 L) dlog10 L = ln10 phi* (L/L*)^(alpha+1) exp(-L/L*) dlog10 L
 *
 * Inside the count engine a population is a sum of components sharing one characteristic
 * scale, written in u = L/L*: phi(u) du = sum_c phi*_c u^alpha_c exp(-u) du. A single Schechter
 * function has one component; a double Schechter function two.
 * The number density above u is sum_c phi*_c Gamma(alpha_c + 1, u) (upper incomplete gamma;
 * alpha_c + 1 <= 0 is allowed, the integral converges for any u > 0).
 */
import { upperGamma, gammaFn } from '../numerics/gamma.js';

export interface SchechterComponent {
  /** Normalisation, Mpc^-3. */
  phiStar: number;
  alpha: number;
}

/**
 * A component at one redshift as the count engine's nodes hold it. A class rather than object
 * literals: the literals made in several places ({phiStar, alpha}, and the population's own
 * components of the same names holding parameters) shared V8's hidden classes, whose fields were
 * generalised as they met other values, so that nodes reached the engine's compiled code in two
 * shapes and threw it away (a cold predict of the photo-z sample compiled sumOver,
 * completeNodeBins and integrate twice). Every node's components are of this one class.
 */
export class ComponentAtZ implements SchechterComponent {
  constructor(
    public phiStar: number,
    public alpha: number,
  ) {}
}

/**
 * f of each component, in an array made by push rather than Array.prototype.map: map's result is
 * a packed array in the interpreter and a holey one once V8 has compiled its caller (its inlined
 * map makes the array at its length, then fills it), and a loop over node components compiled for
 * one kind of array threw its code away at the other.
 */
export function componentsMap<T>(cs: readonly T[], f: (c: T, k: number) => ComponentAtZ): ComponentAtZ[] {
  const out: ComponentAtZ[] = [];
  for (let k = 0; k < cs.length; k++) out.push(f(cs[k]!, k));
  return out;
}

/** phi(L) in Mpc^-3 per unit L (L and L* in the same unit). */
export function schechterLuminosity(l: number, phiStar: number, lStar: number, alpha: number): number {
  const u = l / lStar;
  return (phiStar / lStar) * u ** alpha * Math.exp(-u);
}

/** phi(M) in Mpc^-3 mag^-1 for absolute magnitude M. */
export function schechterMagnitude(m: number, phiStar: number, mStar: number, alpha: number): number {
  const u = 10 ** (0.4 * (mStar - m));
  return 0.4 * Math.LN10 * phiStar * u ** (alpha + 1) * Math.exp(-u);
}

/** phi(log10 L) in Mpc^-3 dex^-1. */
export function schechterPerDex(log10L: number, phiStar: number, log10LStar: number, alpha: number): number {
  const u = 10 ** (log10L - log10LStar);
  return Math.LN10 * phiStar * u ** (alpha + 1) * Math.exp(-u);
}

/** Number density (Mpc^-3) of sources with L/L* above `u`: phi* Gamma(alpha+1, u). */
export function numberDensityAbove(u: number, phiStar: number, alpha: number): number {
  return phiStar * upperGamma(alpha + 1, u);
}

/** Number density above u for a sum of components. */
export function componentsNumberAbove(u: number, components: readonly SchechterComponent[]): number {
  let n = 0;
  for (const c of components) n += c.phiStar * upperGamma(c.alpha + 1, u);
  return n;
}

/**
 * Luminosity density (in units of L* Mpc^-3 when lStar = 1) of sources above u:
 * phi* L* Gamma(alpha+2, u). With u -> 0 and alpha > -2 this is the total j = phi* L* Gamma(alpha+2)
 * (common practice; textbook result).
 */
export function luminosityDensityAbove(u: number, phiStar: number, lStar: number, alpha: number): number {
  return phiStar * lStar * upperGamma(alpha + 2, u);
}

/** Total luminosity density phi* L* Gamma(alpha+2); diverges (throws) for alpha <= -2. */
export function totalLuminosityDensity(phiStar: number, lStar: number, alpha: number): number {
  if (alpha <= -2) throw new Error('the total luminosity density diverges for alpha <= -2');
  return phiStar * lStar * gammaFn(alpha + 2);
}

/**
 * Double Schechter function in luminosity, Mpc^-3 per unit L:
 *   phi(L) dL = exp(-L/L*) [phi1* (L/L*)^alpha1 + phi2* (L/L*)^alpha2] dL/L*
 * (two components sharing L*; the sum of two single Schechter functions).
 */
export function doubleSchechterLuminosity(
  l: number,
  lStar: number,
  c1: SchechterComponent,
  c2: SchechterComponent,
): number {
  const u = l / lStar;
  return (Math.exp(-u) / lStar) * (c1.phiStar * u ** c1.alpha + c2.phiStar * u ** c2.alpha);
}

/**
 * Double Schechter function in absolute magnitude, Mpc^-3 mag^-1, u = 10^(0.4 (M*-M)):
 *   phi(M) dM = 0.4 ln10 exp(-u) [phi1* u^(alpha1+1) + phi2* u^(alpha2+1)] dM.
 */
export function doubleSchechterMagnitude(
  m: number,
  mStar: number,
  c1: SchechterComponent,
  c2: SchechterComponent,
): number {
  const u = 10 ** (0.4 * (mStar - m));
  return 0.4 * Math.LN10 * Math.exp(-u) * (c1.phiStar * u ** (c1.alpha + 1) + c2.phiStar * u ** (c2.alpha + 1));
}

/** Luminosity density above u for a sum of components, in units of L* Mpc^-3: sum phi*_c Gamma(alpha_c + 2, u). */
export function componentsLuminosityAbove(u: number, components: readonly SchechterComponent[]): number {
  let j = 0;
  for (const c of components) j += c.phiStar * upperGamma(c.alpha + 2, u);
  return j;
}

/**
 * Total luminosity density of a sum of components, in units of L* Mpc^-3: sum phi*_c Gamma(alpha_c + 2);
 * undefined when any alpha_c <= -2 (the integral diverges at the faint end).
 */
export function componentsTotalLuminosity(components: readonly SchechterComponent[]): number | undefined {
  let j = 0;
  for (const c of components) {
    if (!(c.alpha > -2)) return undefined;
    j += c.phiStar * gammaFn(c.alpha + 2);
  }
  return j;
}
