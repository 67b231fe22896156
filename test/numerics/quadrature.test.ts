/**
 * Quadrature against closed-form integrals (common practice: textbook antiderivatives) and the exact
 * polynomial degree of each rule (Gauss-Legendre n points: degree 2n-1; Kronrod 21 points: degree 31,
 * Piessens et al. 1983, QUADPACK).
 */
import { describe, expect, test } from 'vitest';
import {
  ascending,
  gaussLegendre,
  gaussLegendreRule,
  integrate,
  integrateToInfinity,
  KRONROD21,
  panelNodes,
} from '../../src/numerics/quadrature.js';

const rel = (a: number, b: number): number => Math.abs(a - b) / Math.abs(b);

describe('Gauss-Legendre rule', () => {
  test('n = 2 and n = 3 match the closed-form nodes and weights (+-1/sqrt3, w = 1; 0, +-sqrt(3/5), w = 8/9, 5/9)', () => {
    const r2 = gaussLegendreRule(2);
    expect(r2.nodes[1]).toBeCloseTo(1 / Math.sqrt(3), 15);
    expect(r2.weights[0]).toBeCloseTo(1, 15);
    const r3 = gaussLegendreRule(3);
    expect(r3.nodes[0]).toBeCloseTo(-Math.sqrt(3 / 5), 15);
    expect(r3.nodes[1]).toBe(0);
    expect(r3.weights[1]).toBeCloseTo(8 / 9, 15);
    expect(r3.weights[2]).toBeCloseTo(5 / 9, 15);
  });
  test.each([1, 4, 7, 16, 24, 50, 100])(
    'n = %i: exact for x^k, k <= 2n-1 (integral 2/(k+1) for even k), 1e-13',
    (n) => {
      for (let k = 0; k <= 2 * n - 1; k++) {
        const v = gaussLegendre((x) => Math.pow(x, k), -1, 1, n);
        const exact = k % 2 === 0 ? 2 / (k + 1) : 0;
        expect(Math.abs(v - exact), `k=${k}`).toBeLessThan(1e-13);
      }
    },
  );
  test('n = 20 on [0, 1]: integral of e^x = e - 1 (relative 1e-15)', () => {
    expect(rel(gaussLegendre(Math.exp, 0, 1, 20), Math.E - 1)).toBeLessThan(1e-15);
  });
  test('rules are cached and reject a bad n', () => {
    expect(gaussLegendreRule(12)).toBe(gaussLegendreRule(12));
    expect(() => gaussLegendreRule(0)).toThrow(/integer/);
    expect(() => gaussLegendreRule(2.5)).toThrow(/integer/);
  });
});

describe('Gauss-Kronrod 21 (QUADPACK QK21 constants)', () => {
  test('the 21-point Kronrod rule integrates x^k exactly for k <= 31 and the embedded 10-point Gauss rule for k <= 19', () => {
    const { xgk, wgk, wg } = KRONROD21;
    for (let k = 0; k <= 31; k += 2) {
      let s = wgk[10]! * (k === 0 ? 1 : 0);
      for (let j = 0; j < 10; j++) s += 2 * wgk[j]! * Math.pow(xgk[j]!, k);
      expect(Math.abs(s - 2 / (k + 1)), `Kronrod k=${k}`).toBeLessThan(1e-15);
    }
    for (let k = 0; k <= 19; k += 2) {
      let s = 0;
      for (let j = 0; j < 5; j++) s += 2 * wg[j]! * Math.pow(xgk[2 * j + 1]!, k);
      expect(Math.abs(s - 2 / (k + 1)), `Gauss k=${k}`).toBeLessThan(1e-15);
    }
  });
});

describe('integrate (adaptive) against closed forms', () => {
  const cases: [string, (x: number) => number, number, number, number, number][] = [
    ['sin on [0, pi] = 2', Math.sin, 0, Math.PI, 2, 1e-13],
    ['e^x on [0, 1] = e - 1', Math.exp, 0, 1, Math.E - 1, 1e-13],
    ['x^-1/2 on [0, 1] = 2 (end-point singularity)', (x) => 1 / Math.sqrt(x), 0, 1, 2, 1e-9],
    ['ln x on [0, 1] = -1', Math.log, 0, 1, -1, 1e-9],
    [
      '1/((x-0.3)^2 + 1e-4) on [0, 1] = 100 (atan 70 + atan 30) (sharp peak)',
      (x) => 1 / ((x - 0.3) ** 2 + 1e-4),
      0,
      1,
      100 * (Math.atan(70) + Math.atan(30)),
      1e-10,
    ],
    ['x^7 - 3x^2 on [2, -1] = -(255/8 - 9) (reversed limits)', (x) => x ** 7 - 3 * x * x, 2, -1, -(255 / 8 - 9), 1e-13],
    ['|x - 1/3| on [0, 1] = 5/18 (kink)', (x) => Math.abs(x - 1 / 3), 0, 1, 5 / 18, 1e-10],
  ];
  const rows = cases.map(([name, f, a, b, exact, tol]) => ({ name, f, a, b, exact, tol }));
  test.each(rows)('$name (relative $tol)', ({ f, a, b, exact, tol }) => {
    // end-point singularities need deep bisection (no extrapolation here): maxDepth 80
    const r = integrate(f, a, b, { rel: 1e-12, maxDepth: 80 });
    expect(rel(r.value, exact)).toBeLessThan(tol);
    expect(r.error).toBeGreaterThanOrEqual(0);
  });
  test('error estimate bounds the true error for a smooth integrand (e^x on [0, 3], rel 1e-6)', () => {
    const r = integrate(Math.exp, 0, 3, { rel: 1e-6 });
    expect(r.converged).toBe(true);
    expect(Math.abs(r.value - Math.expm1(3))).toBeLessThanOrEqual(r.error);
  });
  test('reports converged = false when the panel budget is too small', () => {
    const r = integrate((x) => Math.sin(1 / x), 1e-4, 1, { rel: 1e-14, maxPanels: 3 });
    expect(r.converged).toBe(false);
  });
  test('absolute tolerance stops early for an integral near zero (sin on [-1, 1] = 0)', () => {
    const r = integrate(Math.sin, -1, 1, { rel: 1e-12, abs: 1e-12 });
    expect(Math.abs(r.value)).toBeLessThan(1e-14);
    expect(r.converged).toBe(true);
  });
});

describe('integrateToInfinity against closed forms', () => {
  test('e^-x on [0, inf) = 1; 1/(1+x^2) on [0, inf) = pi/2; e^-x^2 on [0, inf) = sqrt(pi)/2; e^-x on [2, inf) = e^-2', () => {
    expect(rel(integrateToInfinity((t) => Math.exp(-t), 0, { rel: 1e-12 }).value, 1)).toBeLessThan(1e-12);
    expect(rel(integrateToInfinity((t) => 1 / (1 + t * t), 0, { rel: 1e-12 }).value, Math.PI / 2)).toBeLessThan(1e-12);
    expect(
      rel(integrateToInfinity((t) => Math.exp(-t * t), 0, { rel: 1e-12 }).value, Math.sqrt(Math.PI) / 2),
    ).toBeLessThan(1e-12);
    expect(rel(integrateToInfinity((t) => Math.exp(-t), 2, { rel: 1e-12 }).value, Math.exp(-2))).toBeLessThan(1e-12);
  });
});

describe('panelNodes (composite Gauss-Legendre between cut points)', () => {
  const sum = (p: { x: Float64Array; w: Float64Array; count: number }, f: (x: number) => number) => {
    let s = 0;
    for (let i = 0; i < p.count; i++) s += p.w[i]! * f(p.x[i]!);
    return s;
  };
  test('panels per piece = ceil(width / maxStep), nodes ascending inside each piece, weights add up to the width', () => {
    const cuts = [2, -1, 0.5];
    const p = panelNodes(cuts, 0.4, 8);
    expect(cuts).toEqual([-1, 0.5, 2]); // sorted in place
    expect(p.count).toBe(8 * (Math.ceil(1.5 / 0.4) + Math.ceil(1.5 / 0.4)));
    for (let i = 1; i < p.count; i++) expect(p.x[i]!).toBeGreaterThan(p.x[i - 1]!);
    expect(p.x[0]!).toBeGreaterThan(-1);
    expect(p.x[p.count - 1]!).toBeLessThan(2);
    expect(Math.abs(sum(p, () => 1) - 3)).toBeLessThan(1e-14);
  });
  test('exact for polynomials of degree 2n-1 on each panel: integral of x^7 over [0, 3] = 3^8/8 (4 points, relative 1e-14)', () => {
    expect(
      rel(
        sum(panelNodes([0, 3], 0.7, 4), (x) => x ** 7),
        3 ** 8 / 8,
      ),
    ).toBeLessThan(1e-14);
  });
  test('a kink at a cut is integrated exactly: integral of |x - 0.3| over [0, 1] = 0.29 (closed form, 1e-14)', () => {
    expect(
      rel(
        sum(panelNodes([0, 1, 0.3], 1, 2), (x) => Math.abs(x - 0.3)),
        0.29,
      ),
    ).toBeLessThan(1e-14);
  });
  test('a reused output grows when too short and gives the same nodes as a fresh one', () => {
    const out = { x: new Float64Array(4), w: new Float64Array(4), count: 0 };
    const fresh = panelNodes([0, 5], 0.25, 8);
    const reused = panelNodes([0, 5], 0.25, 8, out);
    expect(reused).toBe(out);
    expect(out.count).toBe(fresh.count);
    expect(Array.from(out.x.subarray(0, out.count))).toEqual(Array.from(fresh.x.subarray(0, fresh.count)));
    expect(Array.from(out.w.subarray(0, out.count))).toEqual(Array.from(fresh.w.subarray(0, fresh.count)));
    panelNodes([0, 1], 1, 3, out);
    expect(out.count).toBe(3);
    expect(Math.abs(sum(out, (x) => x * x) - 1 / 3)).toBeLessThan(1e-15);
  });
});

describe('ascending (whether panelNodes need sort its cuts)', () => {
  test('true exactly when each value is at most the next, as a sort would leave them (common practice)', () => {
    expect(ascending([])).toBe(true);
    expect(ascending([3])).toBe(true);
    expect(ascending([-1, 0.5, 0.5, 2])).toBe(true);
    expect(ascending([-0, 0])).toBe(true);
    expect(ascending([0, -1])).toBe(false);
    expect(ascending([0, 2, 1])).toBe(false);
    // NaN compares false: such cuts go to the sort as before
    expect(ascending([0, NaN])).toBe(false);
    expect(ascending([NaN, 0])).toBe(false);
  });
  test('cuts already in order are left as they are, and give the nodes of the same cuts given out of order', () => {
    const inOrder = [-1, 0.5, 2];
    const a = panelNodes(inOrder, 0.4, 8);
    expect(inOrder).toEqual([-1, 0.5, 2]);
    const b = panelNodes([2, 0.5, -1], 0.4, 8);
    expect(Array.from(a.x.subarray(0, a.count))).toEqual(Array.from(b.x.subarray(0, b.count)));
    expect(Array.from(a.w.subarray(0, a.count))).toEqual(Array.from(b.w.subarray(0, b.count)));
  });
});
