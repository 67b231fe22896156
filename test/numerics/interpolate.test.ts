/** Interpolation: exactness on functions each scheme reproduces, convergence order, monotonicity. */
import fc from 'fast-check';
import { describe, expect, test } from 'vitest';
import {
  findInterval,
  interpLinear,
  lagrangeCubicAt,
  lagrangeCubics,
  lazyLagrangeCubicAt,
  lazyLagrangeCubics,
  linearInterpolant,
  monotoneCubic,
  naturalCubicSpline,
  naturalCubicSplines,
} from '../../src/numerics/interpolate.js';

const grid = (a: number, b: number, n: number): number[] =>
  Array.from({ length: n }, (_, i) => a + ((b - a) * i) / (n - 1));

describe('linear interpolation', () => {
  test('reproduces a straight line exactly and holds the end values outside', () => {
    const xs = [0, 0.5, 2, 3];
    const ys = xs.map((x) => 3 * x - 1);
    for (const x of [0.1, 0.5, 1.3, 2.9]) expect(interpLinear(xs, ys, x)).toBeCloseTo(3 * x - 1, 14);
    expect(interpLinear(xs, ys, -5)).toBe(-1);
    expect(interpLinear(xs, ys, 10)).toBe(8);
    expect(linearInterpolant(xs, ys)(1.3)).toBeCloseTo(2.9, 14);
  });
  test('findInterval brackets x', () => {
    const xs = [0, 1, 2, 3, 4];
    expect(findInterval(xs, 2.5)).toBe(2);
    expect(findInterval(xs, 0)).toBe(0);
    expect(findInterval(xs, 4)).toBe(3);
    expect(findInterval(xs, -1)).toBe(0);
  });
  test('rejects an unsorted grid, mismatched lengths and non-finite values', () => {
    expect(() => linearInterpolant([0, 2, 1], [0, 1, 2])).toThrow(/increase strictly/);
    expect(() => linearInterpolant([0, 1], [0])).toThrow(/2 x values but 1/);
    expect(() => monotoneCubic([0, 1], [0, NaN])).toThrow(/not finite/);
    expect(() => naturalCubicSpline([0], [0])).toThrow(/two points/);
  });
});

describe('natural cubic spline', () => {
  test('x^3 at 0, 1, 2, 3: second derivatives M1 = 4.8, M2 = 16.8 solved by hand, so s(1.5) = 3.15', () => {
    // 4 M1 + M2 = 36, M1 + 4 M2 = 72 (de Boor 1978, ch. 4 tridiagonal system with h = 1)
    expect(naturalCubicSpline([0, 1, 2, 3], [0, 1, 8, 27])(1.5)).toBeCloseTo(3.15, 13);
  });
  test('reproduces a straight line exactly (its second derivative is zero at the ends)', () => {
    const xs = [0, 0.3, 1, 1.7, 4];
    const s = naturalCubicSpline(
      xs,
      xs.map((x) => 2 - x),
    );
    for (const x of [0.1, 0.9, 2.2, 3.9]) expect(s(x)).toBeCloseTo(2 - x, 13);
  });
  test('interpolates sin on [0, pi] (zero curvature at both ends) to 1e-8 with h = pi/200: fourth order', () => {
    const xs = grid(0, Math.PI, 201);
    const s = naturalCubicSpline(xs, xs.map(Math.sin));
    let worst = 0;
    for (let i = 0; i < 1000; i++) {
      const x = (Math.PI * (i + 0.5)) / 1000;
      worst = Math.max(worst, Math.abs(s(x) - Math.sin(x)));
    }
    expect(worst).toBeLessThan(1e-8);
  });
});

describe('monotone cubic (Fritsch-Carlson)', () => {
  test('passes through the data and converges at third order on e^x (error < 1e-6 for h = 0.01)', () => {
    const xs = grid(0, 1, 101);
    const m = monotoneCubic(xs, xs.map(Math.exp));
    for (const x of xs) expect(m(x)).toBeCloseTo(Math.exp(x), 14);
    let worst = 0;
    for (let i = 0; i < 1000; i++) {
      const x = (i + 0.5) / 1000;
      worst = Math.max(worst, Math.abs(m(x) - Math.exp(x)));
    }
    expect(worst).toBeLessThan(1e-6);
  });
  test('no overshoot on a step (flat, jump, flat)', () => {
    const m = monotoneCubic([0, 1, 2, 3, 4], [0, 0, 1, 1, 1]);
    for (let i = 0; i <= 400; i++) {
      const v = m(i / 100);
      expect(v).toBeGreaterThanOrEqual(0);
      expect(v).toBeLessThanOrEqual(1);
    }
  });
  test('property: monotone data give a monotone interpolant', () => {
    fc.assert(
      fc.property(
        fc.array(fc.tuple(fc.double({ min: 0.01, max: 5, noNaN: true }), fc.double({ min: 0, max: 5, noNaN: true })), {
          minLength: 3,
          maxLength: 12,
        }),
        (steps) => {
          const xs: number[] = [0];
          const ys: number[] = [0];
          for (const [dx, dy] of steps) {
            xs.push(xs[xs.length - 1]! + dx);
            ys.push(ys[ys.length - 1]! + dy);
          }
          const m = monotoneCubic(xs, ys);
          const last = xs[xs.length - 1]!;
          let prev = -Infinity;
          for (let i = 0; i <= 300; i++) {
            const v = m((last * i) / 300);
            if (v < prev - 1e-12 * (1 + Math.abs(prev))) return false;
            prev = v;
          }
          return true;
        },
      ),
      { numRuns: 300 },
    );
  });
});

describe('4-point Lagrange cubics of a uniform table', () => {
  test('reproduce a cubic exactly (4 points fix a cubic; common practice)', () => {
    const y = Array.from({ length: 12 }, (_, t) => 0.5 * t ** 3 - 2 * t ** 2 + t - 3);
    const coef = lagrangeCubics(y);
    for (const t of [1, 1.25, 4.5, 7.9, 9]) {
      const i = Math.min(Math.max(Math.floor(t), 1), y.length - 3);
      expect(lagrangeCubicAt(coef, i, t - i)).toBeCloseTo(0.5 * t ** 3 - 2 * t ** 2 + t - 3, 11);
    }
  });
  test('made node by node on first read, they are the same numbers bit for bit, in any order of reading', () => {
    fc.assert(
      fc.property(
        fc.array(fc.double({ min: -50, max: 50, noNaN: true }), { minLength: 4, maxLength: 40 }),
        fc.array(fc.tuple(fc.nat(), fc.double({ min: 0, max: 1, noNaN: true })), { minLength: 1, maxLength: 30 }),
        (y, reads) => {
          const all = lagrangeCubics(y);
          const lazy = lazyLagrangeCubics(y);
          const read = new Set<number>();
          for (const [k, u] of reads) {
            const i = 1 + (k % (y.length - 3));
            read.add(i);
            expect(Object.is(lazyLagrangeCubicAt(lazy, i, u), lagrangeCubicAt(all, i, u))).toBe(true);
          }
          expect(lazy.made.reduce((n, m) => n + m, 0)).toBe(read.size);
          // a node read is filled exactly as the whole table has it; one never read is not made
          for (let i = 1; i <= y.length - 3; i++)
            if (lazy.made[i]) for (let c = 0; c < 4; c++) expect(lazy.coef[4 * i + c]).toBe(all[4 * i + c]);
        },
      ),
    );
  });
});

describe('natural cubic splines on shared knots (naturalCubicSplines)', () => {
  test('each row equals naturalCubicSpline of that row bit for bit, inside, at and outside the knots (property)', () => {
    fc.assert(
      fc.property(
        fc.array(fc.double({ min: 0.01, max: 3, noNaN: true }), { minLength: 1, maxLength: 12 }),
        fc.double({ min: -5, max: 5, noNaN: true }),
        fc.array(fc.array(fc.double({ min: -1e3, max: 1e3, noNaN: true }), { minLength: 13, maxLength: 13 }), {
          minLength: 1,
          maxLength: 6,
        }),
        fc.array(fc.double({ min: -0.5, max: 1.5, noNaN: true }), { minLength: 1, maxLength: 20 }),
        (steps, x0, rawRows, where) => {
          const xs = [x0];
          for (const h of steps) xs.push(xs[xs.length - 1]! + h);
          const rows = rawRows.map((r) => r.slice(0, xs.length));
          const at = naturalCubicSplines(xs, rows);
          const one = rows.map((ys) => naturalCubicSpline(xs, ys));
          const span = xs[xs.length - 1]! - xs[0]!;
          const out = new Float64Array(rows.length);
          for (const u of [...where, 0, 1]) {
            const x = xs[0]! + u * span;
            at(x, out);
            one.forEach((f, p) => expect(Object.is(out[p], f(x)), `row ${p} at ${x}`).toBe(true));
          }
          // at the knots themselves
          for (const x of xs) {
            at(x, out);
            one.forEach((f, p) => expect(Object.is(out[p], f(x))).toBe(true));
          }
        },
      ),
      { seed: 20261204, numRuns: 300 },
    );
  });
  test('refuses a row of another length or with a non-finite value, as naturalCubicSpline does', () => {
    expect(() => naturalCubicSplines([0, 1, 2], [[0, 1]])).toThrow(/3 x values but 2/);
    expect(() => naturalCubicSplines([0, 1, 2], [[0, 1, NaN]])).toThrow(/not finite/);
  });
});
