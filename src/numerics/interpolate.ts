/**
 * Interpolation of tabulated functions y(x) on a strictly increasing grid x.
 *
 * - `interpLinear(xs, ys, x)`: piecewise linear; outside [x_0, x_last] the end value is held.
 * - `monotoneCubic(xs, ys)`: piecewise cubic Hermite with Fritsch-Carlson slopes (Fritsch &
 *   Carlson 1980, SIAM J. Numer. Anal. 17, 238; the three-point slope limiter of Fritsch &
 *   Butland 1984, SIAM J. Sci. Stat. Comput. 5, 300): preserves monotonicity of the data, C1,
 *   third-order accurate away from extrema. End values held outside the grid.
 * - `naturalCubicSpline(xs, ys)`: C2 cubic spline with zero second derivative at both ends
 *   (de Boor 1978, "A Practical Guide to Splines", ch. 4; tridiagonal solve). Fourth-order accurate
 *   in the interior. End values held outside the grid.
 * - `uniformSpline(x0, dx, y)`: the same spline on a uniform grid, with `splineEval` and
 *   `splineDerivative` (clamped to the grid's ends); no checks (the halo tables' hot loop).
 * - `lagrangeCubics(y)` and `lagrangeCubicAt`: the 4-point Lagrange cubics of a uniform table (the
 *   power spectrum's ln P and the box window's ln I tables); `lazyLagrangeCubics` and
 *   `lazyLagrangeCubicAt` make each node's cubic when it is first read.
 * The first three throw Error when the grid is not strictly increasing, the lengths differ, fewer than
 * two points are given, or a value is not finite.
 */

function checkGrid(xs: ArrayLike<number>, ys: ArrayLike<number>): void {
  if (xs.length !== ys.length) throw new Error(`interpolation: ${xs.length} x values but ${ys.length} y values`);
  if (xs.length < 2) throw new Error('interpolation: needs at least two points');
  for (let i = 0; i < xs.length; i++) {
    if (!Number.isFinite(xs[i]!) || !Number.isFinite(ys[i]!)) {
      throw new Error(`interpolation: point ${i} is not finite`);
    }
    if (i > 0 && !(xs[i]! > xs[i - 1]!)) {
      throw new Error(`interpolation: x must increase strictly (x[${i - 1}] = ${xs[i - 1]}, x[${i}] = ${xs[i]})`);
    }
  }
}

/** Index i with xs[i] <= x < xs[i+1], clamped to [0, n-2] (binary search). */
export function findInterval(xs: ArrayLike<number>, x: number): number {
  let lo = 0;
  let hi = xs.length - 1;
  if (x <= xs[0]!) return 0;
  if (x >= xs[hi]!) return hi - 1;
  while (hi - lo > 1) {
    const mid = (lo + hi) >> 1;
    if (xs[mid]! <= x) lo = mid;
    else hi = mid;
  }
  return lo;
}

/**
 * Linear interpolation at x on sorted xs (not validated here: use on grids you built); outside
 * the grid the end value is returned.
 * @example interpLinear([0, 1, 2], [0, 10, 20], 1.5) // 15
 */
export function interpLinear(xs: ArrayLike<number>, ys: ArrayLike<number>, x: number): number {
  const n = xs.length;
  if (x <= xs[0]!) return ys[0]!;
  if (x >= xs[n - 1]!) return ys[n - 1]!;
  const i = findInterval(xs, x);
  const x0 = xs[i]!;
  const t = (x - x0) / (xs[i + 1]! - x0);
  return ys[i]! + t * (ys[i + 1]! - ys[i]!);
}

/** A tabulated function ready for evaluation. */
export interface Interpolant {
  (x: number): number;
  readonly xs: Float64Array;
  readonly ys: Float64Array;
}

/** Validated linear interpolant (end values held outside the grid). */
export function linearInterpolant(xs: ArrayLike<number>, ys: ArrayLike<number>): Interpolant {
  checkGrid(xs, ys);
  const X = Float64Array.from(xs);
  const Y = Float64Array.from(ys);
  const fn = (x: number): number => interpLinear(X, Y, x);
  return Object.assign(fn, { xs: X, ys: Y });
}

function hermite(X: Float64Array, Y: Float64Array, D: Float64Array): Interpolant {
  const n = X.length;
  const fn = (x: number): number => {
    if (x <= X[0]!) return Y[0]!;
    if (x >= X[n - 1]!) return Y[n - 1]!;
    const i = findInterval(X, x);
    const h = X[i + 1]! - X[i]!;
    const t = (x - X[i]!) / h;
    const t2 = t * t;
    const t3 = t2 * t;
    const h00 = 2 * t3 - 3 * t2 + 1;
    const h10 = t3 - 2 * t2 + t;
    const h01 = -2 * t3 + 3 * t2;
    const h11 = t3 - t2;
    return h00 * Y[i]! + h10 * h * D[i]! + h01 * Y[i + 1]! + h11 * h * D[i + 1]!;
  };
  return Object.assign(fn, { xs: X, ys: Y });
}

/**
 * Monotone piecewise-cubic Hermite interpolant (Fritsch-Carlson / Fritsch-Butland slopes):
 * never overshoots monotone data. End slopes from the one-sided three-point formula, limited.
 * @example monotoneCubic([0, 1, 2], [0, 1, 1])(1.5) // 1 (no overshoot above the data)
 */
export function monotoneCubic(xs: ArrayLike<number>, ys: ArrayLike<number>): Interpolant {
  checkGrid(xs, ys);
  const X = Float64Array.from(xs);
  const Y = Float64Array.from(ys);
  const n = X.length;
  const h = new Float64Array(n - 1);
  const del = new Float64Array(n - 1);
  for (let i = 0; i < n - 1; i++) {
    h[i] = X[i + 1]! - X[i]!;
    del[i] = (Y[i + 1]! - Y[i]!) / h[i]!;
  }
  const D = new Float64Array(n);
  if (n === 2) {
    D[0] = del[0]!;
    D[1] = del[0]!;
    return hermite(X, Y, D);
  }
  for (let i = 1; i < n - 1; i++) {
    const d0 = del[i - 1]!;
    const d1 = del[i]!;
    if (d0 * d1 <= 0) {
      D[i] = 0;
    } else {
      // weighted harmonic mean (Fritsch & Butland 1984)
      const w1 = 2 * h[i]! + h[i - 1]!;
      const w2 = h[i]! + 2 * h[i - 1]!;
      D[i] = (w1 + w2) / (w1 / d0 + w2 / d1);
    }
  }
  const endSlope = (h0: number, h1: number, d0: number, d1: number): number => {
    let d = ((2 * h0 + h1) * d0 - h0 * d1) / (h0 + h1);
    if (d * d0 <= 0) d = 0;
    else if (d0 * d1 <= 0 && Math.abs(d) > Math.abs(3 * d0)) d = 3 * d0;
    return d;
  };
  D[0] = endSlope(h[0]!, h[1]!, del[0]!, del[1]!);
  D[n - 1] = endSlope(h[n - 2]!, h[n - 3]!, del[n - 2]!, del[n - 3]!);
  return hermite(X, Y, D);
}

/**
 * The second derivatives M_i of the natural cubic spline through (xs_i, ys_i) (M_0 = M_{n-1} = 0):
 * the tridiagonal system (h_{i-1}/6) M_{i-1} + ((h_{i-1} + h_i)/3) M_i + (h_i/6) M_{i+1} =
 * (y_{i+1} - y_i)/h_i - (y_i - y_{i-1})/h_{i-1}, solved by the Thomas algorithm.
 */
function naturalSecondDerivatives(X: ArrayLike<number>, Y: ArrayLike<number>): Float64Array {
  const n = X.length;
  const M = new Float64Array(n);
  if (n < 3) return M;
  const c = new Float64Array(n);
  const r = new Float64Array(n);
  for (let i = 1; i < n - 1; i++) {
    const h0 = X[i]! - X[i - 1]!;
    const h1 = X[i + 1]! - X[i]!;
    const a = h0 / 6;
    const b = (h0 + h1) / 3;
    const cc = h1 / 6;
    const rhs = (Y[i + 1]! - Y[i]!) / h1 - (Y[i]! - Y[i - 1]!) / h0;
    const denom = b - a * c[i - 1]!;
    c[i] = cc / denom;
    r[i] = (rhs - a * r[i - 1]!) / denom;
  }
  for (let i = n - 2; i >= 1; i--) M[i] = r[i]! - c[i]! * M[i + 1]!;
  return M;
}

/**
 * Natural cubic spline (second derivative zero at both ends), C2.
 * @example naturalCubicSpline([0, 1, 2, 3], [0, 1, 8, 27])(1.5) // 3.15 (the natural end condition is not x^3's)
 */
export function naturalCubicSpline(xs: ArrayLike<number>, ys: ArrayLike<number>): Interpolant {
  checkGrid(xs, ys);
  const X = Float64Array.from(xs);
  const Y = Float64Array.from(ys);
  const n = X.length;
  const M = naturalSecondDerivatives(X, Y);
  const fn = (x: number): number => {
    if (x <= X[0]!) return Y[0]!;
    if (x >= X[n - 1]!) return Y[n - 1]!;
    const i = findInterval(X, x);
    const h = X[i + 1]! - X[i]!;
    const A = (X[i + 1]! - x) / h;
    const B = 1 - A;
    return A * Y[i]! + B * Y[i + 1]! + (((A * A * A - A) * M[i]! + (B * B * B - B) * M[i + 1]!) * h * h) / 6;
  };
  return Object.assign(fn, { xs: X, ys: Y });
}

/**
 * Many natural cubic splines on the same knots, evaluated together: `at(x, out)` sets out[p] to
 * naturalCubicSpline(xs, rows[p])(x), bit for bit (the same arithmetic in the same order), with the
 * knot search and the interval's weights made once for every row rather than once per row. For
 * tables such as the plan's slice-pair correlations (n^2 / 2 splines of the area, every one asked at
 * each design's area).
 */
export function naturalCubicSplines(
  xs: ArrayLike<number>,
  rows: readonly ArrayLike<number>[],
): (x: number, out: Float64Array) => void {
  const X = Float64Array.from(xs);
  const n = X.length;
  const count = rows.length;
  const Y = new Float64Array(count * n);
  const M = new Float64Array(count * n);
  rows.forEach((ys, p) => {
    checkGrid(X, ys);
    Y.set(Float64Array.from(ys), p * n);
    M.set(naturalSecondDerivatives(X, Y.subarray(p * n, (p + 1) * n)), p * n);
  });
  return (x, out) => {
    if (x <= X[0]! || x >= X[n - 1]!) {
      const k = x <= X[0]! ? 0 : n - 1;
      for (let p = 0; p < count; p++) out[p] = Y[p * n + k]!;
      return;
    }
    const i = findInterval(X, x);
    const h = X[i + 1]! - X[i]!;
    const A = (X[i + 1]! - x) / h;
    const B = 1 - A;
    const a3 = A * A * A - A;
    const b3 = B * B * B - B;
    for (let p = 0, o = i; p < count; p++, o += n)
      out[p] = A * Y[o]! + B * Y[o + 1]! + ((a3 * M[o]! + b3 * M[o + 1]!) * h * h) / 6;
  };
}

/** Natural cubic spline through (x_i, y_i), x ascending and uniformly spaced. */
export interface UniformSpline {
  readonly x0: number;
  readonly dx: number;
  readonly y: Float64Array;
  /** Second derivatives at the knots. */
  readonly m: Float64Array;
}

/** The natural spline of `naturalCubicSpline` on the grid x0 + i dx, kept with its second derivatives (for `splineDerivative`). */
export function uniformSpline(x0: number, dx: number, y: Float64Array): UniformSpline {
  const xs = Float64Array.from(y, (_, i) => x0 + i * dx);
  return { x0, dx, y, m: naturalSecondDerivatives(xs, y) };
}

/** The knot interval holding x (clamped to the knot range) and the position t in it. */
function splineInterval(s: UniformSpline, x: number): { i: number; t: number } {
  const n = s.y.length;
  let i = Math.floor((x - s.x0) / s.dx);
  if (i < 0) i = 0;
  if (i > n - 2) i = n - 2;
  return { i, t: (x - (s.x0 + i * s.dx)) / s.dx };
}

/** Spline value at x. */
export function splineEval(s: UniformSpline, x: number): number {
  const { i, t } = splineInterval(s, x);
  const u = 1 - t;
  const h2 = s.dx * s.dx;
  return u * s.y[i]! + t * s.y[i + 1]! + ((u * u * u - u) * s.m[i]! + (t * t * t - t) * s.m[i + 1]!) * (h2 / 6);
}

/** Spline first derivative at x. */
export function splineDerivative(s: UniformSpline, x: number): number {
  const { i, t } = splineInterval(s, x);
  const u = 1 - t;
  return (s.y[i + 1]! - s.y[i]!) / s.dx + (-(3 * u * u - 1) * s.m[i]! + (3 * t * t - 1) * s.m[i + 1]!) * (s.dx / 6);
}

/**
 * The 4-point Lagrange cubics of a table y_0 .. y_{n-1} on a uniform grid: for each node i from 1
 * to n-3, the cubic through y_{i-1} .. y_{i+2} written as c0 + u (c1 + u (c2 + u c3)) in u = t - i
 * (t the position in grid steps), at coef[4 i .. 4 i + 3]. Evaluate with `lagrangeCubicAt`.
 */
export function lagrangeCubics(y: ArrayLike<number>): Float64Array {
  const n = y.length;
  const coef = new Float64Array(4 * n);
  for (let i = 1; i <= n - 3; i++) lagrangeCubicInto(y, coef, i);
  return coef;
}

/**
 * Node i's cubic of `lagrangeCubics` written into coef[4 i .. 4 i + 3]: for a long table of which a
 * computation reads only some nodes (the power spectrum's 3,225, of which a prediction reads about
 * 1,200), made on first use (`lazyLagrangeCubicAt`) rather than all at once; run cold, every
 * node's arithmetic costs microseconds.
 */
export function lagrangeCubicInto(y: ArrayLike<number>, coef: Float64Array, i: number): void {
  const y0 = y[i - 1]!;
  const y1 = y[i]!;
  const y2 = y[i + 1]!;
  const y3 = y[i + 2]!;
  coef[4 * i] = y1;
  coef[4 * i + 1] = -y0 / 3 - y1 / 2 + y2 - y3 / 6;
  coef[4 * i + 2] = y0 / 2 - y1 + y2 / 2;
  coef[4 * i + 3] = -y0 / 6 + y1 / 2 - y2 / 2 + y3 / 6;
}

/**
 * The cubics of `lagrangeCubics` made node by node as they are first read: `coef` as
 * lagrangeCubics would fill it (4 per node), `made[i]` 1 once node i's are there.
 */
export interface LazyLagrangeCubics {
  readonly y: ArrayLike<number>;
  readonly coef: Float64Array;
  readonly made: Uint8Array;
}

/** An empty LazyLagrangeCubics of the table y. */
export function lazyLagrangeCubics(y: ArrayLike<number>): LazyLagrangeCubics {
  return { y, coef: new Float64Array(4 * y.length), made: new Uint8Array(y.length) };
}

/** `lagrangeCubicAt` of node i (1 <= i <= n-3), its cubic made first if it is not yet: the same number. */
export function lazyLagrangeCubicAt(c: LazyLagrangeCubics, i: number, u: number): number {
  if (c.made[i] === 0) {
    lagrangeCubicInto(c.y, c.coef, i);
    c.made[i] = 1;
  }
  return lagrangeCubicAt(c.coef, i, u);
}

/** The cubic of node i (1 <= i <= n-3) of `lagrangeCubics` at u = t - i. */
export function lagrangeCubicAt(coef: Float64Array, i: number, u: number): number {
  const j = 4 * i;
  return coef[j]! + u * (coef[j + 1]! + u * (coef[j + 2]! + u * coef[j + 3]!));
}
