/**
 * Fisher matrix of the unbinned extended Poisson likelihood (e.g. Cash 1979, ApJ 228, 939 for the
 * likelihood; the information of a Poisson process with intensity lambda is the integral of
 * lambda times the outer product of d ln lambda / d theta):
 *
 *   F_jk = integral dz integral dt lambda(z, t) (d ln lambda / d theta_j)(d ln lambda / d theta_k)
 *
 * with the analytic derivatives of src/forecast/parameters.ts, on the grid of src/forecast/grid.ts.
 *
 * Cosmic variance: one multiplicative normalisation nuisance (1 + eps_i) per slice, with a Gaussian
 * prior of standard deviation sigma_i (the slice's cosmic-variance fraction). The augmented matrix
 *   F_{eps_i eps_i} = N_i + 1/sigma_i^2,   F_{theta eps_i} = b_i = integral over slice i of lambda d ln lambda / d theta
 * is marginalised over the nuisances by the Schur complement:
 *   F_marg = F - sum_i b_i b_i^T / (N_i + 1/sigma_i^2)
 * (a slice with sigma_i = 0 has no nuisance). Slices of one field are correlated (the same large-scale
 * modes span them): marginaliseCorrelated takes the joint prior S_ij = sigma_i sigma_j R_ij (R from
 * src/uncertainty/box-covariance.ts), F_marg = F - B (diag(N) + S^-1)^-1 B^T.
 */
import type { DensityGrid, QuadratureMissed } from './grid.js';
import { sliceCount } from './grid.js';
import { choleskyInto, choleskySolveInto, zeros, type Matrix } from '../numerics/linalg.js';
import { addSliceSums } from './slice-sums.js';

const LN10 = Math.LN10;

export interface SliceInformation {
  /** Expected count N_i in the slice. */
  count: number;
  /** b_i = integral over the slice of lambda d ln lambda / d theta (3 numbers). */
  b: number[];
}

export interface FisherParts {
  /** Poisson-only Fisher matrix (3 x 3) summed over slices. */
  matrix: Matrix;
  slices: SliceInformation[];
  /** Total expected count. */
  count: number;
  /** The slices whose redshift quadrature did not converge (the grid's `quadratureMissed`). */
  quadratureMissed?: QuadratureMissed[];
}

/**
 * Fisher matrix of a Poisson process from quadrature points: weights[q] = lambda_q times the
 * quadrature weight, derivs[j][q] = d ln lambda / d theta_j at point q.
 */
export function fisherFromPoints(weights: ArrayLike<number>, derivs: ArrayLike<number>[]): Matrix {
  const n = derivs.length;
  const f = zeros(n);
  for (let q = 0; q < weights.length; q++) {
    const w = weights[q]!;
    for (let j = 0; j < n; j++) {
      const dj = derivs[j]![q]! * w;
      for (let k = j; k < n; k++) f[j]![k]! += dj * derivs[k]![q]!;
    }
  }
  for (let j = 0; j < n; j++) for (let k = 0; k < j; k++) f[j]![k] = f[k]![j]!;
  return f;
}

/** The Poisson Fisher matrix of a tabulated density at the input parameters, with per-slice parts. */
export function fisherParts(grid: DensityGrid): FisherParts {
  return fisherPartsAt(grid, NO_OFFSET);
}

/** Zero offsets: fisherPartsAt's arithmetic then reduces to the input parameters' exactly (x + 0 = x, x * 1 = x). */
const NO_OFFSET = [0, 0, 0] as const;

/** F - sum_i b_i b_i^T / (N_i + 1/sigma_i^2): the nuisance-marginalised information. */
export function marginaliseNormalisations(
  matrix: Matrix,
  slices: readonly SliceInformation[],
  fractions: readonly number[],
): Matrix {
  if (fractions.length !== slices.length) {
    throw new Error(`cosmic variance: ${fractions.length} fractions given for ${slices.length} slices`);
  }
  const out = matrix.map((r) => [...r]);
  slices.forEach((sl, i) => {
    const sigma = fractions[i]!;
    if (!(sigma >= 0) || !Number.isFinite(sigma))
      throw new Error(`cosmic variance: the fraction of slice ${i} is ${sigma}, not a number >= 0`);
    if (sigma === 0) return;
    const d = sl.count + 1 / (sigma * sigma);
    for (let j = 0; j < out.length; j++) for (let k = 0; k < out.length; k++) out[j]![k]! -= (sl.b[j]! * sl.b[k]!) / d;
  });
  return out;
}

/**
 * marginaliseNormalisations without allocating: `matrix` (p x p) is replaced by the marginalised
 * information, the same sums in the same order. Slice i has count counts[i], b_i = b[p i .. p i + p)
 * and cosmic-variance fraction fractions[i].
 */
export function marginaliseNormalisationsInPlace(
  matrix: Matrix,
  counts: ArrayLike<number>,
  b: ArrayLike<number>,
  fractions: ArrayLike<number>,
): void {
  const p = matrix.length;
  if (fractions.length !== counts.length || b.length !== p * counts.length) {
    throw new Error(`cosmic variance: ${fractions.length} fractions given for ${counts.length} slices`);
  }
  for (let i = 0; i < counts.length; i++) {
    const sigma = fractions[i]!;
    if (!(sigma >= 0) || !Number.isFinite(sigma))
      throw new Error(`cosmic variance: the fraction of slice ${i} is ${sigma}, not a number >= 0`);
    if (sigma === 0) continue;
    const d = counts[i]! + 1 / (sigma * sigma);
    for (let j = 0; j < p; j++) for (let k = 0; k < p; k++) matrix[j]![k]! -= (b[p * i + j]! * b[p * i + k]!) / d;
  }
}

/**
 * The nuisances' joint prior: per-slice fractions f_i and the correlation R_ij of the slices'
 * fluctuations (one field's boxes, src/uncertainty/box-covariance.ts): covariance S_ij = f_i f_j R_ij.
 */
export interface CosmicVariancePrior {
  fractions: readonly number[];
  correlation: readonly (readonly number[])[];
}

/**
 * The lower Cholesky factor L (m x m, row-major) of the prior covariance over the slices `active`
 * (S = L L^T; a pivot that vanishes, for a singular S, leaves its column 0, so that L L^T = S still).
 */
export interface PriorFactor {
  /** The slices with a nuisance (f_i > 0), ascending. */
  active: number[];
  /** L, active.length squared, row-major. */
  l: Float64Array;
  /** S^-1 over the active slices (row-major), when S is positive definite. */
  inverse?: Float64Array;
}

/**
 * The slices with f_i > 0, the Cholesky factor of their prior covariance (priorFactor) and, when
 * that covariance is positive definite (always, for distinct boxes), its inverse (the mock fits'
 * prior term).
 */
export function priorFactorOf(prior: CosmicVariancePrior): PriorFactor {
  const active: number[] = [];
  prior.fractions.forEach((f, i) => {
    if (f > 0) active.push(i);
  });
  const l = priorFactor(prior, active);
  const m = active.length;
  const out: PriorFactor = { active, l };
  let definite = true;
  for (let i = 0; i < m; i++) if (!(l[i * m + i]! > 0)) definite = false;
  if (definite) {
    const inverse = new Float64Array(m * m);
    const e = new Float64Array(m);
    const y = new Float64Array(m);
    const x = new Float64Array(m);
    for (let j = 0; j < m; j++) {
      e.fill(0);
      e[j] = 1;
      choleskySolveInto(l, m, e, y, x);
      for (let i = 0; i < m; i++) inverse[i * m + j] = x[i]!;
    }
    for (let i = 0; i < m; i++)
      for (let j = i + 1; j < m; j++)
        inverse[i * m + j] = inverse[j * m + i] = 0.5 * (inverse[i * m + j]! + inverse[j * m + i]!);
    out.inverse = inverse;
  }
  return out;
}

export function priorFactor(prior: CosmicVariancePrior, active: readonly number[]): Float64Array {
  const m = active.length;
  const f = prior.fractions;
  const l = new Float64Array(m * m);
  for (let j = 0; j < m; j++) {
    const aj = active[j]!;
    let d = f[aj]! * f[aj]!;
    for (let k = 0; k < j; k++) d -= l[j * m + k]! * l[j * m + k]!;
    const scale = f[aj]! * f[aj]!;
    const pivot = d > 1e-12 * scale ? Math.sqrt(d) : 0;
    l[j * m + j] = pivot;
    for (let i = j + 1; i < m; i++) {
      const ai = active[i]!;
      let s = f[ai]! * f[aj]! * prior.correlation[ai]![aj]!;
      for (let k = 0; k < j; k++) s -= l[i * m + k]! * l[j * m + k]!;
      l[i * m + j] = pivot > 0 ? s / pivot : 0;
    }
  }
  return l;
}

/**
 * F - B (diag(N) + S^-1)^-1 B^T for the joint prior S_ij = f_i f_j R_ij on the nuisances, written
 * as F - V (I + L^T diag(N) L)^-1 V^T with S = L L^T and V = B L (the push-through identity: no
 * inverse of S, so a singular S is handled; slices with f_i = 0 have no nuisance). With R the
 * identity it is F - sum_i b_i b_i^T / (N_i + 1/f_i^2). B's column i is b_i (p numbers from
 * b[p i]), N_i = counts[i]. `matrix` (p x p) is replaced.
 */
export function marginaliseCorrelatedInPlace(
  matrix: Matrix,
  counts: ArrayLike<number>,
  b: ArrayLike<number>,
  prior: CosmicVariancePrior,
): void {
  const p = matrix.length;
  const n = counts.length;
  const f = prior.fractions;
  if (f.length !== n || b.length !== p * n || prior.correlation.length !== n) {
    throw new Error(`cosmic variance: ${f.length} fractions given for ${n} slices`);
  }
  const active: number[] = [];
  for (let i = 0; i < n; i++) {
    const sigma = f[i]!;
    if (!(sigma >= 0) || !Number.isFinite(sigma))
      throw new Error(`cosmic variance: the fraction of slice ${i} is ${sigma}, not a number >= 0`);
    if (sigma > 0) active.push(i);
  }
  const m = active.length;
  if (m === 0) return;
  const l = priorFactor(prior, active);
  // V = B L (p x m), A = I + L^T N L (m x m)
  const v = new Float64Array(p * m);
  for (let j = 0; j < p; j++)
    for (let c = 0; c < m; c++) {
      let s = 0;
      for (let i = c; i < m; i++) s += b[p * active[i]! + j]! * l[i * m + c]!;
      v[j * m + c] = s;
    }
  const a = new Float64Array(m * m);
  for (let c = 0; c < m; c++)
    for (let d = c; d < m; d++) {
      let s = c === d ? 1 : 0;
      for (let i = d; i < m; i++) s += l[i * m + c]! * counts[active[i]!]! * l[i * m + d]!;
      a[c * m + d] = a[d * m + c] = s;
    }
  const la = new Float64Array(m * m);
  if (!choleskyInto(a, m, la)) throw new Error("cosmic variance: the nuisances' information is not positive definite");
  const y = new Float64Array(m);
  const x = new Float64Array(m);
  const rhs = new Float64Array(m);
  for (let k = 0; k < p; k++) {
    for (let c = 0; c < m; c++) rhs[c] = v[k * m + c]!;
    choleskySolveInto(la, m, rhs, y, x);
    for (let j = 0; j < p; j++) {
      let s = 0;
      for (let c = 0; c < m; c++) s += v[j * m + c]! * x[c]!;
      matrix[j]![k]! -= s;
    }
  }
  for (let j = 0; j < p; j++)
    for (let k = j + 1; k < p; k++) matrix[j]![k] = matrix[k]![j] = 0.5 * (matrix[j]![k]! + matrix[k]![j]!);
}

/** marginaliseCorrelatedInPlace of a copy, from the slices' parts. */
export function marginaliseCorrelated(
  matrix: Matrix,
  slices: readonly SliceInformation[],
  prior: CosmicVariancePrior,
): Matrix {
  const out = matrix.map((r) => [...r]);
  const p = matrix.length;
  const b = new Float64Array(p * slices.length);
  slices.forEach((sl, i) => sl.b.forEach((x, j) => (b[p * i + j] = x)));
  marginaliseCorrelatedInPlace(
    out,
    slices.map((s) => s.count),
    b,
    prior,
  );
  return out;
}

export interface FisherSummary {
  covariance: Matrix;
  sigma: number[];
  correlation: Matrix;
}

/**
 * Covariance, standard deviations and correlations from a Fisher matrix; undefined if singular.
 * The matrix is scaled to unit diagonal, inverted (the Cholesky factor, one solve per unit vector,
 * round-off symmetrised: src/numerics/linalg.ts inverseSpd's arithmetic, on flat arrays without its
 * intermediate rows) and scaled back. A forecast with the model's draws summarises two matrices per
 * draw, where the rows' allocations and small helpers run cold cost more than the arithmetic.
 */
export function summariseFisher(matrix: Matrix): FisherSummary | undefined {
  const n = matrix.length;
  // Scale to unit diagonal before inverting (the parameters differ in scale by orders of magnitude).
  const d = new Float64Array(n);
  for (let i = 0; i < n; i++) {
    const x = Math.sqrt(matrix[i]![i]!);
    if (!(x > 0) || !Number.isFinite(x)) return undefined;
    d[i] = x;
  }
  const scaled = new Float64Array(n * n);
  for (let i = 0; i < n; i++) {
    const r = matrix[i]!;
    for (let j = 0; j < n; j++) scaled[i * n + j] = r[j]! / (d[i]! * d[j]!);
  }
  const l = new Float64Array(n * n);
  if (!choleskyInto(scaled, n, l)) return undefined;
  // column j of the inverse solves L L^T x = e_j
  const inv = new Float64Array(n * n);
  const e = new Float64Array(n);
  const y = new Float64Array(n);
  const x = new Float64Array(n);
  for (let j = 0; j < n; j++) {
    e.fill(0);
    e[j] = 1;
    choleskySolveInto(l, n, e, y, x);
    for (let i = 0; i < n; i++) inv[i * n + j] = x[i]!;
  }
  // symmetrise round-off
  for (let i = 0; i < n; i++)
    for (let j = i + 1; j < n; j++) inv[i * n + j] = inv[j * n + i] = 0.5 * (inv[i * n + j]! + inv[j * n + i]!);
  const covariance: Matrix = [];
  const sigma: number[] = [];
  for (let i = 0; i < n; i++) {
    const row: number[] = [];
    for (let j = 0; j < n; j++) row.push(inv[i * n + j]! / (d[i]! * d[j]!));
    covariance.push(row);
    const s = Math.sqrt(row[i]!);
    if (!(s > 0) || !Number.isFinite(s)) return undefined;
    sigma.push(s);
  }
  const correlation: Matrix = [];
  for (let i = 0; i < n; i++) {
    const row: number[] = [];
    for (let j = 0; j < n; j++) row.push(i === j ? 1 : covariance[i]![j]! / (sigma[i]! * sigma[j]!));
    correlation.push(row);
  }
  return { covariance, sigma, correlation };
}

/**
 * The Poisson Fisher matrix (with per-slice parts) at parameter offsets theta = [d log10 phi*,
 * d characteristic, d alpha] on the grid tabulated at the input: each point keeps its observed value
 * (so its completeness), and the density and its derivatives are those of grid.ts's lambda_q(theta),
 *   d ln lambda / d log10 phi* = ln 10,  d ln lambda / d c = s (a - u),  d ln lambda / d alpha = y,
 * with y = t + s d_c, u = e^y and a = alpha + 1 + d_alpha (src/forecast/parameters.ts). The grid
 * ends at u = max(u_lim, 1) + 40 at the input; a draw that moves ln u by s d_c < 0 (a brighter
 * knee) ends it at 40 e^(s d_c) or more, so the bright tail left out is of order exp(-40 e^(s d_c))
 * of the count: below 1e-6 for s d_c > -1 (0.43 dex of L*, 1.1 mag of M*, beyond 5 sigma of
 * published uncertainties). At theta = 0 it is the input parameters' information (fisherParts), bit for bit.
 */
export function fisherPartsAt(grid: DensityGrid, theta: ArrayLike<number>): FisherParts {
  const s = grid.shift;
  const dPhi = theta[0]!;
  const dC = theta[1]!;
  const dA = theta[2]!;
  const yShift = s * dC;
  const eShift = Math.exp(yShift);
  const lnPhi = LN10 * dPhi;
  const { pointT, pointExpT, pointLogW, pointA1, nodePointStart, sliceNodeStart } = grid;
  const parts: FisherParts = { matrix: zeros(3), slices: [], count: 0 };
  for (let sl = 0; sl < sliceCount(grid); sl++) {
    let n = 0,
      bc = 0,
      ba = 0,
      fcc = 0,
      fca = 0,
      faa = 0;
    const q0 = nodePointStart[sliceNodeStart[sl]!]!;
    const q1 = nodePointStart[sliceNodeStart[sl + 1]!]!;
    for (let q = q0; q < q1; q++) {
      const y = pointT[q]! + yShift;
      const a = pointA1[q]! + dA;
      const u = pointExpT[q]! * eShift;
      const g = Math.exp(pointLogW[q]! + lnPhi + a * y - u);
      const dc = s * (a - u);
      n += g;
      bc += g * dc;
      ba += g * y;
      fcc += g * dc * dc;
      fca += g * dc * y;
      faa += g * y * y;
    }
    addSliceSums(parts, n, bc, ba, fcc, fca, faa);
  }
  if (grid.quadratureMissed) parts.quadratureMissed = grid.quadratureMissed;
  return parts;
}
