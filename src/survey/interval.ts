/**
 * Interval arithmetic for the expressions in z (expressions.ts): for every operation the
 * grammar allows, bounds of what the compiled closure returns when its arguments lie in given
 * ranges, so that the loader can show a parameter stays in its range at every redshift of a
 * window, not only at the points it samples (zparam.ts, checkParam).
 *
 * The bounds hold for the floating-point values the closure computes, not only for the exact
 * real function: + - * / and sqrt are correctly rounded, so monotone, and the extremes of the
 * rounded results over a box are the rounded results at its corners (or at the split points
 * where an operation changes direction, 0 and 1). exp, ln, log10 and the power (V8's fdlibm
 * ports, within one unit in the last place but not proven monotone) are widened outward by two
 * units in the last place, except where their result is exact (exp(0) = 1, ln(1) = 0, 0^b, x^0
 * and 1^y), so that a curve whose peak is exactly a bound (a fraction of 1) can be shown in range.
 *
 * An interval is [lo, hi]; [NaN, NaN] means the closure may give NaN (no real value) somewhere in
 * the box, and an infinite end means it may be infinite or unbounded there.
 */

export type Interval = readonly [number, number];
export type Bounds = (lo: number, hi: number) => Interval;

export const UNDEFINED: Interval = [NaN, NaN];

function isUndefined(a: Interval): boolean {
  return Number.isNaN(a[0]) || Number.isNaN(a[1]);
}

const REL = 2 ** -51;

/** x lowered by about two units in its last place (0 and infinities as they are). */
export function down(x: number): number {
  if (x === 0 || !Number.isFinite(x)) return x;
  const d = x - Math.abs(x) * REL;
  return d === x ? x - Number.MIN_VALUE : d;
}

/** x raised by about two units in its last place (0 and infinities as they are). */
export function up(x: number): number {
  if (x === 0 || !Number.isFinite(x)) return x;
  const u = x + Math.abs(x) * REL;
  return u === x ? x + Number.MIN_VALUE : u;
}

/** Smallest interval holding every value (NaN among them: undefined). */
function hull(values: readonly number[]): Interval {
  let lo = Infinity;
  let hi = -Infinity;
  for (const v of values) {
    if (Number.isNaN(v)) return UNDEFINED;
    if (v < lo) lo = v;
    if (v > hi) hi = v;
  }
  return [lo, hi];
}

export function negate(a: Interval): Interval {
  return isUndefined(a) ? UNDEFINED : [-a[1], -a[0]];
}

export function add(a: Interval, b: Interval): Interval {
  return hull([a[0] + b[0], a[1] + b[1]]);
}

export function subtract(a: Interval, b: Interval): Interval {
  return hull([a[0] - b[1], a[1] - b[0]]);
}

export function multiply(a: Interval, b: Interval): Interval {
  if (isUndefined(a) || isUndefined(b)) return UNDEFINED;
  return hull([a[0] * b[0], a[0] * b[1], a[1] * b[0], a[1] * b[1]]);
}

export function divide(a: Interval, b: Interval): Interval {
  if (isUndefined(a) || isUndefined(b)) return UNDEFINED;
  // a divisor that may be 0 gives an infinite value (or NaN for 0/0)
  if (b[0] <= 0 && b[1] >= 0) return UNDEFINED;
  return hull([a[0] / b[0], a[0] / b[1], a[1] / b[0], a[1] / b[1]]);
}

/** f increasing on its domain (lo >= domainMin), widened outward except at exact points. */
function increasing(a: Interval, f: (x: number) => number, exactAt: number, floor: number): Interval {
  const lo = f(a[0]);
  const hi = f(a[1]);
  return [a[0] === exactAt ? lo : Math.max(floor, down(lo)), a[1] === exactAt ? hi : up(hi)];
}

export function exp(a: Interval): Interval {
  if (isUndefined(a)) return UNDEFINED;
  return increasing(a, Math.exp, 0, 0);
}

export function logarithm(a: Interval, f: (x: number) => number): Interval {
  if (isUndefined(a) || a[0] < 0) return UNDEFINED;
  return increasing(a, f, 1, -Infinity);
}

export function sqrt(a: Interval): Interval {
  if (isUndefined(a) || a[0] < 0) return UNDEFINED;
  return [Math.sqrt(a[0]), Math.sqrt(a[1])];
}

export function abs(a: Interval): Interval {
  if (isUndefined(a)) return UNDEFINED;
  if (a[0] >= 0) return a;
  if (a[1] <= 0) return [-a[1], -a[0]];
  return [0, Math.max(-a[0], a[1])];
}

export function minimum(args: readonly Interval[]): Interval {
  if (args.some(isUndefined)) return UNDEFINED;
  return [Math.min(...args.map((a) => a[0])), Math.min(...args.map((a) => a[1]))];
}

export function maximum(args: readonly Interval[]): Interval {
  if (args.some(isUndefined)) return UNDEFINED;
  return [Math.max(...args.map((a) => a[0])), Math.max(...args.map((a) => a[1]))];
}

/** x ** y widened, except where the result is exact. */
function powAt(x: number, y: number): [number, number] {
  const v = x ** y;
  if (v === 0 || !Number.isFinite(v) || x === 1 || y === 0 || y === 1) return [v, v];
  return [down(v), up(v)];
}

function powHull(xs: readonly number[], ys: readonly number[]): Interval {
  let lo = Infinity;
  let hi = -Infinity;
  for (const x of xs)
    for (const y of ys) {
      const [l, h] = powAt(x, y);
      if (Number.isNaN(l)) return UNDEFINED;
      if (l < lo) lo = l;
      if (h > hi) hi = h;
    }
  return [lo, hi];
}

/**
 * a ^ b. A base that may be negative gives a real value only for an integer exponent: then
 * |x|^n is monotone on each side of 0 and the sign is that of x for odd n. A base >= 0: x^y
 * is monotone in x on each side of y = 0 and in y on each side of x = 1, so its extremes lie
 * at the corners of the box split at those lines.
 */
export function power(a: Interval, b: Interval): Interval {
  if (isUndefined(a) || isUndefined(b)) return UNDEFINED;
  const [a0, a1] = a;
  const [b0, b1] = b;
  if (a0 < 0) {
    if (b0 !== b1 || !Number.isInteger(b0)) return UNDEFINED;
    // the sides of 0, each side's ends (0 from both signs when the base reaches it)
    const xs = a1 >= 0 ? [a0, -0, 0, a1] : [a0, a1];
    return powHull(xs, [b0]);
  }
  const xs = a0 < 1 && a1 > 1 ? [a0, 1, a1] : [a0, a1];
  const ys = b0 < 0 && b1 > 0 ? [b0, 0, b1] : [b0, b1];
  return powHull(xs, ys);
}

/** Smallest interval holding every one of them (any undefined: undefined). */
export function union(args: readonly Interval[]): Interval {
  if (args.some(isUndefined)) return UNDEFINED;
  return [Math.min(...args.map((a) => a[0])), Math.max(...args.map((a) => a[1]))];
}
