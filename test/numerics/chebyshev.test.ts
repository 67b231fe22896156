/**
 * Tensor Chebyshev interpolation (src/numerics/chebyshev.ts) against the functions it interpolates
 * (the reference is the function itself, evaluated directly).
 */
import { describe, expect, test } from 'vitest';
import {
  chebyshev2D,
  chebyshevAlongY,
  chebyshevAt,
  chebyshevAtY,
  chebyshevPoints,
  chebyshevTail,
} from '../../src/numerics/chebyshev.js';

function table(f: (x: number, y: number) => number, nx: number, ny: number, box: [number, number, number, number]) {
  const [x0, x1, y0, y1] = box;
  const xs = chebyshevPoints(nx, x0, x1);
  const ys = chebyshevPoints(ny, y0, y1);
  const v = new Float64Array(nx * ny);
  for (let i = 0; i < nx; i++) for (let j = 0; j < ny; j++) v[i * ny + j] = f(xs[i]!, ys[j]!);
  return chebyshev2D(v, nx, ny, x0, x1, y0, y1);
}

describe('Chebyshev interpolation in two variables', () => {
  // an entire function: the coefficients fall faster than geometrically
  const f = (x: number, y: number) => Math.exp(0.7 * x) * Math.cos(1.3 * y) + x * y * y;
  const box: [number, number, number, number] = [-1, 2, 0, 1.5];

  test('16 x 12 points reproduce the function (of size up to 9) to 1e-11 inside the box; the tail bounds it', () => {
    const c = table(f, 16, 12, box);
    let worst = 0;
    for (let k = 0; k < 200; k++) {
      const x = -1 + 3 * ((k * 0.6180339887) % 1);
      const y = 1.5 * ((k * 0.7548776662) % 1);
      worst = Math.max(worst, Math.abs(chebyshevAt(c, x, y) - f(x, y)));
    }
    expect(worst).toBeLessThan(1e-11);
    // the tail (the last two coefficients, where the series falls faster than geometrically) is an upper estimate
    const t = chebyshevTail(c);
    expect(Math.max(t.x, t.y)).toBeGreaterThan(worst);
    expect(Math.max(t.x, t.y)).toBeLessThan(1e-8);
  });

  test('too few points: the tail reports the error it makes (within a factor of 10)', () => {
    const c = table(f, 6, 4, box);
    let worst = 0;
    for (let k = 0; k < 400; k++) {
      const x = -1 + 3 * ((k * 0.6180339887) % 1);
      const y = 1.5 * ((k * 0.7548776662) % 1);
      worst = Math.max(worst, Math.abs(chebyshevAt(c, x, y) - f(x, y)));
    }
    const t = chebyshevTail(c);
    expect(worst).toBeGreaterThan(1e-6);
    expect(Math.max(t.x, t.y) * 10).toBeGreaterThan(worst);
  });

  test('exact at the points themselves, and a polynomial of degree < n exactly everywhere (1e-13)', () => {
    const p = (x: number, y: number) => 3 - 2 * x + x ** 3 - 0.5 * y ** 2 + x * y;
    const c = table(p, 5, 4, box);
    expect(Math.abs(chebyshevAt(c, 0.3, 1.1) - p(0.3, 1.1))).toBeLessThan(1e-13);
    const xs = chebyshevPoints(5, -1, 2);
    const ys = chebyshevPoints(4, 0, 1.5);
    expect(Math.abs(chebyshevAt(c, xs[2]!, ys[1]!) - p(xs[2]!, ys[1]!))).toBeLessThan(1e-13);
  });

  test('one point along a variable: constant along it', () => {
    const c = table((x) => Math.sin(x), 16, 1, [0, 1, 0.4, 0.4]);
    expect(Math.abs(chebyshevAt(c, 0.25, 0.4) - Math.sin(0.25))).toBeLessThan(1e-13);
    expect(chebyshevAt(c, 0.25, 0.9)).toBe(chebyshevAt(c, 0.25, 0.4));
  });

  test('a row at one x (chebyshevAlongY, chebyshevAtY) gives chebyshevAt at every y (1e-13 of the values, up to 9)', () => {
    const c = table(f, 16, 12, box);
    const row = new Float64Array(c.ny);
    for (const x of [-1, -0.37, 0.5, 1.999, 2]) {
      chebyshevAlongY(c, x, row);
      for (const y of [0, 0.21, 0.75, 1.5])
        expect(Math.abs(chebyshevAtY(c, row, y) - chebyshevAt(c, x, y))).toBeLessThan(1e-13);
    }
    // and against the function itself, as chebyshevAt is
    chebyshevAlongY(c, 0.4, row);
    expect(Math.abs(chebyshevAtY(c, row, 0.9) - f(0.4, 0.9))).toBeLessThan(1e-11);
    // one point along x: the row is the series in y
    const one = table((_x, y) => Math.cos(y), 1, 12, [0.3, 0.3, 0, 1.5]);
    const r1 = new Float64Array(12);
    chebyshevAlongY(one, 0.3, r1);
    expect(Math.abs(chebyshevAtY(one, r1, 1.2) - Math.cos(1.2))).toBeLessThan(1e-12);
  });
});
