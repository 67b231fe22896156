/**
 * Root finding for real functions of one variable.
 *
 * - `brent(f, a, b, opts)`: Brent's method (Brent 1973, "Algorithms for Minimization without
 *   Derivatives", ch. 4; the zeroin algorithm as in Press et al., Numerical Recipes, 3rd ed.,
 *   section 9.3): inverse quadratic interpolation with bisection safeguards. Needs a bracket
 *   [a, b] with f(a) and f(b) of opposite signs (or one of them zero).
 * - `expandBracket(f, a, b, opts)`: widens [a, b] geometrically until the signs differ.
 * - `bisectCrossing(f, target, a, b, fa)`: where f crosses a value, by 60 plain bisections (for
 *   functions with jumps or kinks, where Brent's interpolation gains nothing).
 */

export interface BrentOptions {
  /** Absolute tolerance on the root (default 1e-12; the effective tolerance also has a 2 eps |x| term). */
  tol?: number;
  /** Iteration limit (default 200). */
  maxIter?: number;
}

/**
 * Root of f in [a, b] by Brent's method.
 * @throws Error when f(a) and f(b) have the same sign (no sign change in the bracket), when f
 *   returns a non-finite value at an end, or when maxIter is reached.
 * @example brent((x) => x * x - 2, 0, 2) // 1.4142135623730951
 */
export function brent(f: (x: number) => number, a: number, b: number, opts: BrentOptions = {}): number {
  const tol = opts.tol ?? 1e-12;
  const maxIter = opts.maxIter ?? 200;
  let fa = f(a);
  let fb = f(b);
  if (!Number.isFinite(fa) || !Number.isFinite(fb)) {
    throw new Error(`root search: the function is not finite at an end of [${a}, ${b}] (f = ${fa}, ${fb})`);
  }
  if (fa === 0) return a;
  if (fb === 0) return b;
  if ((fa > 0 && fb > 0) || (fa < 0 && fb < 0)) {
    throw new Error(
      `root search: f has the same sign at both ends of [${a}, ${b}] (f = ${fa}, ${fb}), so no root is bracketed`,
    );
  }
  let c = b;
  let fc = fb;
  let d = 0;
  let e = 0;
  for (let iter = 0; iter < maxIter; iter++) {
    if ((fb > 0 && fc > 0) || (fb < 0 && fc < 0)) {
      c = a;
      fc = fa;
      d = b - a;
      e = d;
    }
    if (Math.abs(fc) < Math.abs(fb)) {
      a = b;
      b = c;
      c = a;
      fa = fb;
      fb = fc;
      fc = fa;
    }
    const tol1 = 2 * Number.EPSILON * Math.abs(b) + 0.5 * tol;
    const xm = 0.5 * (c - b);
    if (Math.abs(xm) <= tol1 || fb === 0) return b;
    if (Math.abs(e) >= tol1 && Math.abs(fa) > Math.abs(fb)) {
      const s = fb / fa;
      let p: number;
      let q: number;
      if (a === c) {
        p = 2 * xm * s;
        q = 1 - s;
      } else {
        const qq = fa / fc;
        const r = fb / fc;
        p = s * (2 * xm * qq * (qq - r) - (b - a) * (r - 1));
        q = (qq - 1) * (r - 1) * (s - 1);
      }
      if (p > 0) q = -q;
      p = Math.abs(p);
      const min1 = 3 * xm * q - Math.abs(tol1 * q);
      const min2 = Math.abs(e * q);
      if (2 * p < Math.min(min1, min2)) {
        e = d;
        d = p / q;
      } else {
        d = xm;
        e = d;
      }
    } else {
      d = xm;
      e = d;
    }
    a = b;
    fa = fb;
    b += Math.abs(d) > tol1 ? d : xm >= 0 ? tol1 : -tol1;
    fb = f(b);
    if (!Number.isFinite(fb)) throw new Error(`root search: the function is not finite at x = ${b}`);
  }
  throw new Error(`root search: no convergence in ${maxIter} iterations`);
}

export interface BracketOptions {
  /** Growth factor of the bracket width per step (default 1.6). */
  factor?: number;
  /** Step limit (default 60). */
  maxIter?: number;
  /** Hard limits the bracket never crosses (default -Infinity, Infinity). */
  lower?: number;
  upper?: number;
}

/**
 * Widen [a, b] (a < b) until f changes sign across it, moving the end whose |f| is smaller, by
 * `factor` times the current width each step (Press et al., Numerical Recipes, 3rd ed., zbrac).
 * @returns the bracket [lo, hi] with f(lo) f(hi) <= 0
 * @throws Error naming the last bracket when no sign change is found.
 * @example expandBracket((x) => x - 10, 0, 1) // a bracket containing 10
 */
export function expandBracket(
  f: (x: number) => number,
  a: number,
  b: number,
  opts: BracketOptions = {},
): [number, number] {
  const factor = opts.factor ?? 1.6;
  const maxIter = opts.maxIter ?? 60;
  const lower = opts.lower ?? -Infinity;
  const upper = opts.upper ?? Infinity;
  if (!(a < b)) throw new Error(`bracket needs a < b, got [${a}, ${b}]`);
  let fa = f(a);
  let fb = f(b);
  for (let i = 0; i < maxIter; i++) {
    if (fa * fb <= 0) return [a, b];
    const w = b - a;
    const moveLower = (Math.abs(fa) < Math.abs(fb) && a > lower) || b >= upper;
    if (moveLower) {
      if (a <= lower) break;
      a = Math.max(lower, a - factor * w);
      fa = f(a);
    } else {
      b = Math.min(upper, b + factor * w);
      fb = f(b);
    }
  }
  if (fa * fb <= 0) return [a, b];
  throw new Error(`root search: no sign change found while widening the bracket up to [${a}, ${b}]`);
}

/**
 * Where f crosses `target` in [a, b], given fa = f(a) and f - target of opposite signs at a and b:
 * 60 bisections keeping the sign of fa - target at the lower end, and the middle of the last
 * bracket (2^-60 of the first: below a double's spacing for any redshift range).
 * @example bisectCrossing((x) => x * x, 2, 0, 2, 0) // 1.414213562373095, sqrt(2) to a spacing
 */
export function bisectCrossing(f: (x: number) => number, target: number, a: number, b: number, fa: number): number {
  const sa = Math.sign(fa - target);
  for (let it = 0; it < 60; it++) {
    const m = 0.5 * (a + b);
    if (Math.sign(f(m) - target) === sa) a = m;
    else b = m;
  }
  return 0.5 * (a + b);
}
