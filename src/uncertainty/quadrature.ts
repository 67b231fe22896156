/**
 * Small quadrature helpers private to the uncertainty modules: Gauss-Legendre nodes, a
 * Gauss-Kronrod (7, 15) adaptive integrator, a natural cubic spline and a bracketing root finder.
 * Kept here (not in src/numerics) so that the physics in this folder has no dependency on code
 * written in parallel; the later wiring may swap them for the shared versions.
 */

export interface GaussRule {
  /** Nodes on [-1, 1], ascending. */
  readonly x: Float64Array;
  /** Weights, summing to 2. */
  readonly w: Float64Array;
}

const glCache = new Map<number, GaussRule>();

/**
 * n-point Gauss-Legendre rule on [-1, 1] (Newton iteration on the Legendre recurrence,
 * Golub & Welsch give the same nodes; Abramowitz & Stegun 25.4.29). Exact for polynomials of
 * degree <= 2n - 1. Cached per n.
 */
export function gaussLegendre(n: number): GaussRule {
  const cached = glCache.get(n);
  if (cached) return cached;
  if (!Number.isInteger(n) || n < 1) throw new RangeError(`gaussLegendre: n must be a positive integer, got ${n}`);
  const x = new Float64Array(n);
  const w = new Float64Array(n);
  for (let i = 0; i < Math.ceil(n / 2); i++) {
    let z = Math.cos((Math.PI * (i + 0.75)) / (n + 0.5));
    let pp = 1;
    for (let iter = 0; iter < 100; iter++) {
      let p1 = 1;
      let p2 = 0;
      for (let j = 1; j <= n; j++) {
        const p3 = p2;
        p2 = p1;
        p1 = ((2 * j - 1) * z * p2 - (j - 1) * p3) / j;
      }
      pp = (n * (z * p1 - p2)) / (z * z - 1);
      const z1 = z;
      z = z1 - p1 / pp;
      if (Math.abs(z - z1) < 1e-15) break;
    }
    const wi = 2 / ((1 - z * z) * pp * pp);
    x[i] = -z;
    x[n - 1 - i] = z;
    w[i] = wi;
    w[n - 1 - i] = wi;
  }
  if (n % 2 === 1) x[(n - 1) / 2] = 0;
  const rule = { x, w };
  glCache.set(n, rule);
  return rule;
}

/** Integrate f over [a, b] with an n-point Gauss-Legendre rule. */
export function gaussIntegrate(f: (x: number) => number, a: number, b: number, n: number): number {
  const { x, w } = gaussLegendre(n);
  const c = 0.5 * (a + b);
  const h = 0.5 * (b - a);
  let s = 0;
  for (let i = 0; i < n; i++) s += w[i]! * f(c + h * x[i]!);
  return s * h;
}

// Gauss-Kronrod (7, 15) nodes and weights (Piessens et al. 1983, QUADPACK qk15).
const XGK = [
  0.991455371120812639206854697526329, 0.949107912342758524526189684047851, 0.864864423359769072789712788640926,
  0.741531185599394439863864773280788, 0.586087235467691130294144845693013, 0.405845151377397166906606412076961,
  0.207784955007898467600689403773245, 0.0,
];
const WGK = [
  0.022935322010529224963732008058970, 0.063092092629978553290700663189204, 0.104790010322250183839876322541518,
  0.140653259715525918745189590510238, 0.169004726639267902826583426598550, 0.190350578064785409913256402421014,
  0.204432940075298892414161999234649, 0.209482141084727828012999174891714,
];
const WG = [
  0.129484966168869693270611432679082, 0.279705391489276667901467771423780, 0.381830050505118944950369775488975,
  0.417959183673469387755102040816327,
];

/** One G7-K15 step on [a, b]: the Kronrod estimate and |K15 - G7| as the error estimate. */
function gk15(f: (x: number) => number, a: number, b: number): { value: number; error: number } {
  const c = 0.5 * (a + b);
  const h = 0.5 * (b - a);
  const fc = f(c);
  let resK = fc * WGK[7]!;
  let resG = fc * WG[3]!;
  for (let j = 0; j < 7; j++) {
    const dx = h * XGK[j]!;
    const f1 = f(c - dx);
    const f2 = f(c + dx);
    resK += WGK[j]! * (f1 + f2);
    if (j % 2 === 1) resG += WG[(j - 1) / 2]! * (f1 + f2);
  }
  return { value: resK * h, error: Math.abs((resK - resG) * h) };
}

/**
 * Adaptive Gauss-Kronrod integration of f over [a, b] by recursive bisection until each piece's
 * error estimate is below max(absTol, relTol |piece|) scaled to its share of the interval.
 * Used by the slow reference integrators (tests), not by the hot paths.
 */
export function adaptiveIntegrate(
  f: (x: number) => number,
  a: number,
  b: number,
  relTol = 1e-10,
  absTol = 0,
  maxDepth = 40,
): number {
  const whole = gk15(f, a, b);
  const tolScale = Math.abs(whole.value);
  const rec = (lo: number, hi: number, est: { value: number; error: number }, depth: number): number => {
    const tol = Math.max(absTol, relTol * tolScale) * ((hi - lo) / (b - a));
    if (est.error <= tol || depth >= maxDepth) return est.value;
    const mid = 0.5 * (lo + hi);
    return rec(lo, mid, gk15(f, lo, mid), depth + 1) + rec(mid, hi, gk15(f, mid, hi), depth + 1);
  };
  return rec(a, b, whole, 0);
}

/** Natural cubic spline through (x_i, y_i), x ascending and uniformly spaced. */
export interface UniformSpline {
  readonly x0: number;
  readonly dx: number;
  readonly y: Float64Array;
  /** Second derivatives at the knots. */
  readonly m: Float64Array;
}

export function uniformSpline(x0: number, dx: number, y: Float64Array): UniformSpline {
  const n = y.length;
  const m = new Float64Array(n);
  if (n < 3) return { x0, dx, y, m };
  // Tridiagonal system for natural spline: m_0 = m_{n-1} = 0; m_{i-1} + 4 m_i + m_{i+1} = 6 (y_{i+1} - 2 y_i + y_{i-1}) / dx^2
  const c = new Float64Array(n);
  const d = new Float64Array(n);
  for (let i = 1; i < n - 1; i++) {
    const rhs = (6 * (y[i + 1]! - 2 * y[i]! + y[i - 1]!)) / (dx * dx);
    const denom = 4 - (i > 1 ? c[i - 1]! : 0);
    c[i] = 1 / denom;
    d[i] = (rhs - (i > 1 ? d[i - 1]! : 0)) / denom;
  }
  for (let i = n - 2; i >= 1; i--) m[i] = d[i]! - c[i]! * m[i + 1]!;
  return { x0, dx, y, m };
}

/** Spline value and first derivative at x (clamped to the knot range for the interval choice). */
export function splineEval(s: UniformSpline, x: number): number {
  const n = s.y.length;
  let i = Math.floor((x - s.x0) / s.dx);
  if (i < 0) i = 0;
  if (i > n - 2) i = n - 2;
  const xa = s.x0 + i * s.dx;
  const t = (x - xa) / s.dx;
  const u = 1 - t;
  const h2 = s.dx * s.dx;
  return u * s.y[i]! + t * s.y[i + 1]! + ((u * u * u - u) * s.m[i]! + (t * t * t - t) * s.m[i + 1]!) * (h2 / 6);
}

export function splineDerivative(s: UniformSpline, x: number): number {
  const n = s.y.length;
  let i = Math.floor((x - s.x0) / s.dx);
  if (i < 0) i = 0;
  if (i > n - 2) i = n - 2;
  const xa = s.x0 + i * s.dx;
  const t = (x - xa) / s.dx;
  const u = 1 - t;
  return (s.y[i + 1]! - s.y[i]!) / s.dx + ((-(3 * u * u - 1)) * s.m[i]! + (3 * t * t - 1) * s.m[i + 1]!) * (s.dx / 6);
}

/**
 * Root of a continuous f on [a, b] with f(a), f(b) of opposite signs (Brent 1973, "Algorithms
 * for minimization without derivatives", ch. 4). Returns x with |interval| < xTol.
 */
export function brentRoot(f: (x: number) => number, a: number, b: number, xTol = 1e-12, maxIter = 200): number {
  let fa = f(a);
  let fb = f(b);
  if (fa === 0) return a;
  if (fb === 0) return b;
  if (fa * fb > 0) throw new RangeError('brentRoot: the root is not bracketed');
  let c = a;
  let fc = fa;
  let d = b - a;
  let e = d;
  for (let iter = 0; iter < maxIter; iter++) {
    if (fb * fc > 0) {
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
    const tol = 2 * Number.EPSILON * Math.abs(b) + 0.5 * xTol;
    const m = 0.5 * (c - b);
    if (Math.abs(m) <= tol || fb === 0) return b;
    if (Math.abs(e) >= tol && Math.abs(fa) > Math.abs(fb)) {
      const s = fb / fa;
      let p: number;
      let q: number;
      if (a === c) {
        p = 2 * m * s;
        q = 1 - s;
      } else {
        const qq = fa / fc;
        const r = fb / fc;
        p = s * (2 * m * qq * (qq - r) - (b - a) * (r - 1));
        q = (qq - 1) * (r - 1) * (s - 1);
      }
      if (p > 0) q = -q;
      else p = -p;
      if (2 * p < Math.min(3 * m * q - Math.abs(tol * q), Math.abs(e * q))) {
        e = d;
        d = p / q;
      } else {
        d = m;
        e = d;
      }
    } else {
      d = m;
      e = d;
    }
    a = b;
    fa = fb;
    b += Math.abs(d) > tol ? d : m > 0 ? tol : -tol;
    fb = f(b);
  }
  return b;
}
