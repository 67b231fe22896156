/**
 * Small dense symmetric matrices (a few parameters): Cholesky factorisation, solve and inverse
 * (Golub & Van Loan, Matrix Computations, 4th ed., section 4.2). Matrices are arrays of rows.
 */

export type Matrix = number[][];

export function zeros(n: number): Matrix {
  return Array.from({ length: n }, () => new Array<number>(n).fill(0));
}

/**
 * Cholesky factor of a symmetric matrix: the lower triangular L with L L^T = A (Golub & Van Loan,
 * algorithm 4.2.1). Returns undefined when A is not positive definite: a pivot that is not finite
 * or is at or below `tolerance` times the largest diagonal element (0: any positive pivot passes).
 */
export function cholesky(a: readonly (readonly number[])[], tolerance = 0): Matrix | undefined {
  const n = a.length;
  let scale = 0;
  for (let i = 0; i < n; i++) scale = Math.max(scale, Math.abs(a[i]![i]!));
  const l = zeros(n);
  for (let j = 0; j < n; j++) {
    let d = a[j]![j]!;
    for (let k = 0; k < j; k++) d -= l[j]![k]! * l[j]![k]!;
    if (!(d > tolerance * scale) || !Number.isFinite(d)) return undefined;
    const ljj = Math.sqrt(d);
    l[j]![j] = ljj;
    for (let i = j + 1; i < n; i++) {
      let s = a[i]![j]!;
      for (let k = 0; k < j; k++) s -= l[i]![k]! * l[j]![k]!;
      l[i]![j] = s / ljj;
    }
  }
  return l;
}

/** Solve (L L^T) x = b. */
export function choleskySolve(l: Matrix, b: ArrayLike<number>): number[] {
  const n = l.length;
  const y = new Array<number>(n);
  for (let i = 0; i < n; i++) {
    let s = b[i]!;
    for (let k = 0; k < i; k++) s -= l[i]![k]! * y[k]!;
    y[i] = s / l[i]![i]!;
  }
  const x = new Array<number>(n);
  for (let i = n - 1; i >= 0; i--) {
    let s = y[i]!;
    for (let k = i + 1; k < n; k++) s -= l[k]![i]! * x[k]!;
    x[i] = s / l[i]![i]!;
  }
  return x;
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
