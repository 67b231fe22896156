/**
 * Small dense symmetric matrices (a few parameters): Cholesky factorisation, solve and inverse
 * (Golub & Van Loan, Matrix Computations, 4th ed., section 4.2). Matrices are arrays of rows.
 */

export type Matrix = number[][];

export function zeros(n: number): Matrix {
  return Array.from({ length: n }, () => new Array<number>(n).fill(0));
}

/** Lower-triangular L with A = L L^T, or undefined when A is not (numerically) positive definite. */
export function cholesky(a: Matrix): Matrix | undefined {
  const n = a.length;
  const l = zeros(n);
  for (let j = 0; j < n; j++) {
    let d = a[j]![j]!;
    for (let k = 0; k < j; k++) d -= l[j]![k]! ** 2;
    if (!(d > 0) || !Number.isFinite(d)) return undefined;
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
