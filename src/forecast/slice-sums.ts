/**
 * One slice's six Poisson sums -- N = sum g, b_c = sum g dc, b_a = sum g y, F_cc = sum g dc^2,
 * F_ca = sum g dc y, F_aa = sum g y^2 over the density grid's points (src/forecast/fisher.ts) --
 * added to Fisher parts: the slice's information b = (ln 10 N, b_c, b_a) and its block of the
 * 3 x 3 matrix in (log10 phi*, characteristic, alpha). Every maker of Fisher parts (a pass over
 * the grid, the grid's walk, the draws' series) adds its slices through this one function, so
 * their arithmetic is the same.
 */
import type { FisherParts } from './fisher.js';

const LN10 = Math.LN10;

export function addSliceSums(
  parts: FisherParts,
  n: number,
  bc: number,
  ba: number,
  fcc: number,
  fca: number,
  faa: number,
): void {
  const m = [
    [LN10 * LN10 * n, LN10 * bc, LN10 * ba],
    [LN10 * bc, fcc, fca],
    [LN10 * ba, fca, faa],
  ];
  for (let j = 0; j < 3; j++) for (let k = 0; k < 3; k++) parts.matrix[j]![k]! += m[j]![k]!;
  parts.slices.push({ count: n, b: [LN10 * n, bc, ba] });
  parts.count += n;
}
