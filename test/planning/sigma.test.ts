/**
 * marginaliseSymmetric3 (src/planning/sigma.ts) equals marginaliseNormalisationsInPlace
 * (src/forecast/fisher.ts) exactly: tolerance 0, every element, on random symmetric matrices,
 * counts, b and fractions (zeros among them) spanning many orders of magnitude, and refuses what it
 * refuses with the same message.
 *
 * fisherSigma and fisherSigmaUpper (src/planning/sigma.ts) equal summariseFisher(f)?.sigma[j] (src/forecast/fisher.ts,
 * the function it replaces in the plan's search and robust ranking) exactly: tolerance 0, the same
 * operations in the same order, for every parameter, on Fisher matrices of the plan samples' designs,
 * on random positive-definite matrices whose diagonals span twenty orders of magnitude, and on
 * matrices summariseFisher refuses (singular, indefinite, zero or negative diagonal, NaN, Infinity),
 * where both give undefined.
 */
import { describe, expect, test } from 'vitest';
import fc from 'fast-check';
import {
  marginaliseCorrelatedInPlace,
  marginaliseNormalisationsInPlace,
  summariseFisher,
} from '../../src/forecast/fisher.js';
import { fisherSigma, fisherSigmaUpper, marginaliseSymmetric3 } from '../../src/planning/sigma.js';
import { makeDepthModel } from '../../src/planning/depth.js';
import { buildDesignModel } from '../../src/planning/model.js';
import { sample } from './helpers.js';
import { REFUSED_MATRICES } from '../support/refused-matrices.js';

function expectSame(m: number[][]): void {
  const want = summariseFisher(m)?.sigma;
  // fisherSigmaUpper (the robust ranking's) of the symmetric matrix summariseFisher reads: its lower triangle mirrored
  const upper = Float64Array.from([m[0]![0]!, m[1]![0]!, m[2]![0]!, m[1]![1]!, m[2]![1]!, m[2]![2]!]);
  for (let j = 0; j < 3; j++) {
    expect(fisherSigma(m, j), `sigma ${j} of ${JSON.stringify(m)}`).toBe(want?.[j]);
    expect(fisherSigmaUpper(upper, j), `sigma ${j} of the upper triangle of ${JSON.stringify(m)}`).toBe(want?.[j]);
  }
}

describe('fisherSigma equals summariseFisher bit for bit', () => {
  test('the H-alpha plan sample designs, with and without cosmic variance', async () => {
    const s = sample('plan-halpha-layers.yaml');
    const depth = makeDepthModel('line_flux', { kind: 'background', referenceLimit: 6e-17, referenceHours: 1 });
    for (const cosmicVariance of [true, false]) {
      const model = await buildDesignModel(
        s,
        s.populations[0]!,
        { limitKind: 'line_flux', depth, fieldOfViewDeg2: 0.2 },
        [0.03, 40],
        [1, 3000],
        { cosmicVariance },
      );
      for (const h of [0.03, 0.1, 0.7, 3, 12, 40]) for (const p of [1, 4, 50, 800]) expectSame(model.tier(h, p).fisher);
    }
  });

  test('random positive-definite matrices (A A^T + small diagonal, rows scaled by 10^-10 .. 10^10)', () => {
    const entry = fc.double({ min: -1, max: 1, noNaN: true });
    fc.assert(
      fc.property(
        fc.array(entry, { minLength: 9, maxLength: 9 }),
        fc.array(fc.double({ min: -10, max: 10, noNaN: true }), { minLength: 3, maxLength: 3 }),
        fc.double({ min: 0, max: 1e-3, noNaN: true }),
        (a, logScale, ridge) => {
          const s = logScale.map((v) => 10 ** v);
          const m = [0, 1, 2].map((i) =>
            [0, 1, 2].map((j) => {
              let v = i === j ? ridge : 0;
              for (let k = 0; k < 3; k++) v += a[3 * i + k]! * a[3 * j + k]!;
              return v * s[i]! * s[j]!;
            }),
          );
          expectSame(m);
        },
      ),
      { numRuns: 2000, seed: 8 },
    );
  });

  test('matrices summariseFisher refuses give undefined', () => {
    const bad = REFUSED_MATRICES;
    for (const m of bad) {
      expect(summariseFisher(m)).toBeUndefined();
      expectSame(m);
    }
    // and arbitrary symmetric matrices, definite or not
    fc.assert(
      fc.property(fc.array(fc.double({ min: -1e3, max: 1e3, noNaN: true }), { minLength: 6, maxLength: 6 }), (v) => {
        expectSame([
          [v[0]!, v[1]!, v[2]!],
          [v[1]!, v[3]!, v[4]!],
          [v[2]!, v[4]!, v[5]!],
        ]);
      }),
      { numRuns: 2000, seed: 9 },
    );
  });
});

describe('marginaliseSymmetric3 equals marginaliseNormalisationsInPlace bit for bit', () => {
  /** Both on the same inputs: the full matrix of the one against the upper triangle of the other, mirrored. */
  function expectSameMarginal(v: number[], counts: number[], b: number[], fractions: number[]): void {
    const full = [
      [v[0]!, v[1]!, v[2]!],
      [v[1]!, v[3]!, v[4]!],
      [v[2]!, v[4]!, v[5]!],
    ];
    marginaliseNormalisationsInPlace(full, counts, b, fractions);
    const upper = Float64Array.from(v);
    marginaliseSymmetric3(upper, counts, b, fractions);
    const mirrored = [
      [upper[0]!, upper[1]!, upper[2]!],
      [upper[1]!, upper[3]!, upper[4]!],
      [upper[2]!, upper[4]!, upper[5]!],
    ];
    expect(mirrored, JSON.stringify({ v, counts, b, fractions })).toEqual(full);
  }

  test('random matrices, counts, b and fractions (zero fractions among them)', () => {
    const big = fc.double({ min: -1e6, max: 1e6, noNaN: true });
    fc.assert(
      fc.property(
        fc.array(big, { minLength: 6, maxLength: 6 }),
        fc.integer({ min: 1, max: 6 }).chain((n) =>
          fc.tuple(
            fc.array(fc.double({ min: 0, max: 1e7, noNaN: true }), { minLength: n, maxLength: n }),
            fc.array(big, { minLength: 3 * n, maxLength: 3 * n }),
            fc.array(fc.oneof(fc.constant(0), fc.double({ min: 1e-4, max: 2, noNaN: true })), {
              minLength: n,
              maxLength: n,
            }),
          ),
        ),
        (v, [counts, b, fractions]) => expectSameMarginal(v, counts, b, fractions),
      ),
      { numRuns: 2000, seed: 10 },
    );
  });

  test('the same refusals', () => {
    const v = [4, 1, 0.5, 3, 0.2, 2];
    for (const [counts, b, fractions] of [
      [[10], [1, 2, 3], [0.1, 0.2]],
      [[10], [1, 2], [0.1]],
      [
        [10, 5],
        [1, 2, 3, 4, 5, 6],
        [0.1, -0.2],
      ],
      [
        [10, 5],
        [1, 2, 3, 4, 5, 6],
        [NaN, 0.2],
      ],
      [[10], [1, 2, 3], [Infinity]],
    ] as number[][][]) {
      const full = [
        [v[0]!, v[1]!, v[2]!],
        [v[1]!, v[3]!, v[4]!],
        [v[2]!, v[4]!, v[5]!],
      ];
      let want = '';
      try {
        marginaliseNormalisationsInPlace(full, counts!, b!, fractions!);
      } catch (e) {
        want = (e as Error).message;
      }
      expect(want).not.toBe('');
      expect(() => marginaliseSymmetric3(Float64Array.from(v), counts!, b!, fractions!)).toThrow(want);
    }
  });
});

describe('marginaliseSymmetric3 with correlated slices equals marginaliseCorrelatedInPlace', () => {
  // The same factorisations and sums; only the last step differs (the plan subtracts the mean of
  // V_j X_k and V_k X_j, the forecast subtracts each and then takes the mean of the two elements), so
  // the two agree to rounding: 1e-9 of the matrix's scale (measured: within 9e-17 of it).
  test('random correlations of up to 40 slices (zero fractions among them)', () => {
    fc.assert(
      fc.property(fc.integer({ min: 1, max: 40 }), fc.integer({ min: 0, max: 2 ** 31 - 1 }), (n, seed) => {
        let state = seed || 1;
        const rand = (): number => {
          state = (Math.imul(state, 48271) >>> 0) % 2147483647;
          return state / 2147483647;
        };
        // R: G G^T plus a little diagonal, scaled to unit diagonal (a correlation matrix)
        const g = Array.from({ length: n }, () => Array.from({ length: n }, () => rand() - 0.3));
        const c = g.map((gi, i) => g.map((gj, j) => gi.reduce((s, x, k) => s + x * gj[k]!, 0) + (i === j ? 0.05 : 0)));
        const r = c.map((ci, i) => ci.map((x, j) => x / Math.sqrt(c[i]![i]! * c[j]![j]!)));
        const fractions = Array.from({ length: n }, () => (rand() < 0.15 ? 0 : 0.01 + rand()));
        const counts = Array.from({ length: n }, () => 10 ** (4 * rand()));
        const b = Array.from({ length: 3 * n }, (_, i) => (rand() - 0.5) * 2 * counts[Math.floor(i / 3)]!);
        // a matrix the marginalisation leaves positive (it is the information of counts and b)
        let [v0, v1, v2, v3, v4, v5] = [0, 0, 0, 0, 0, 0];
        for (let i = 0; i < n; i++) {
          const root = Math.sqrt(counts[i]!);
          const x = b[3 * i]! / root;
          const y = b[3 * i + 1]! / root;
          const z = b[3 * i + 2]! / root;
          v0 += x * x + 1;
          v1 += x * y;
          v2 += x * z;
          v3 += y * y + 1;
          v4 += y * z;
          v5 += z * z + 1;
        }
        const v = [v0, v1, v2, v3, v4, v5];
        const full = [
          [v[0]!, v[1]!, v[2]!],
          [v[1]!, v[3]!, v[4]!],
          [v[2]!, v[4]!, v[5]!],
        ];
        marginaliseCorrelatedInPlace(full, counts, b, { fractions, correlation: r });
        const upper = Float64Array.from(v);
        marginaliseSymmetric3(upper, counts, b, fractions, Float64Array.from(r.flat()));
        const scale = Math.max(...v.map(Math.abs));
        const got = [upper[0]!, upper[1]!, upper[2]!, upper[3]!, upper[4]!, upper[5]!];
        const want = [full[0]![0]!, full[0]![1]!, full[0]![2]!, full[1]![1]!, full[1]![2]!, full[2]![2]!];
        for (let k = 0; k < 6; k++) expect(Math.abs(got[k]! - want[k]!)).toBeLessThanOrEqual(1e-9 * scale);
      }),
      { numRuns: 200, seed: 20261204 },
    );
  });
});
