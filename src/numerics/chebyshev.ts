/**
 * Tensor-product Chebyshev interpolation of a smooth function of two variables on a rectangle
 * (Trefethen, "Approximation Theory and Approximation Practice", 2013, chapters 3-4 and 8): values
 * at the Chebyshev points of the first kind x_k = cos(pi (k + 1/2) / n), coefficients by the
 * discrete cosine sums (Numerical Recipes, 3rd ed., section 5.8), evaluation by Clenshaw's
 * recurrence. For a function analytic on the rectangle the coefficients fall geometrically, so the
 * largest of the last two rows and columns bounds the truncation error (the stopping rule of
 * Chebfun, common practice).
 */

/**
 * The cosine tables made so far, by n (a few sizes serve every series; read-only once made); that
 * of one point, cos 0 = 1, from the start (a series constant along one variable takes it without
 * its points being asked for).
 */
const cosineTables = new Map<number, Float64Array>([[1, Float64Array.of(1)]]);

export interface Chebyshev2D {
  /** Points (and coefficients) along x and y. */
  nx: number;
  ny: number;
  x0: number;
  x1: number;
  y0: number;
  y1: number;
  /** coef[i * ny + j] multiplies T_i(x') T_j(y'), x' and y' mapped onto [-1, 1]. */
  coef: Float64Array;
}

/**
 * The n Chebyshev points of the first kind on [a, b] (one point, the middle, when n = 1). Makes the
 * cosine table of n too (cosineTable), where it is not made yet: every series is made from values
 * at these points, so chebyshev2D, which V8 optimises early, then finds its tables made and does not
 * meet the loop that makes one (code without type feedback there: see makeCosineTable).
 */
export function chebyshevPoints(n: number, a: number, b: number): Float64Array {
  if (!cosineTables.has(n)) makeCosineTable(n);
  const out = new Float64Array(n);
  for (let k = 0; k < n; k++) out[k] = 0.5 * (a + b) + 0.5 * (b - a) * Math.cos((Math.PI * (k + 0.5)) / n);
  return out;
}

/** The interpolant of the values v[i * ny + j] = f(x_i, y_j) at the Chebyshev points of [x0, x1] x [y0, y1]. */
export function chebyshev2D(
  v: Float64Array,
  nx: number,
  ny: number,
  x0: number,
  x1: number,
  y0: number,
  y1: number,
): Chebyshev2D {
  const cx = cosineTable(nx);
  const cy = cosineTable(ny);
  // along y first (each row i), then along x
  const tmp = new Float64Array(nx * ny);
  for (let i = 0; i < nx; i++)
    for (let q = 0; q < ny; q++) {
      let s = 0;
      for (let l = 0; l < ny; l++) s += v[i * ny + l]! * cy[q * ny + l]!;
      tmp[i * ny + q] = ((q === 0 ? 1 : 2) / ny) * s;
    }
  const coef = new Float64Array(nx * ny);
  for (let p = 0; p < nx; p++)
    for (let q = 0; q < ny; q++) {
      let s = 0;
      for (let k = 0; k < nx; k++) s += tmp[k * ny + q]! * cx[p * nx + k]!;
      coef[p * ny + q] = ((p === 0 ? 1 : 2) / nx) * s;
    }
  return { nx, ny, x0, x1, y0, y1, coef };
}

/** cos(pi p (k + 1/2) / n) at [p * n + k]: T_p at the k-th point. */
function cosineTable(n: number): Float64Array {
  return cosineTables.get(n) ?? makeCosineTable(n);
}

/**
 * The cosine table of a new size, a function of its own, made by chebyshevPoints before
 * chebyshev2D needs it: a cold process makes its first tables in the first calls of a function,
 * before V8 keeps type feedback for it, so code that makes a table later has none, and
 * chebyshev2D, optimised with such code inlined, threw its compiled code away at the first new
 * size (a second compilation of some 20 million instructions).
 */
function makeCosineTable(n: number): Float64Array {
  const t = new Float64Array(n * n);
  for (let p = 0; p < n; p++) for (let k = 0; k < n; k++) t[p * n + k] = Math.cos((Math.PI * p * (k + 0.5)) / n);
  cosineTables.set(n, t);
  return t;
}

/**
 * The truncation error estimated from the coefficients: along x, the sum over j of the largest
 * |coefficient| of the last two rows (0 with fewer than 4 points, where no tail can be seen), and
 * along y the same over the last two columns.
 */
export function chebyshevTail(c: Chebyshev2D): { x: number; y: number } {
  const { nx, ny, coef } = c;
  let x = 0;
  let y = 0;
  if (nx >= 4)
    for (let j = 0; j < ny; j++) x += Math.max(Math.abs(coef[(nx - 1) * ny + j]!), Math.abs(coef[(nx - 2) * ny + j]!));
  if (ny >= 4)
    for (let i = 0; i < nx; i++) y += Math.max(Math.abs(coef[i * ny + ny - 1]!), Math.abs(coef[i * ny + ny - 2]!));
  return { x, y };
}

function unit(v: number, a: number, b: number): number {
  return b > a ? (2 * v - a - b) / (b - a) : 0;
}

/** The interpolant at (x, y) (inside the rectangle; outside it extrapolates). */
export function chebyshevAt(c: Chebyshev2D, x: number, y: number): number {
  const { nx, ny, coef } = c;
  const tx = unit(x, c.x0, c.x1);
  const ty = unit(y, c.y0, c.y1);
  // Clenshaw along x over the rows, each row's value by Clenshaw along y
  let b1 = 0;
  let b2 = 0;
  for (let i = nx - 1; i >= 0; i--) {
    let d1 = 0;
    let d2 = 0;
    for (let j = ny - 1; j >= 1; j--) {
      const d = 2 * ty * d1 - d2 + coef[i * ny + j]!;
      d2 = d1;
      d1 = d;
    }
    const row = ty * d1 - d2 + coef[i * ny]!;
    if (i === 0) return tx * b1 - b2 + row;
    const b = 2 * tx * b1 - b2 + row;
    b2 = b1;
    b1 = b;
  }
  return 0;
}

/**
 * The series at x as a series in y alone: out[j] = sum_i coef[i, j] T_i(x') (the first ny entries
 * of `out`). With chebyshevAtY it gives the values at many y for one x at the cost of one
 * chebyshevAt plus ny operations per y.
 */
export function chebyshevAlongY(c: Chebyshev2D, x: number, out: Float64Array): void {
  const { nx, ny, coef } = c;
  const tx = unit(x, c.x0, c.x1);
  for (let j = 0; j < ny; j++) out[j] = coef[j]!;
  if (nx === 1) return;
  let tPrev = 1;
  let t = tx;
  for (let i = 1; i < nx; i++) {
    const row = i * ny;
    for (let j = 0; j < ny; j++) out[j] = out[j]! + t * coef[row + j]!;
    const next = 2 * tx * t - tPrev;
    tPrev = t;
    t = next;
  }
}

/** The series in y made by chebyshevAlongY (of the series `c`) at y, by Clenshaw's recurrence. */
export function chebyshevAtY(c: Chebyshev2D, row: Float64Array, y: number): number {
  const ny = c.ny;
  const ty = unit(y, c.y0, c.y1);
  let d1 = 0;
  let d2 = 0;
  for (let j = ny - 1; j >= 1; j--) {
    const d = 2 * ty * d1 - d2 + row[j]!;
    d2 = d1;
    d1 = d;
  }
  return ty * d1 - d2 + row[0]!;
}

/**
 * The series at y as a series in x alone: out[at + i] = sum_j coef[i, j] T_j(y') (nx entries of
 * `out` from `at`), to be evaluated at many x by Clenshaw's recurrence.
 */
export function chebyshevAlongX(c: Chebyshev2D, y: number, out: Float64Array, at = 0): void {
  const { nx, ny, coef } = c;
  const ty = unit(y, c.y0, c.y1);
  for (let i = 0; i < nx; i++) {
    const base = i * ny;
    let d1 = 0;
    let d2 = 0;
    for (let j = ny - 1; j >= 1; j--) {
      const d = 2 * ty * d1 - d2 + coef[base + j]!;
      d2 = d1;
      d1 = d;
    }
    out[at + i] = ty * d1 - d2 + coef[base]!;
  }
}
