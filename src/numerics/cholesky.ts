/**
 * Cholesky factor of a symmetric matrix: the lower triangular L with L L^T = A
 * (Golub & Van Loan, Matrix Computations, algorithm 4.2.1, from memory). Returns undefined when A
 * is not positive definite: a pivot at or below `tolerance` times the largest diagonal element.
 */
export function cholesky(a: readonly (readonly number[])[], tolerance = 1e-14): number[][] | undefined {
  const n = a.length;
  let scale = 0;
  for (let i = 0; i < n; i++) scale = Math.max(scale, Math.abs(a[i]![i]!));
  const l: number[][] = Array.from({ length: n }, () => new Array<number>(n).fill(0));
  for (let j = 0; j < n; j++) {
    let d = a[j]![j]!;
    for (let k = 0; k < j; k++) d -= l[j]![k]! * l[j]![k]!;
    if (!(d > tolerance * scale)) return undefined;
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
