/**
 * The allocation-free paths of the plan equal the ones they replaced exactly (tolerance 0: the
 * same sums in the same order):
 * - the single-tier search (src/planning/search.ts searchSingleTier), keeping its grid designs or
 *   only their typed goal values, equals the object-based search it replaced
 *   (test/planning/single-objects.ts): same designs, grid best, refined best, for every goal, with
 *   and without a minimum count, on grids of several sizes;
 * - a design model's `tierInto` writes the numbers of its `tier`, with and without cosmic variance,
 *   for a line-flux and a magnitude plan sample;
 * - marginaliseNormalisationsInPlace equals marginaliseNormalisations (src/forecast/fisher.ts).
 */
import { beforeAll, describe, expect, test } from 'vitest';
import fc from 'fast-check';
import { makeDepthModel } from '../../src/planning/depth.js';
import { buildDesignModel, TIER_VALUES, type DesignModel } from '../../src/planning/model.js';
import { logGrid, searchSingleTier, type Budget } from '../../src/planning/search.js';
import { marginaliseNormalisations, marginaliseNormalisationsInPlace } from '../../src/forecast/fisher.js';
import type { PlanGoal } from '../../src/model/plan.js';
import { searchSingleTierWithObjects } from './single-objects.js';
import { sample } from './helpers.js';

const halpha = sample('plan-halpha-layers.yaml');
const uv = sample('plan-uv-deep-wide.yaml');
let model: DesignModel;
let plainModel: DesignModel;
let uvModel: DesignModel;
beforeAll(async () => {
  const depth = makeDepthModel('line_flux', { kind: 'background', referenceLimit: 6e-17, referenceHours: 1 });
  const spec = { limitKind: 'line_flux' as const, depth, fieldOfViewDeg2: 0.2 };
  model = await buildDesignModel(halpha, halpha.populations[0]!, spec, [0.03, 40], [1, 3000]);
  plainModel = await buildDesignModel(halpha, halpha.populations[0]!, spec, [0.03, 40], [1, 3000], {
    cosmicVariance: false,
  });
  const uvDepth = makeDepthModel('magnitude', { kind: 'background', referenceLimit: 28, referenceHours: 1 });
  uvModel = await buildDesignModel(
    uv,
    uv.populations[0]!,
    { limitKind: 'magnitude', depth: uvDepth, fieldOfViewDeg2: 9.5 / 3600 },
    [0.1, 60],
    [1, 1500],
  );
}, 120_000);

const goals: [PlanGoal, number][] = [
  [{ kind: 'count' }, 0],
  [{ kind: 'faint_count' }, 0],
  [{ kind: 'sigma', parameter: 'alpha' }, 2],
  [{ kind: 'sigma', parameter: 'log10_l_star' }, 1],
  [{ kind: 'sigma', parameter: 'log10_phi_star' }, 0],
];

describe('the single-tier search equals the object-based search exactly', () => {
  for (const [goal, index] of goals) {
    test(JSON.stringify(goal), () => {
      for (const [n, minimumCount, budgetHours] of [
        [40, 0, 80],
        [301, 0, 80],
        [120, 20_000, 80],
        [60, 1e12, 80],
        [50, 0, 0.5],
      ] as const) {
        const budget: Budget = { budgetHours, overheadHours: 0.1, minimumCount };
        const exposures = logGrid(0.03, 40, n);
        const objects = searchSingleTierWithObjects(model, goal, index, budget, exposures);
        for (const keep of [true, false]) {
          const typed = searchSingleTier(model, goal, index, budget, exposures, undefined, keep);
          const what = `${n} exposures, minimum ${minimumCount}, budget ${budgetHours} h, designs kept: ${keep}`;
          expect(typed.size, what).toBe(objects.designs.length);
          expect(typed.designs(), what).toEqual(objects.designs);
          // each design read one by one (one expect over all of them)
          expect(
            Array.from({ length: typed.size }, (_, i) => typed.design(i)),
            what,
          ).toEqual(objects.designs);
          expect(typed.gridBestIndex, what).toBe(objects.gridBestIndex);
          expect(typed.best, what).toEqual(objects.best);
          expect(typed.refined, what).toBe(objects.refined);
          expect(typed.mostCount, what).toBe(objects.designs.reduce((a, d) => Math.max(a, d.count), 0));
        }
      }
    });
  }
});

describe('tierInto writes the numbers of tier', () => {
  test.each([
    ['line flux, cosmic variance', () => model],
    ['line flux, no cosmic variance', () => plainModel],
    ['magnitude, cosmic variance', () => uvModel],
  ])('%s', (_n, get) => {
    const m = get();
    const out = new Float64Array(3 * TIER_VALUES);
    for (const h of [0.03, 0.1, 0.77, 3.1, 17.7, 40])
      for (const p of [1, 7, 250, 3000]) {
        const t = m.tier(h, p);
        m.tierInto(h, p, out, TIER_VALUES);
        expect(out[TIER_VALUES], `${h} h, ${p} pointings`).toBe(t.count);
        expect(out[TIER_VALUES + 1]).toBe(t.faintCount);
        for (let j = 0; j < 3; j++)
          for (let k = 0; k < 3; k++) expect(out[TIER_VALUES + 2 + 3 * j + k], `F[${j}][${k}]`).toBe(t.fisher[j]![k]);
        expect(out[0]).toBe(0);
        expect(out[2 * TIER_VALUES]).toBe(0);
      }
  });
});

test('marginaliseNormalisationsInPlace equals marginaliseNormalisations', () => {
  const positive = fc.double({ min: 1e-3, max: 1e6, noNaN: true });
  fc.assert(
    fc.property(
      fc.array(fc.tuple(positive, fc.tuple(positive, fc.double({ min: -1e6, max: 1e6, noNaN: true }), positive)), {
        minLength: 1,
        maxLength: 8,
      }),
      fc.array(fc.oneof(fc.constant(0), fc.double({ min: 1e-4, max: 2, noNaN: true })), {
        minLength: 8,
        maxLength: 8,
      }),
      (slices, sigmas) => {
        const matrix = [
          [5e6, 2, 3],
          [2, 7e5, -1],
          [3, -1, 9e4],
        ];
        const info = slices.map(([count, b]) => ({ count, b: [...b] }));
        const fractions = sigmas.slice(0, slices.length);
        const expected = marginaliseNormalisations(matrix, info, fractions);
        const inPlace = matrix.map((r) => [...r]);
        marginaliseNormalisationsInPlace(
          inPlace,
          info.map((s) => s.count),
          info.flatMap((s) => s.b),
          fractions,
        );
        expect(inPlace).toEqual(expected);
      },
    ),
    { numRuns: 200, seed: 11 },
  );
});
