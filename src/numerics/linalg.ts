/**
 * Small dense symmetric matrices (a few parameters): Cholesky factorisation, solve and inverse
 * (Golub & Van Loan, Matrix Computations, 4th ed., section 4.2). Matrices are arrays of rows.
 */

export type Matrix = number[][];

export function zeros(n: number): Matrix {
  return Array.from({ length: n }, () => new Array<number>(n).fill(0));
}

/**
 * The Cholesky factorisation on flat row-major arrays (element (i, j) at i n + j), writing into
 * `l` (n x n, zeroed here): the one factorisation, which `cholesky` and the allocation-free sigma of
 * the plan's search (src/planning/sigma.ts) both use. The lower triangular L with L L^T = A (Golub &
 * Van Loan, algorithm 4.2.1); false when A is not positive definite: a pivot that is not finite or is
 * at or below `tolerance` times the largest diagonal element (0: any positive pivot passes).
 */
export function choleskyInto(a: ArrayLike<number>, n: number, l: Float64Array, tolerance = 0): boolean {
  let scale = 0;
  for (let i = 0; i < n; i++) scale = Math.max(scale, Math.abs(a[i * n + i]!));
  l.fill(0, 0, n * n);
  for (let j = 0; j < n; j++) {
    let d = a[j * n + j]!;
    for (let k = 0; k < j; k++) d -= l[j * n + k]! * l[j * n + k]!;
    if (!(d > tolerance * scale) || !Number.isFinite(d)) return false;
    const ljj = Math.sqrt(d);
    l[j * n + j] = ljj;
    for (let i = j + 1; i < n; i++) {
      let s = a[i * n + j]!;
      for (let k = 0; k < j; k++) s -= l[i * n + k]! * l[j * n + k]!;
      l[i * n + j] = s / ljj;
    }
  }
  return true;
}

/** Solve (L L^T) x = b with L flat as choleskyInto writes it, `y` scratch of length n: the one solve. */
export function choleskySolveInto(
  l: ArrayLike<number>,
  n: number,
  b: ArrayLike<number>,
  y: Float64Array,
  x: Float64Array,
): void {
  for (let i = 0; i < n; i++) {
    let s = b[i]!;
    for (let k = 0; k < i; k++) s -= l[i * n + k]! * y[k]!;
    y[i] = s / l[i * n + i]!;
  }
  for (let i = n - 1; i >= 0; i--) {
    let s = y[i]!;
    for (let k = i + 1; k < n; k++) s -= l[k * n + i]! * x[k]!;
    x[i] = s / l[i * n + i]!;
  }
}

/** A matrix of rows as one flat row-major array. */
function flat(m: readonly (readonly number[])[]): Float64Array {
  const n = m.length;
  const out = new Float64Array(n * n);
  for (let i = 0; i < n; i++) for (let j = 0; j < n; j++) out[i * n + j] = m[i]![j]!;
  return out;
}

/**
 * Cholesky factor of a symmetric matrix as rows (choleskyInto: the same numbers), or undefined when
 * A is not positive definite (see choleskyInto for `tolerance`).
 */
export function cholesky(a: readonly (readonly number[])[], tolerance = 0): Matrix | undefined {
  const n = a.length;
  const l = new Float64Array(n * n);
  if (!choleskyInto(flat(a), n, l, tolerance)) return undefined;
  return Array.from({ length: n }, (_, i) => Array.from(l.subarray(i * n, i * n + n)));
}

/** Solve (L L^T) x = b (choleskySolveInto: the same numbers). */
export function choleskySolve(l: Matrix, b: ArrayLike<number>): number[] {
  const n = l.length;
  const x = new Float64Array(n);
  choleskySolveInto(flat(l), n, b, new Float64Array(n), x);
  return Array.from(x);
}

/** Inverse of a symmetric positive-definite matrix, or undefined when it is not positive definite. */
export function inverseSpd(a: Matrix): Matrix | undefined {
  const l = cholesky(a);
  if (!l) return undefined;
  const n = a.length;
  const inv = zeros(n);
  for (let j = 0; j < n; j++) {
    const e = new Array<number>(n).fill(0);
    e[j] = 1;
    const col = choleskySolve(l, e);
    for (let i = 0; i < n; i++) inv[i]![j] = col[i]!;
  }
  // symmetrise round-off
  for (let i = 0; i < n; i++)
    for (let j = i + 1; j < n; j++) inv[i]![j] = inv[j]![i] = 0.5 * (inv[i]![j]! + inv[j]![i]!);
  return inv;
}
