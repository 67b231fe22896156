/**
 * Gamma functions: the complete gamma function and the upper incomplete gamma function for every
 * real order s.
 *
 * Definitions (DLMF 8.2.2, 5.2.1):
 *   Gamma(s)    = integral_0^inf t^(s-1) e^-t dt                 (s not 0, -1, -2, ...)
 *   Gamma(s, x) = integral_x^inf t^(s-1) e^-t dt                 (x > 0, any real s)
 * Gamma(s, x) here is NOT regularised (it is not divided by Gamma(s)). For s = 0 it is the
 * exponential integral E1(x) (DLMF 8.4.4); for s = 1 it is e^-x.
 *
 * In the count engine s = alpha + 1 (or alpha + 2) of a Schechter function, so s <= 0 is common.
 *
 * Method:
 * - s > 0: @stdlib/math-base-special-gammainc (a port of Boost's igamma), upper tail, unregularised.
 * - s <= 0, x > 1.5: the continued fraction (DLMF 8.9.2), evaluated by the modified Lentz method
 *   (Press et al., Numerical Recipes, 3rd ed., section 6.2).
 * - s <= 0, x <= 1.5: write s = s0 - n with s0 in [-0.5, 0.5] and n >= 0 an integer. For s0 the
 *   series
 *     Gamma(s0, x) = [Gamma(1+s0) - 1]/s0 - expm1(s0 ln x)/s0 - x^s0 sum_{k>=1} (-x)^k / (k! (s0+k))
 *   (from Gamma(s, x) = Gamma(s) - gamma(s, x), DLMF 8.7.1, with the two poles at s0 = 0 removed
 *   analytically, as in Gil, Segura & Temme 2012, ACM TOMS 38, 11) has no cancellation as s0 -> 0;
 *   Gamma(1+s0) - 1 comes from @stdlib/math-base-special-gamma1pm1. Then the recurrence
 *   Gamma(a-1, x) = (Gamma(a, x) - x^(a-1) e^-x) / (a-1) (DLMF 8.8.2) is applied n times; every
 *   divisor has |a-1| >= 0.5, so s near a negative integer keeps full accuracy.
 *
 * Accuracy (test/numerics/gamma.test.ts against mpmath 1.2.1): relative error below 1e-13 over
 * s in [-3, 3], x in [1e-6, 700] (values above 1e-300).
 */
import gammaStd from '@stdlib/math-base-special-gamma';
import gammainc from '@stdlib/math-base-special-gammainc';
import gamma1pm1 from '@stdlib/math-base-special-gamma1pm1';

/** Euler-Mascheroni constant (DLMF 5.2.3). */
export const EULER_GAMMA = 0.5772156649015329;

/** Below this x (for s <= 0) the series plus recurrence is used; above it the continued fraction. */
const X_SWITCH = 1.5;
const CF_EPS = 1e-16;
const CF_TINY = 1e-300;
const CF_MAX_ITER = 500;

/**
 * Complete gamma function Gamma(s) (DLMF 5.2.1), from @stdlib/math-base-special-gamma.
 * Edge cases: poles at s = 0, -1, -2, ... give NaN or +-Infinity (stdlib's convention); overflow
 * (s > 171.6) gives Infinity.
 * @example gammaFn(5) // 24
 */
export function gammaFn(s: number): number {
  return gammaStd(s);
}

/**
 * Modified Lentz evaluation of the continued fraction
 *   Gamma(s, x) = x^s e^-x * h,
 *   h = 1/(x+1-s- 1(1-s)/(x+3-s- 2(2-s)/(x+5-s- ...)))     (DLMF 8.9.2, even form)
 * Returns h. Converges for every real s and x > 0; quickly when x >~ max(1, s).
 */
function upperGammaFractionH(s: number, x: number): number {
  let b = x + 1 - s;
  let c = 1 / CF_TINY;
  let d = 1 / b;
  let h = d;
  for (let i = 1; i <= CF_MAX_ITER; i++) {
    const an = -i * (i - s);
    b += 2;
    d = an * d + b;
    if (Math.abs(d) < CF_TINY) d = CF_TINY;
    c = b + an / c;
    if (Math.abs(c) < CF_TINY) c = CF_TINY;
    d = 1 / d;
    const del = d * c;
    h *= del;
    if (Math.abs(del - 1) < CF_EPS) break;
  }
  return h;
}

/**
 * [Gamma(1 + s0) - 1] / s0 of the last s0 upperGammaSmallOrder met: a node's bin edges and pieces
 * share their orders (alpha + 1 of each component), so it is computed once per order, not per
 * edge (a cold predict of the photo-z sample: 3359 calls, one order).
 */
let lastS0 = NaN;
let lastG1 = NaN;

/**
 * Gamma(s0, x) for |s0| <= 0.5 and moderate x (used for x <= 1.5), by the pole-free series
 * described in the module comment. s0 = 0 gives E1(x) = -gamma_E - ln x - sum (-x)^k/(k k!).
 */
function upperGammaSmallOrder(s0: number, x: number, lnx: number): number {
  if (s0 !== lastS0) {
    lastG1 = s0 === 0 ? -EULER_GAMMA : gamma1pm1(s0) / s0;
    lastS0 = s0;
  }
  const g1 = lastG1;
  const e1 = s0 === 0 ? lnx : Math.expm1(s0 * lnx) / s0;
  let term = 1;
  let sum = 0;
  for (let k = 1; k < 100; k++) {
    term *= -x / k;
    const t = term / (s0 + k);
    sum += t;
    if (Math.abs(t) <= 1e-17 * Math.abs(sum)) break;
  }
  const xs = s0 === 0 ? 1 : Math.exp(s0 * lnx);
  return g1 - e1 - xs * sum;
}

/**
 * Upper incomplete gamma function Gamma(s, x) = integral_x^inf t^(s-1) e^-t dt (not regularised),
 * for any real s and x > 0 (DLMF 8.2.2).
 *
 * @param s order, any real number (s <= 0 allowed: s = 0 gives E1(x), negative integers work)
 * @param x lower limit of the integral, x > 0 (x = 0 gives Gamma(s) for s > 0, Infinity for s <= 0)
 * @returns Gamma(s, x); underflows to 0 when the true value is below about 1e-308 and overflows to
 *   Infinity for very negative s at tiny x (x^s beyond 1e308). NaN for x < 0 or NaN input.
 * @example upperGamma(1, 2) // e^-2 = 0.1353352832366127
 * @example upperGamma(0, 1) // E1(1) = 0.21938393439552029
 * @example upperGamma(-0.5, 1) // 0.17814771178156069
 */
export function upperGamma(s: number, x: number): number {
  if (!(x >= 0) || Number.isNaN(s)) return NaN;
  // |s| < 1e-18 changes Gamma(s, x) by a relative 1e-18 * O(ln x) only: use s = 0 (E1), which
  // also keeps subnormal s (where s ln x underflows) accurate.
  if (Math.abs(s) < 1e-18) s = 0;
  if (s > 0) {
    if (x === 0) return gammaStd(s);
    return gammainc(x, s, false, true);
  }
  if (x === 0) return Infinity;
  if (x === Infinity) return 0;
  const lnx = Math.log(x);
  if (x > X_SWITCH) {
    return Math.exp(s * lnx - x) * upperGammaFractionH(s, x);
  }
  const n = Math.round(-s);
  const s0 = s + n; // in [-0.5, 0.5]
  let g = upperGammaSmallOrder(s0, x, lnx);
  if (n === 0) return g;
  // Downward recurrence: Gamma(a-1, x) = (Gamma(a, x) - x^(a-1) e^-x) / (a-1).
  let p = Math.exp(s0 * lnx - x); // x^a e^-x for a = s0
  let a = s0;
  for (let k = 0; k < n; k++) {
    a -= 1;
    p /= x;
    g = (g - p) / a;
  }
  return g;
}

/**
 * Gamma(s, x) as upperGamma gives it, for s > 0 without @stdlib's gammainc (whose many functions
 * cost a start-up that calls it tens of thousands of times, as the model draws' tables do, more
 * than the numbers themselves): the continued fraction where x > 1.5 and x > s - 1 (as for s <= 0);
 * for x <= 1.5 the pole-free series at s0 = s - n, n = round(s) (the module comment), then the
 * upward recurrence Gamma(a + 1, x) = a Gamma(a, x) + x^a e^-x (DLMF 8.8.2) n times (for a < 0 the
 * two terms have opposite signs: about three digits lost at x = 1e-6, s0 = -0.5). Elsewhere, and for
 * s <= 0, upperGamma itself. Relative 1e-12 against mpmath (test/numerics/gamma.test.ts).
 */
export function upperGammaByRecurrence(s: number, x: number): number {
  if (!(s > 0) || !(x > 0) || x === Infinity) return upperGamma(s, x);
  const lnx = Math.log(x);
  if (x > X_SWITCH) return x > s - 1 ? Math.exp(s * lnx - x) * upperGammaFractionH(s, x) : upperGamma(s, x);
  const n = Math.round(s);
  let a = s - n;
  let g = upperGammaSmallOrder(a, x, lnx);
  let p = Math.exp(a * lnx - x); // x^a e^-x
  for (let k = 0; k < n; k++) {
    g = a * g + p;
    p *= x;
    a += 1;
  }
  return g;
}

/**
 * Natural log of the upper incomplete gamma function, ln Gamma(s, x), for any real s and x > 0.
 * Where the continued fraction applies (x > 1.5 and x > s + 1) it is evaluated in logs,
 *   ln Gamma(s, x) = s ln x - x + ln h,
 * so it stays finite far beyond the range where Gamma(s, x) itself underflows (e.g. x = 1e4).
 * Elsewhere it is ln(upperGamma(s, x)).
 * @example logUpperGamma(1, 1000) // -1000
 */
export function logUpperGamma(s: number, x: number): number {
  if (!(x > 0) || Number.isNaN(s)) return NaN;
  if (Math.abs(s) < 1e-18) s = 0;
  if (x > X_SWITCH && x > s + 1) {
    return s * Math.log(x) - x + Math.log(upperGammaFractionH(s, x));
  }
  return Math.log(upperGamma(s, x));
}
