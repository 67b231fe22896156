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
 * (a slice with sigma_i = 0 has no nuisance).
 */
import type { DensityGrid } from './grid.js';
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
  return parts;
}
