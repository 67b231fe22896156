/**
 * Maximum-likelihood fits of one mock catalogue, in the offsets theta = [d log10 phi*, d char, d alpha].
 *
 * Extended unbinned likelihood (e.g. Cash 1979, ApJ 228, 939; Marshall et al. 1983, ApJ 269, 35):
 *   ln L = -Lambda(theta) + sum_i ln lambda(z_i, x_i; theta)
 * With constant offsets the data term depends on the catalogue only through n, sum t, sum (alpha+1)
 * and sum e^t (t = ln u at the input): per source
 *   ln lambda = const + ln10 d_phi + (a1 + d_alpha)(t + s d_c) - e^t e^(s d_c).
 * With cosmic variance, each slice's expected count carries a factor v_i = 1 + eps_i with a Gaussian
 * prior of width sigma_i (the same nuisance the Fisher matrix marginalises):
 *   ln L = sum_i [-v_i Lambda_i(theta) + n_i ln v_i - (v_i - 1)^2 / (2 sigma_i^2)] + data terms,
 * and v_i is profiled out in closed form (the positive root of v^2/sigma^2 + v (Lambda - 1/sigma^2) - n = 0);
 * the gradient and Hessian of the profile likelihood are exact (envelope theorem and implicit derivative).
 * With the joint prior of correlated slices (covariance S over the slices with sigma_i > 0,
 * src/forecast/fisher.ts priorFactorOf, P = S^-1):
 *   ln L = sum_i [-v_i Lambda_i(theta) + n_i ln v_i] - (v - 1)^T P (v - 1) / 2 + data terms,
 * v profiled out by projected Newton steps (concave in v; a slice without sources keeps v_i >= 0,
 * as the per-slice root does), and the Hessian of the profile gains
 * D_F^T (diag(n_i / v_i^2) + P)_FF^-1 D_F over the factors F not held at 0, D_ij = d Lambda_i /
 * d theta_j (the same implicit derivative; with S diagonal it is the per-slice closed form's).
 *
 * Shape-only conditional likelihood (Sandage, Tammann & Yahil 1979, ApJ 232, 352):
 *   ln L = sum_i ln [ phi(x_i; theta) c / integral phi(x; theta) c dx at z_i ]
 * It does not depend on phi* (nor on any normalisation), so it constrains only the characteristic
 * value and alpha.
 */
import type { DensityGrid } from './grid.js';
import { expectedCounts, sliceCount } from './grid.js';
import type { CatalogueStats } from './sampler.js';
import { maximise, type Evaluation } from './optimise.js';
import { choleskyInto, choleskySolveInto, zeros } from '../numerics/linalg.js';
import type { PriorFactor } from './fisher.js';

const LN10 = Math.LN10;
/** A fit whose offsets leave this box is counted as failed. */
const MAX_OFFSET = 5;

export type Estimator = 'ml' | 'sty';

export interface FitResult {
  /** Offsets [d log10 phi*, d characteristic, d alpha]; the first is NaN for the sty estimator. */
  theta: [number, number, number];
  converged: boolean;
}

/** Upper triangle index helper for the 10-number per-slice blocks of expectedCounts. */
function hessBlock(b: Float64Array, o: number): number[][] {
  return [
    [b[o + 4]!, b[o + 5]!, b[o + 6]!],
    [b[o + 5]!, b[o + 7]!, b[o + 8]!],
    [b[o + 6]!, b[o + 8]!, b[o + 9]!],
  ];
}

/** Profile log-likelihood of the extended estimator, with gradient and Hessian. */
export function extendedLogLikelihood(
  grid: DensityGrid,
  stats: CatalogueStats,
  cvSigma: ArrayLike<number>,
  theta: readonly number[],
  buf?: Float64Array,
  factor?: PriorFactor,
): Evaluation {
  const lam = expectedCounts(grid, theta, buf);
  if (factor && factor.active.length > 0) return jointProfile(grid, stats, factor, theta, lam);
  const data = dataTerms(grid, stats, theta);
  let value = data.value;
  const g = data.gradient;
  const h = data.hessian;
  for (let sl = 0; sl < sliceCount(grid); sl++) {
    const o = 10 * sl;
    const L = lam[o]!;
    const dL = [lam[o + 1]!, lam[o + 2]!, lam[o + 3]!];
    const d2L = hessBlock(lam, o);
    const ni = stats.sliceN[sl]!;
    const sigma = cvSigma[sl] ?? 0;
    let v = 1;
    let corr = 0; // 1 / (n/v^2 + 1/sigma^2), the implicit-derivative factor
    if (sigma > 0) {
      const inv2 = 1 / (sigma * sigma);
      const b = L - inv2;
      const disc = Math.sqrt(b * b + 4 * ni * inv2);
      v = b > 0 ? (2 * ni) / (b + disc) : (-b + disc) / (2 * inv2);
      value += -v * L + (ni > 0 ? ni * Math.log(v) : 0) - 0.5 * (v - 1) * (v - 1) * inv2;
      if (v > 0) corr = 1 / (ni / (v * v) + inv2);
    } else {
      value += -L;
    }
    for (let j = 0; j < 3; j++) {
      g[j]! -= v * dL[j]!;
      for (let k = 0; k < 3; k++) h[j]![k]! += -v * d2L[j]![k]! + corr * dL[j]! * dL[k]!;
    }
  }
  return { value, gradient: g, hessian: h };
}

/** The data terms of the extended likelihood (everything but the slices' expected counts). */
function dataTerms(grid: DensityGrid, stats: CatalogueStats, theta: readonly number[]): Evaluation {
  const s = grid.shift;
  const [dPhi, dC, dA] = theta as [number, number, number];
  const n = stats.total;
  const eShift = Math.exp(s * dC);
  const value = n * LN10 * dPhi + dA * stats.sumT + s * dC * stats.sumA1 + n * dA * s * dC - eShift * stats.sumU;
  const gradient = [n * LN10, s * stats.sumA1 + n * dA * s - s * eShift * stats.sumU, stats.sumT + n * s * dC];
  const hessian = zeros(3);
  hessian[1]![1] = -s * s * eShift * stats.sumU;
  hessian[1]![2] = hessian[2]![1] = n * s;
  return { value, gradient, hessian };
}

/** The profile likelihood with the joint prior over the active slices (see the module comment). */
function jointProfile(
  grid: DensityGrid,
  stats: CatalogueStats,
  factor: PriorFactor,
  theta: readonly number[],
  lam: Float64Array,
): Evaluation {
  const out = dataTerms(grid, stats, theta);
  const g = out.gradient;
  const h = out.hessian;
  const { active, inverse } = factor;
  if (!inverse) throw new Error('cosmic variance: the mock fits need a positive definite prior covariance');
  const m = active.length;
  const isActive = new Uint8Array(sliceCount(grid));
  for (const i of active) isActive[i] = 1;
  let value = out.value;
  // slices without a nuisance: v = 1
  for (let sl = 0; sl < sliceCount(grid); sl++) {
    if (isActive[sl]) continue;
    const o = 10 * sl;
    value -= lam[o]!;
    const d2L = hessBlock(lam, o);
    for (let j = 0; j < 3; j++) {
      g[j]! -= lam[o + 1 + j]!;
      for (let k = 0; k < 3; k++) h[j]![k]! -= d2L[j]![k]!;
    }
  }
  const big = new Float64Array(m);
  const n = new Float64Array(m);
  for (let c = 0; c < m; c++) {
    big[c] = lam[10 * active[c]!]!;
    n[c] = stats.sliceN[active[c]!]!;
  }
  const { v, free, value: nuisanceValue } = maximiseNuisances(inverse, big, n);
  value += nuisanceValue;
  for (let c = 0; c < m; c++) {
    const o = 10 * active[c]!;
    const d2L = hessBlock(lam, o);
    for (let j = 0; j < 3; j++) {
      g[j]! -= v[c]! * lam[o + 1 + j]!;
      for (let k = 0; k < 3; k++) h[j]![k]! -= v[c]! * d2L[j]![k]!;
    }
  }
  // + D_F^T (diag(n / v^2) + P)_FF^-1 D_F over the free factors (those not held at 0)
  const f = free.length;
  if (f === 0) return { value, gradient: g, hessian: h };
  const a = new Float64Array(f * f);
  for (let x = 0; x < f; x++)
    for (let y = 0; y < f; y++) {
      const cx = free[x]!;
      a[x * f + y] = inverse[cx * m + free[y]!]! + (x === y && n[cx]! > 0 ? n[cx]! / (v[cx]! * v[cx]!) : 0);
    }
  const la = new Float64Array(f * f);
  if (!choleskyInto(a, f, la)) return { value: NaN, gradient: g, hessian: h };
  const rhs = new Float64Array(f);
  const yy = new Float64Array(f);
  const xx = new Float64Array(f);
  for (let k = 0; k < 3; k++) {
    for (let x = 0; x < f; x++) rhs[x] = lam[10 * active[free[x]!]! + 1 + k]!;
    choleskySolveInto(la, f, rhs, yy, xx);
    for (let j = 0; j < 3; j++) {
      let t = 0;
      for (let x = 0; x < f; x++) t += lam[10 * active[free[x]!]! + 1 + j]! * xx[x]!;
      h[j]![k]! += t;
    }
  }
  return { value, gradient: g, hessian: h };
}

/**
 * The factors v maximising phi(v) = sum_c [-v_c Lambda_c + n_c ln v_c] - (v - 1)^T P (v - 1) / 2
 * (P = S^-1; concave) with v_c >= 0 where n_c = 0 (as the per-slice form holds such a factor at 0):
 * projected Newton steps, a factor at 0 whose gradient points below 0 held there, each step
 * halved until phi does not fall. Returns v, the free factors (not held at 0) and phi.
 */
export function maximiseNuisances(
  p: Float64Array,
  big: Float64Array,
  n: Float64Array,
): { v: Float64Array; free: number[]; value: number } {
  const m = big.length;
  const v = new Float64Array(m).fill(1);
  const vTry = new Float64Array(m);
  const grad = new Float64Array(m);
  const objective = (vv: Float64Array): number => {
    let f = 0;
    for (let c = 0; c < m; c++) {
      if (n[c]! > 0 && !(vv[c]! > 0)) return -Infinity;
      f += -vv[c]! * big[c]! + (n[c]! > 0 ? n[c]! * Math.log(vv[c]!) : 0);
    }
    for (let c = 0; c < m; c++) {
      let t = 0;
      for (let d = 0; d < m; d++) t += p[c * m + d]! * (vv[d]! - 1);
      f -= 0.5 * (vv[c]! - 1) * t;
    }
    return f;
  };
  let value = objective(v);
  for (let iter = 0; iter < 200; iter++) {
    for (let c = 0; c < m; c++) {
      let t = -big[c]! + (n[c]! > 0 ? n[c]! / v[c]! : 0);
      for (let d = 0; d < m; d++) t -= p[c * m + d]! * (v[d]! - 1);
      grad[c] = t;
    }
    const free: number[] = [];
    for (let c = 0; c < m; c++) if (n[c]! > 0 || v[c]! > 0 || grad[c]! > 0) free.push(c);
    const f = free.length;
    if (f === 0) break;
    const a = new Float64Array(f * f);
    for (let x = 0; x < f; x++)
      for (let y = 0; y < f; y++) {
        const cx = free[x]!;
        a[x * f + y] = p[cx * m + free[y]!]! + (x === y && n[cx]! > 0 ? n[cx]! / (v[cx]! * v[cx]!) : 0);
      }
    const la = new Float64Array(f * f);
    if (!choleskyInto(a, f, la)) break;
    const rhs = Float64Array.from(free, (c) => grad[c]!);
    const y = new Float64Array(f);
    const step = new Float64Array(f);
    choleskySolveInto(la, f, rhs, y, step);
    let gain = 0;
    for (let x = 0; x < f; x++) gain += rhs[x]! * step[x]!;
    if (!(gain > 0)) break;
    let t = 1;
    let moved = false;
    for (let half = 0; half < 60; half++) {
      vTry.set(v);
      for (let x = 0; x < f; x++) {
        const c = free[x]!;
        const next = v[c]! + t * step[x]!;
        vTry[c] = n[c]! > 0 ? next : Math.max(0, next);
      }
      const fTry = objective(vTry);
      if (fTry >= value) {
        v.set(vTry);
        value = fTry;
        moved = true;
        break;
      }
      t *= 0.5;
    }
    if (!moved) break;
    // converged to rounding: a full step that no longer moves any factor beyond 1e-15
    let size = 0;
    for (let x = 0; x < f; x++) size = Math.max(size, Math.abs(t * step[x]!) / Math.max(1, Math.abs(v[free[x]!]!)));
    if (t === 1 && size < 1e-15) break;
  }
  // the free set at the optimum: a factor held at 0 is fixed there
  const free: number[] = [];
  for (let c = 0; c < m; c++) if (n[c]! > 0 || v[c]! > 0) free.push(c);
  return { v, free, value };
}

/**
 * Shape-only (STY) log-likelihood in [d char, d alpha], with gradient and Hessian.
 * Normalisers D_j(theta) = integral at node j of u^(alpha+1) e^-u c dt (shifted), weighted by the
 * node's number of sources.
 */
export function styLogLikelihood(grid: DensityGrid, stats: CatalogueStats, theta2: readonly number[]): Evaluation {
  const s = grid.shift;
  const [dC, dA] = theta2 as [number, number];
  const n = stats.total;
  const eShift = Math.exp(s * dC);
  let value = dA * stats.sumT + s * dC * stats.sumA1 + n * dA * s * dC - eShift * stats.sumU;
  const g = [s * stats.sumA1 + n * dA * s - s * eShift * stats.sumU, stats.sumT + n * s * dC];
  const h = [
    [-s * s * eShift * stats.sumU, n * s],
    [n * s, 0],
  ];
  const { pointT, pointExpT, pointLogW, pointA1, nodePointStart, nodeLogV } = grid;
  for (let j = 0; j < grid.nodeZ.length; j++) {
    const nj = stats.nodeN[j]!;
    if (nj === 0) continue;
    let D = 0,
      g1 = 0,
      g2 = 0,
      h11 = 0,
      h12 = 0,
      h22 = 0;
    const lv = nodeLogV[j]!;
    for (let q = nodePointStart[j]!; q < nodePointStart[j + 1]!; q++) {
      const y = pointT[q]! + s * dC;
      const a = pointA1[q]! + dA;
      const u = pointExpT[q]! * eShift;
      const w = Math.exp(pointLogW[q]! - lv + a * y - u);
      const dc = s * (a - u);
      D += w;
      g1 += w * dc;
      g2 += w * y;
      h11 += w * (dc * dc - s * s * u);
      h12 += w * (dc * y + s);
      h22 += w * y * y;
    }
    const lnD = Math.log(D);
    const m1 = g1 / D;
    const m2 = g2 / D;
    value -= nj * lnD;
    g[0]! -= nj * m1;
    g[1]! -= nj * m2;
    h[0]![0]! -= nj * (h11 / D - m1 * m1);
    h[0]![1]! -= nj * (h12 / D - m1 * m2);
    h[1]![0]! -= nj * (h12 / D - m1 * m2);
    h[1]![1]! -= nj * (h22 / D - m2 * m2);
  }
  return { value, gradient: g, hessian: h };
}

/** Fit one catalogue. The search starts at the input parameters (theta = 0). */
export function fitCatalogue(
  grid: DensityGrid,
  stats: CatalogueStats,
  cvSigma: ArrayLike<number>,
  estimator: Estimator,
  factor?: PriorFactor,
): FitResult {
  if (stats.total < 3) return { theta: [NaN, NaN, NaN], converged: false };
  if (estimator === 'sty') {
    const r = maximise((x) => styLogLikelihood(grid, stats, x), [0, 0]);
    const ok = r.converged && r.x.every((v) => Number.isFinite(v) && Math.abs(v) < MAX_OFFSET);
    return { theta: [NaN, r.x[0]!, r.x[1]!], converged: ok };
  }
  const buf = new Float64Array(10 * sliceCount(grid));
  const r = maximise((x) => extendedLogLikelihood(grid, stats, cvSigma, x, buf, factor), [0, 0, 0]);
  const ok = r.converged && r.x.every((v) => Number.isFinite(v) && Math.abs(v) < MAX_OFFSET);
  return { theta: [r.x[0]!, r.x[1]!, r.x[2]!], converged: ok };
}
