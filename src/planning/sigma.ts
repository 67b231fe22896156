/**
 * One standard deviation from a 3 x 3 Fisher matrix without allocating: summariseFisher(f)?.sigma[j]
 * (src/forecast/fisher.ts) with the same arithmetic in the same order (scaling to unit diagonal,
 * the Cholesky factor of src/numerics/linalg.ts, one solve per column of the inverse, the diagonal
 * scaled back), so the same number bit for bit (test/planning/sigma.test.ts), undefined where
 * summariseFisher gives undefined. The robust ranking evaluates it for every design under every
 * model draw and the search for every design: summariseFisher builds a dozen arrays per call.
 */

import { choleskyInto, choleskySolveInto } from '../numerics/linalg.js';

const N = 3;
/** Scratch: the scale d, the scaled matrix, its factor L, a unit vector, one solve's y and x, the inverse's diagonal. */
const d = new Float64Array(N);
const a = new Float64Array(N * N);
const l = new Float64Array(N * N);
const e = new Float64Array(N);
const y = new Float64Array(N);
const x = new Float64Array(N);
const diag = new Float64Array(N);

/** Column j of the inverse (the solve of the unit vector e_j): its diagonal element into diag[j]. */
function inverseDiagonal(j: number): void {
  e.fill(0);
  e[j] = 1;
  choleskySolveInto(l, N, e, y, x);
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
  if (!choleskyInto(a, N, l)) return undefined;
  for (let j = 0; j < N; j++) inverseDiagonal(j);
  let out = 0;
  for (let i = 0; i < N; i++) {
    const s = Math.sqrt(diag[i]! / (d[i]! * d[i]!));
    if (!(s > 0) || !Number.isFinite(s)) return undefined;
    if (i === index) out = s;
  }
  return out;
}
