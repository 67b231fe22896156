/**
 * The plan's 3 x 3 Fisher arithmetic written out for three parameters: marginaliseSymmetric3 (the
 * cosmic-variance nuisances of src/forecast/fisher.ts's marginaliseNormalisationsInPlace) and
 * fisherSigma (one standard deviation).
 *
 * One standard deviation from a 3 x 3 Fisher matrix without allocating: summariseFisher(f)?.sigma[j]
 * (src/forecast/fisher.ts) with the same arithmetic in the same order (scaling to unit diagonal,
 * the Cholesky factor of src/numerics/linalg.ts, one solve per column of the inverse, the diagonal
 * scaled back), so the same number bit for bit (test/planning/sigma.test.ts), undefined where
 * summariseFisher gives undefined. The robust ranking evaluates it for every design under every
 * model draw and the search for every design: summariseFisher builds a dozen arrays per call.
 *
 * Written out for n = 3, without loops: the loops of choleskyInto and choleskySolveInto inlined
 * here made the engine's optimising compiler peel and inline nested loops at every start (one of
 * the largest compilations of a plan). Each line below is one step of those loops, zeros included
 * (x - 0 * y is not always x: signed zeros, NaN), in their order.
 */
import { choleskyInto } from '../numerics/linalg.js';

/** The column j of the inverse of L L^T (forward then back substitution of the unit vector e_j): its element j. */
function inverseDiagonal(
  j: number,
  l00: number,
  l10: number,
  l11: number,
  l20: number,
  l21: number,
  l22: number,
): number {
  const e0 = j === 0 ? 1 : 0;
  const e1 = j === 1 ? 1 : 0;
  const e2 = j === 2 ? 1 : 0;
  // L y = e
  const y0 = e0 / l00;
  const y1 = (e1 - l10 * y0) / l11;
  let s = e2;
  s -= l20 * y0;
  s -= l21 * y1;
  const y2 = s / l22;
  // L^T x = y
  const x2 = y2 / l22;
  const x1 = (y1 - l21 * x2) / l11;
  let t = y0;
  t -= l10 * x1;
  t -= l20 * x2;
  const x0 = t / l00;
  return j === 0 ? x0 : j === 1 ? x1 : x2;
}

/** sqrt(v / (d d)) where that is a positive finite number, else NaN. */
function scaledBack(v: number, d: number): number {
  const s = Math.sqrt(v / (d * d));
  return s > 0 && Number.isFinite(s) ? s : NaN;
}

/** summariseFisher(fisher)?.sigma[index] of a 3 x 3 matrix, bit for bit, without allocating. */
export function fisherSigma(fisher: readonly (readonly number[])[], index: number): number | undefined {
  const f0 = fisher[0]!;
  const f1 = fisher[1]!;
  const f2 = fisher[2]!;
  return sigmaOfLower(f0[0]!, f1[0]!, f1[1]!, f2[0]!, f2[1]!, f2[2]!, index);
}

/**
 * fisherSigma of the symmetric matrix whose upper triangle is u = [f00, f01, f02, f11, f12, f22]
 * (summariseFisher reads the diagonal and the lower triangle, the mirror of these).
 */
export function fisherSigmaUpper(u: Float64Array, index: number): number | undefined {
  return sigmaOfLower(u[0]!, u[1]!, u[3]!, u[2]!, u[4]!, u[5]!, index);
}

/** fisherSigma from the elements it reads: the diagonal and the lower triangle. */
function sigmaOfLower(
  f00: number,
  f10: number,
  f11: number,
  f20: number,
  f21: number,
  f22: number,
  index: number,
): number | undefined {
  const d0 = Math.sqrt(f00);
  if (!(d0 > 0) || !Number.isFinite(d0)) return undefined;
  const d1 = Math.sqrt(f11);
  if (!(d1 > 0) || !Number.isFinite(d1)) return undefined;
  const d2 = Math.sqrt(f22);
  if (!(d2 > 0) || !Number.isFinite(d2)) return undefined;
  // the scaled matrix (its upper triangle is not read by the factor)
  const a00 = f00 / (d0 * d0);
  const a10 = f10 / (d1 * d0);
  const a11 = f11 / (d1 * d1);
  const a20 = f20 / (d2 * d0);
  const a21 = f21 / (d2 * d1);
  const a22 = f22 / (d2 * d2);
  // choleskyInto with tolerance 0: a pivot must exceed 0 * scale (NaN when the scale is not finite)
  let scale = 0;
  scale = Math.max(scale, Math.abs(a00));
  scale = Math.max(scale, Math.abs(a11));
  scale = Math.max(scale, Math.abs(a22));
  const floor = 0 * scale;
  const p0 = a00;
  if (!(p0 > floor) || !Number.isFinite(p0)) return undefined;
  const l00 = Math.sqrt(p0);
  const l10 = a10 / l00;
  const l20 = a20 / l00;
  let p1 = a11;
  p1 -= l10 * l10;
  if (!(p1 > floor) || !Number.isFinite(p1)) return undefined;
  const l11 = Math.sqrt(p1);
  let s21 = a21;
  s21 -= l20 * l10;
  const l21 = s21 / l11;
  let p2 = a22;
  p2 -= l20 * l20;
  p2 -= l21 * l21;
  if (!(p2 > floor) || !Number.isFinite(p2)) return undefined;
  const l22 = Math.sqrt(p2);
  const s0 = scaledBack(inverseDiagonal(0, l00, l10, l11, l20, l21, l22), d0);
  const s1 = scaledBack(inverseDiagonal(1, l00, l10, l11, l20, l21, l22), d1);
  const s2 = scaledBack(inverseDiagonal(2, l00, l10, l11, l20, l21, l22), d2);
  if (Number.isNaN(s0) || Number.isNaN(s1) || Number.isNaN(s2)) return undefined;
  return index === 0 ? s0 : index === 1 ? s1 : index === 2 ? s2 : 0;
}

const LN10 = Math.LN10;

/**
 * One slice's part of a design's Fisher matrix for (log10 phi*, L* or M*, alpha), from the slice's
 * six sums s = [N, b_1, b_2, F_11, F_12, F_22] (src/planning/tables.ts) times `scale`: adds it to
 * the upper triangle u = [m00, m01, m02, m11, m12, m22] (m00 += ln10^2 N, m01 += ln10 b_1,
 * m02 += ln10 b_2, the rest as they are, since d N / d log10 phi* = ln10 N), sets the slice's
 * count and its b = [ln10 N, b_1, b_2] for marginaliseSymmetric3, and returns N. The design model
 * and the robust ranking both build their matrices with it.
 */
export function addSliceSums(
  u: Float64Array,
  s: ArrayLike<number>,
  scale: number,
  counts: Float64Array,
  b: Float64Array,
  sl: number,
): number {
  const n = s[0]! * scale;
  const b1 = s[1]! * scale;
  const b2 = s[2]! * scale;
  u[0] = u[0]! + LN10 * LN10 * n;
  u[1] = u[1]! + LN10 * b1;
  u[2] = u[2]! + LN10 * b2;
  u[3] = u[3]! + s[3]! * scale;
  u[4] = u[4]! + s[4]! * scale;
  u[5] = u[5]! + s[5]! * scale;
  counts[sl] = n;
  b[3 * sl] = LN10 * n;
  b[3 * sl + 1] = b1;
  b[3 * sl + 2] = b2;
  return n;
}

/**
 * marginaliseNormalisationsInPlace (src/forecast/fisher.ts) of a symmetric 3 x 3 matrix held as its
 * upper triangle m = [m00, m01, m02, m11, m12, m22]: per slice i with a fraction sigma_i > 0, each
 * element less b_ij b_ik / (N_i + 1 / sigma_i^2), slice after slice, bit for bit the same numbers
 * (b_ij b_ik and b_ik b_ij are the same product, so the lower triangle it also updates stays the
 * mirror of the upper), with the same refusals (test/planning/sigma.test.ts). One loop without
 * nested ones: the design model and the robust ranking run it for every design.
 */
export function marginaliseSymmetric3(
  m: Float64Array,
  counts: ArrayLike<number>,
  b: ArrayLike<number>,
  fractions: ArrayLike<number>,
  correlation?: Float64Array,
): void {
  const n = counts.length;
  if (fractions.length !== n || b.length !== 3 * n) {
    throw new Error(`cosmic variance: ${fractions.length} fractions given for ${n} slices`);
  }
  if (correlation) {
    marginaliseCorrelated3(m, counts, b, fractions, correlation);
    return;
  }
  let m00 = m[0]!;
  let m01 = m[1]!;
  let m02 = m[2]!;
  let m11 = m[3]!;
  let m12 = m[4]!;
  let m22 = m[5]!;
  for (let i = 0; i < n; i++) {
    const sigma = fractions[i]!;
    if (!(sigma >= 0) || !Number.isFinite(sigma))
      throw new Error(`cosmic variance: the fraction of slice ${i} is ${sigma}, not a number >= 0`);
    if (sigma === 0) continue;
    const d = counts[i]! + 1 / (sigma * sigma);
    const b0 = b[3 * i]!;
    const b1 = b[3 * i + 1]!;
    const b2 = b[3 * i + 2]!;
    m00 -= (b0 * b0) / d;
    m01 -= (b0 * b1) / d;
    m02 -= (b0 * b2) / d;
    m11 -= (b1 * b1) / d;
    m12 -= (b1 * b2) / d;
    m22 -= (b2 * b2) / d;
  }
  m[0] = m00;
  m[1] = m01;
  m[2] = m02;
  m[3] = m11;
  m[4] = m12;
  m[5] = m22;
}

/**
 * Scratch space of marginaliseCorrelated3, grown as needed (one design after another, never at
 * once): arrays of their own rather than views of one, so that a call allocates nothing (a
 * subarray is a new object).
 */
let scratchActive = new Float64Array(0);
let scratchL = new Float64Array(0);
let scratchA = new Float64Array(0);
let scratchLA = new Float64Array(0);
let scratchV = new Float64Array(0);
let scratchX = new Float64Array(0);
let scratchLT = new Float64Array(0);
let scratchN = new Float64Array(0);
let scratchB = new Float64Array(0);

/**
 * marginaliseCorrelatedInPlace (src/forecast/fisher.ts) of the upper triangle m with the joint
 * prior S_ij = f_i f_j R_ij (R row-major in `correlation`, n x n): the same factorisations and sums
 * on flat scratch space, so that the design model allocates nothing per design; the last step
 * subtracts the mean of V_j X_k and V_k X_j at once where the forecast subtracts each and then
 * averages the two elements, so the two agree to rounding (test/planning/sigma.test.ts).
 */
function marginaliseCorrelated3(
  m: Float64Array,
  counts: ArrayLike<number>,
  b: ArrayLike<number>,
  fractions: ArrayLike<number>,
  correlation: Float64Array,
): void {
  const n = counts.length;
  if (correlation.length !== n * n)
    throw new Error(`cosmic variance: a correlation of ${correlation.length} numbers for ${n} slices`);
  if (scratchActive.length < n) {
    scratchActive = new Float64Array(n);
    scratchL = new Float64Array(n * n);
    scratchA = new Float64Array(n * n);
    scratchLA = new Float64Array(n * n);
    scratchV = new Float64Array(3 * n);
    scratchX = new Float64Array(3 * n);
    scratchLT = new Float64Array(n * n);
    scratchN = new Float64Array(n);
    scratchB = new Float64Array(3 * n);
  }
  const active = scratchActive;
  const l = scratchL;
  const a = scratchA;
  const la = scratchLA;
  const v = scratchV;
  const x = scratchX;
  const lt = scratchLT;
  const na = scratchN;
  const ba = scratchB;
  let k = 0;
  for (let i = 0; i < n; i++) {
    const sigma = fractions[i]!;
    if (!(sigma >= 0) || !Number.isFinite(sigma))
      throw new Error(`cosmic variance: the fraction of slice ${i} is ${sigma}, not a number >= 0`);
    if (sigma > 0) active[k++] = i;
  }
  const q = k;
  if (q === 0) return;
  // L: the prior's Cholesky factor (a vanishing pivot leaves its column 0), as fisher.ts priorFactor
  for (let j = 0; j < q; j++) {
    const aj = active[j]!;
    const fj = fractions[aj]!;
    let d = fj * fj;
    for (let c = 0; c < j; c++) d -= l[j * q + c]! * l[j * q + c]!;
    const pivot = d > 1e-12 * fj * fj ? Math.sqrt(d) : 0;
    for (let c = j + 1; c < q; c++) l[j * q + c] = 0;
    l[j * q + j] = pivot;
    for (let i = j + 1; i < q; i++) {
      const ai = active[i]!;
      let t = fractions[ai]! * fj * correlation[ai * n + aj]!;
      for (let c = 0; c < j; c++) t -= l[i * q + c]! * l[j * q + c]!;
      l[i * q + j] = pivot > 0 ? t / pivot : 0;
    }
  }
  // V = B L (3 x q), A = I + L^T N L, summed over L's columns (held as the rows of its transpose,
  // so that each sum reads memory in order: the same products in the same order as from L itself)
  for (let i = 0; i < q; i++) {
    const ai = active[i]!;
    na[i] = counts[ai]!;
    for (let j = 0; j < 3; j++) ba[j * q + i] = b[3 * ai + j]!;
    for (let c = 0; c <= i; c++) lt[c * q + i] = l[i * q + c]!;
  }
  for (let j = 0; j < 3; j++)
    for (let c = 0; c < q; c++) {
      let t = 0;
      for (let i = c; i < q; i++) t += ba[j * q + i]! * lt[c * q + i]!;
      v[j * q + c] = t;
    }
  for (let c = 0; c < q; c++)
    for (let d = c; d < q; d++) {
      let t = c === d ? 1 : 0;
      for (let i = d; i < q; i++) t += lt[c * q + i]! * na[i]! * lt[d * q + i]!;
      a[c * q + d] = a[d * q + c] = t;
    }
  if (!choleskyInto(a, q, la)) throw new Error("cosmic variance: the nuisances' information is not positive definite");
  // x_k = A^-1 V_k (forward and back substitution in place)
  for (let r = 0; r < 3; r++) {
    for (let i = 0; i < q; i++) {
      let t = v[r * q + i]!;
      for (let c = 0; c < i; c++) t -= la[i * q + c]! * x[r * q + c]!;
      x[r * q + i] = t / la[i * q + i]!;
    }
    for (let i = q - 1; i >= 0; i--) {
      let t = x[r * q + i]!;
      for (let c = i + 1; c < q; c++) t -= la[c * q + i]! * x[r * q + c]!;
      x[r * q + i] = t / la[i * q + i]!;
    }
  }
  // the nine products of V's rows with X's, in one loop (each summed in the order of i, so the same
  // numbers as nine loops, which V8 inlined and peeled one by one)
  let d00 = 0;
  let d01 = 0;
  let d02 = 0;
  let d10 = 0;
  let d11 = 0;
  let d12 = 0;
  let d20 = 0;
  let d21 = 0;
  let d22 = 0;
  for (let i = 0; i < q; i++) {
    const v0 = v[i]!;
    const v1 = v[q + i]!;
    const v2 = v[2 * q + i]!;
    const x0 = x[i]!;
    const x1 = x[q + i]!;
    const x2 = x[2 * q + i]!;
    d00 += v0 * x0;
    d01 += v0 * x1;
    d02 += v0 * x2;
    d10 += v1 * x0;
    d11 += v1 * x1;
    d12 += v1 * x2;
    d20 += v2 * x0;
    d21 += v2 * x1;
    d22 += v2 * x2;
  }
  m[0] = m[0]! - d00;
  m[1] = m[1]! - 0.5 * (d01 + d10);
  m[2] = m[2]! - 0.5 * (d02 + d20);
  m[3] = m[3]! - d11;
  m[4] = m[4]! - 0.5 * (d12 + d21);
  m[5] = m[5]! - d22;
}
