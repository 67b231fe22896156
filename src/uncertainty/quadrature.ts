/**
 * Thin adapters from the uncertainty modules to the shared numerics (src/numerics), plus a
 * natural cubic spline on a uniform grid with its derivative (used by the halo tables).
 */
import { gaussLegendreRule, integrate } from '../numerics/quadrature.js';
import { brent } from '../numerics/roots.js';

export interface GaussRule {
  /** Nodes on [-1, 1], ascending. */
  readonly x: Float64Array;
  /** Weights, summing to 2. */
  readonly w: Float64Array;
}

/** n-point Gauss-Legendre rule on [-1, 1] (shared, cached). */
export function gaussLegendre(n: number): GaussRule {
  const r = gaussLegendreRule(n);
  return { x: r.nodes, w: r.weights };
}

/** Adaptive Gauss-Kronrod integration (shared integrator); used by the slow reference integrators. */
export function adaptiveIntegrate(
  f: (x: number) => number,
  a: number,
  b: number,
  relTol = 1e-10,
  absTol = 0,
  maxDepth = 40,
): number {
  return integrate(f, a, b, { rel: relTol, abs: absTol, maxDepth }).value;
}

/** Root of f bracketed by [a, b] (Brent's method, shared). */
export function brentRoot(f: (x: number) => number, a: number, b: number, xTol = 1e-12, maxIter = 200): number {
  return brent(f, a, b, { tol: xTol, maxIter });
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

/** The knot interval holding x (clamped to the knot range) and the position t in it. */
function splineInterval(s: UniformSpline, x: number): { i: number; t: number } {
  const n = s.y.length;
  let i = Math.floor((x - s.x0) / s.dx);
  if (i < 0) i = 0;
  if (i > n - 2) i = n - 2;
  return { i, t: (x - (s.x0 + i * s.dx)) / s.dx };
}

/** Spline value at x. */
export function splineEval(s: UniformSpline, x: number): number {
  const { i, t } = splineInterval(s, x);
  const u = 1 - t;
  const h2 = s.dx * s.dx;
  return u * s.y[i]! + t * s.y[i + 1]! + ((u * u * u - u) * s.m[i]! + (t * t * t - t) * s.m[i + 1]!) * (h2 / 6);
}

/** Spline first derivative at x. */
export function splineDerivative(s: UniformSpline, x: number): number {
  const { i, t } = splineInterval(s, x);
  const u = 1 - t;
  return (s.y[i + 1]! - s.y[i]!) / s.dx + ((-(3 * u * u - 1)) * s.m[i]! + (3 * t * t - 1) * s.m[i + 1]!) * (s.dx / 6);
}
