/**
 * Thin adapters from the uncertainty modules to the shared numerics (src/numerics), including
 * the natural cubic spline on a uniform grid with its derivative (used by the halo tables).
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

export { uniformSpline, splineEval, splineDerivative, type UniformSpline } from '../numerics/interpolate.js';
