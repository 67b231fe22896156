/**
 * Maximisation of a smooth function with an analytic gradient and Hessian: Newton steps damped
 * the Levenberg-Marquardt way (Nocedal & Wright, Numerical Optimization, 2nd ed., sections 3.4 and
 * 10.3): solve (-H + mu diag(max(|H_ii|, 1e-12))) d = g; a step that does not raise the function is
 * refused and mu grows ten-fold; an accepted step lowers mu three-fold. Stops when the Newton
 * decrement g^T (-H)^-1 g / 2 (the expected gain) is below `tol` with -H positive definite.
 */
import { cholesky, choleskySolve, type Matrix } from '../numerics/linalg.js';

export interface Evaluation {
  value: number;
  gradient: number[];
  hessian: Matrix;
}

export interface MaximiseOptions {
  /** Stop when the expected gain of a full Newton step is below this (default 1e-10). */
  tol?: number;
  maxIter?: number;
}

export interface MaximiseResult {
  x: number[];
  value: number;
  iterations: number;
  converged: boolean;
}

export function maximise(
  f: (x: readonly number[]) => Evaluation,
  x0: readonly number[],
  opts: MaximiseOptions = {},
): MaximiseResult {
  const tol = opts.tol ?? 1e-10;
  const maxIter = opts.maxIter ?? 200;
  const n = x0.length;
  let x = [...x0];
  let e = f(x);
  if (!Number.isFinite(e.value)) return { x, value: e.value, iterations: 0, converged: false };
  let mu = 0;
  for (let iter = 1; iter <= maxIter; iter++) {
    const neg = e.hessian.map((r) => r.map((v) => -v));
    // Converged? (full Newton decrement with a positive-definite -H)
    const lFull = cholesky(neg);
    if (lFull) {
      const d = choleskySolve(lFull, e.gradient);
      let gain = 0;
      for (let i = 0; i < n; i++) gain += e.gradient[i]! * d[i]!;
      if (0.5 * gain < tol) return { x, value: e.value, iterations: iter, converged: true };
    }
    // Damped step, raising mu until the function increases.
    let accepted = false;
    for (let tries = 0; tries < 60; tries++) {
      const a = neg.map((r, i) => r.map((v, j) => (i === j ? v + mu * Math.max(Math.abs(v), 1e-12) : v)));
      const l = cholesky(a);
      if (!l) {
        mu = mu === 0 ? 1e-3 : mu * 10;
        continue;
      }
      const d = choleskySolve(l, e.gradient);
      const xNew = x.map((v, i) => v + d[i]!);
      const eNew = f(xNew);
      if (Number.isFinite(eNew.value) && eNew.value >= e.value) {
        const stalled = xNew.every((v, i) => v === x[i]);
        x = xNew;
        e = eNew;
        mu = mu / 3 < 1e-12 ? 0 : mu / 3;
        accepted = true;
        if (stalled)
          return {
            x,
            value: e.value,
            iterations: iter,
            converged: cholesky(e.hessian.map((r) => r.map((v) => -v))) !== undefined,
          };
        break;
      }
      mu = mu === 0 ? 1e-3 : mu * 10;
    }
    if (!accepted) return { x, value: e.value, iterations: iter, converged: false };
  }
  return { x, value: e.value, iterations: maxIter, converged: false };
}
