/**
 * 3 x 3 Fisher matrices a summary must refuse (no inverse that is a covariance): singular,
 * indefinite, a zero or negative diagonal, NaN or Infinity in an entry, and a subnormal diagonal
 * whose inverse overflows. Common practice for a Cholesky-based inverse: each gives a pivot that is
 * not a positive finite number, or a covariance that is not finite. Shared by the forecast's and the
 * plan's tests of their summaries.
 */
export const REFUSED_MATRICES: readonly number[][][] = [
  [
    [1, 1, 0],
    [1, 1, 0],
    [0, 0, 1],
  ],
  [
    [1, 2, 0],
    [2, 1, 0],
    [0, 0, 1],
  ],
  [
    [0, 0, 0],
    [0, 1, 0],
    [0, 0, 1],
  ],
  [
    [-1, 0, 0],
    [0, 1, 0],
    [0, 0, 1],
  ],
  [
    [NaN, 0, 0],
    [0, 1, 0],
    [0, 0, 1],
  ],
  [
    [1, NaN, 0],
    [NaN, 1, 0],
    [0, 0, 1],
  ],
  [
    [Infinity, 0, 0],
    [0, 1, 0],
    [0, 0, 1],
  ],
  [
    [1, 0, 0],
    [0, 1, 0],
    [0, 0, 1e-320],
  ],
];
