/**
 * One standard deviation from a 3 x 3 Fisher matrix without allocating: summariseFisher(f)?.sigma[j]
 * (src/forecast/fisher.ts) with the same arithmetic in the same order (scaling to unit diagonal,
 * the Cholesky factor of src/numerics/linalg.ts, one solve per column of the inverse, the diagonal
 * scaled back), so the same number bit for bit (test/planning/sigma.test.ts), undefined where
 * summariseFisher gives undefined. The robust ranking evaluates it for every design under every
 * model draw and the search for every design: summariseFisher builds a dozen arrays per call.
 */

const N = 3;
/** Scratch: the scale d, the scaled matrix, its factor L, one column's y and x, the inverse's diagonal. */
const d = new Float64Array(N);
const a = new Float64Array(N * N);
const l = new Float64Array(N * N);
const y = new Float64Array(N);
const x = new Float64Array(N);
const diag = new Float64Array(N);

/** The scaled matrix's Cholesky factor into l (cholesky with tolerance 0); false where it has none. */
function factor(): boolean {
  let scale = 0;
  for (let i = 0; i < N; i++) scale = Math.max(scale, Math.abs(a[i * N + i]!));
  l.fill(0);
  for (let j = 0; j < N; j++) {
    let s0 = a[j * N + j]!;
    for (let k = 0; k < j; k++) s0 -= l[j * N + k]! * l[j * N + k]!;
    if (!(s0 > 0 * scale) || !Number.isFinite(s0)) return false;
    const ljj = Math.sqrt(s0);
    l[j * N + j] = ljj;
    for (let i = j + 1; i < N; i++) {
      let s = a[i * N + j]!;
      for (let k = 0; k < j; k++) s -= l[i * N + k]! * l[j * N + k]!;
      l[i * N + j] = s / ljj;
    }
  }
  return true;
}

/** Column j of the inverse (choleskySolve of the unit vector e_j): its diagonal element into diag[j]. */
function inverseDiagonal(j: number): void {
  for (let i = 0; i < N; i++) {
    let s = i === j ? 1 : 0;
    for (let k = 0; k < i; k++) s -= l[i * N + k]! * y[k]!;
    y[i] = s / l[i * N + i]!;
  }
  for (let i = N - 1; i >= 0; i--) {
    let s = y[i]!;
    for (let k = i + 1; k < N; k++) s -= l[k * N + i]! * x[k]!;
    x[i] = s / l[i * N + i]!;
  }
  diag[j] = x[j]!;
}

/** summariseFisher(fisher)?.sigma[index] of a 3 x 3 matrix, bit for bit, without allocating. */
export function fisherSigma(fisher: readonly (readonly number[])[], index: number): number | undefined {
  for (let i = 0; i < N; i++) {
    const v = Math.sqrt(fisher[i]![i]!);
    if (!(v > 0) || !Number.isFinite(v)) return undefined;
    d[i] = v;
  }
  for (let i = 0; i < N; i++) for (let j = 0; j < N; j++) a[i * N + j] = fisher[i]![j]! / (d[i]! * d[j]!);
  if (!factor()) return undefined;
  for (let j = 0; j < N; j++) inverseDiagonal(j);
  let out = 0;
  for (let i = 0; i < N; i++) {
    const s = Math.sqrt(diag[i]! / (d[i]! * d[i]!));
    if (!(s > 0) || !Number.isFinite(s)) return undefined;
    if (i === index) out = s;
  }
  return out;
}
