/**
 * The tier search on typed rows (src/planning/search.ts, searchTiers) equals the object-based search
 * it replaced (test/planning/tiers-objects.ts) exactly: same splits, same designs, every number
 * identical (tolerance 0: the same sums in the same order), for 2 and 3 tiers, every goal, with
 * and without a minimum count, on grids of several sizes.
 */
import { beforeAll, describe, expect, test } from 'vitest';
import { makeDepthModel } from '../../src/planning/depth.js';
import { buildDesignModel, type DesignModel } from '../../src/planning/model.js';
import { logGrid, searchTiers, type Budget } from '../../src/planning/search.js';
import type { PlanGoal } from '../../src/model/plan.js';
import { searchTiersWithObjects } from './tiers-objects.js';
import { sample } from './helpers.js';

const survey = sample('plan-halpha-layers.yaml');
let model: DesignModel;
beforeAll(async () => {
  const depth = makeDepthModel('line_flux', { kind: 'background', referenceLimit: 6e-17, referenceHours: 1 });
  model = await buildDesignModel(
    survey,
    survey.populations[0]!,
    { limitKind: 'line_flux', depth, fieldOfViewDeg2: 0.2 },
    [0.03, 40],
    [1, 3000],
  );
}, 60_000);

const goals: [PlanGoal, number][] = [
  [{ kind: 'count' }, 0],
  [{ kind: 'faint_count' }, 0],
  [{ kind: 'sigma', parameter: 'alpha' }, 2],
  [{ kind: 'sigma', parameter: 'log10_l_star' }, 1],
  [{ kind: 'sigma', parameter: 'log10_phi_star' }, 0],
];

describe('typed tier rows equal the object-based search exactly', () => {
  for (const [goal, index] of goals) {
    for (const k of [2, 3]) {
      test(`${JSON.stringify(goal)}, ${k} tiers`, () => {
        for (const [n, minimumCount] of [
          [40, 0],
          [301, 0],
          [120, 20_000],
        ] as const) {
          const budget: Budget = { budgetHours: 80, overheadHours: 0.1, minimumCount };
          const exposures = logGrid(0.03, 40, n);
          const typed = searchTiers(model, goal, index, budget, exposures, k);
          const objects = searchTiersWithObjects(model, goal, index, budget, exposures, k);
          if (minimumCount === 0) expect(typed.designs.length, `${n} exposures`).toBeGreaterThan(0);
          expect(typed).toEqual(objects);
        }
      });
    }
  }
});
