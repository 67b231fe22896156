/**
 * fisherSigma (src/planning/sigma.ts) equals summariseFisher(f)?.sigma[j] (src/forecast/fisher.ts,
 * the function it replaces in the plan's search and robust ranking) exactly: tolerance 0, the same
 * operations in the same order, for every parameter, on Fisher matrices of the plan samples' designs,
 * on random positive-definite matrices whose diagonals span twenty orders of magnitude, and on
 * matrices summariseFisher refuses (singular, indefinite, zero or negative diagonal, NaN, Infinity),
 * where both give undefined.
 */
import { describe, expect, test } from 'vitest';
import fc from 'fast-check';
import { summariseFisher } from '../../src/forecast/fisher.js';
import { fisherSigma } from '../../src/planning/sigma.js';
import { makeDepthModel } from '../../src/planning/depth.js';
import { buildDesignModel } from '../../src/planning/model.js';
import { sample } from './helpers.js';

function expectSame(m: number[][]): void {
  const want = summariseFisher(m)?.sigma;
  for (let j = 0; j < 3; j++) expect(fisherSigma(m, j), `sigma ${j} of ${JSON.stringify(m)}`).toBe(want?.[j]);
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
    const bad = [
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
