/**
 * The search, checked against brute force and invariants (no outside number is needed: these are
 * properties of any correct search):
 * - budgets are never exceeded and pointings are whole (fast-check over budgets, overheads, grids);
 * - a finer grid holding every point of a coarser one never finds a worse grid optimum;
 * - the refined optimum equals brute force over every whole number of pointings (each exposed for
 *   the whole budget), exactly (same evaluations), and is never worse than the grid optimum;
 * - a tiered design's Fisher matrix is the sum of its tiers', so it is never worse than
 *   its best single tier for the sigma goal.
 */
import { beforeAll, describe, expect, test } from 'vitest';
import fc from 'fast-check';
import { makeDepthModel } from '../../src/planning/depth.js';
import { buildDesignModel, type DesignModel } from '../../src/planning/model.js';
import {
  budgetSplits,
  combine,
  logGrid,
  searchSingleTier,
  searchTiers,
  type Budget,
} from '../../src/planning/search.js';
import type { PlanGoal } from '../../src/model/plan.js';
import { sample } from './helpers.js';

const survey = sample('plan-halpha-layers.yaml');
let model: DesignModel;
beforeAll(async () => {
  const depth = makeDepthModel('line_flux', { kind: 'background', referenceLimit: 6e-17, referenceHours: 1 });
  model = await buildDesignModel(
    survey,
    survey.populations[0]!,
    { limitKind: 'line_flux', depth, fieldOfViewDeg2: 0.2 },
    [0.05, 50],
    [1, 2000],
  );
}, 60_000);

const goals: PlanGoal[] = [
  { kind: 'count' },
  { kind: 'faint_count' },
  { kind: 'sigma', parameter: 'alpha' },
  { kind: 'sigma', parameter: 'log10_l_star' },
];
const paramIndex = (g: PlanGoal) =>
  g.kind === 'sigma' ? ['log10_phi_star', 'log10_l_star', 'alpha'].indexOf(g.parameter) : 0;
const better = (g: PlanGoal, a: number, b: number) => (g.kind === 'sigma' ? a <= b : a >= b);

describe('budgets and whole pointings', () => {
  test('every design of random plans stays within its budget with whole pointings', () => {
    fc.assert(
      fc.property(
        fc.double({ min: 2, max: 200, noNaN: true }),
        fc.double({ min: 0, max: 0.5, noNaN: true }),
        fc.integer({ min: 2, max: 60 }),
        fc.constantFrom(...goals),
        (budgetHours, overheadHours, count, goal) => {
          const budget: Budget = { budgetHours, overheadHours, minimumCount: 0 };
          const r = searchSingleTier(
            model,
            goal,
            paramIndex(goal),
            budget,
            logGrid(0.05, Math.min(50, budgetHours - overheadHours), count),
          );
          for (const d of [...r.designs(), r.best]) {
            expect(d.hoursUsed).toBeLessThanOrEqual(budgetHours * (1 + 1e-12));
            for (const t of d.tiers) {
              expect(Number.isInteger(t.pointings)).toBe(true);
              expect(t.pointings).toBeGreaterThanOrEqual(1);
            }
          }
        },
      ),
      { numRuns: 40, seed: 5 },
    );
  });
  test('tiered designs stay within the budget, each tier within its share', () => {
    const budget: Budget = { budgetHours: 80, overheadHours: 0.1, minimumCount: 0 };
    const r = searchTiers(model, goals[2]!, 2, budget, logGrid(0.2, 40, 40), 3);
    expect(r.designs.length).toBeGreaterThan(0);
    for (const d of r.designs) {
      expect(d.hoursUsed).toBeLessThanOrEqual(80 * (1 + 1e-12));
      d.tiers.forEach((t, i) => {
        expect(Number.isInteger(t.pointings)).toBe(true);
        expect(t.pointings * (t.hours + 0.1)).toBeLessThanOrEqual(d.fractions[i]! * 80 * (1 + 1e-12));
      });
    }
  });
});

describe('grid, refinement and brute force', () => {
  test.each(goals.map((g) => [JSON.stringify(g), g] as const))(
    '%s: a finer (nested) grid never finds a worse grid optimum',
    (_n, goal) => {
      const budget: Budget = { budgetHours: 60, overheadHours: 0.2, minimumCount: 0 };
      let previous: number | undefined;
      for (const n of [5, 9, 17, 33, 65, 129]) {
        const r = searchSingleTier(model, goal, paramIndex(goal), budget, logGrid(0.05, 50, n));
        const v = r.design(r.gridBestIndex).goal!;
        if (previous !== undefined) expect(better(goal, v, previous)).toBe(true);
        previous = v;
        expect(better(goal, r.best.goal!, v)).toBe(true);
      }
    },
  );
  test.each(goals.map((g) => [JSON.stringify(g), g] as const))(
    '%s: the refined optimum equals brute force over whole pointings',
    (_n, goal) => {
      const budget: Budget = { budgetHours: 60, overheadHours: 0.2, minimumCount: 0 };
      const r = searchSingleTier(model, goal, paramIndex(goal), budget, logGrid(0.05, 50, 40));
      // Brute force: every whole number of pointings, each exposed for the rest of the budget.
      let bestValue: number | undefined;
      for (let p = 1; p <= 60 / 0.25; p++) {
        const h = 60 / p - 0.2;
        if (h < 0.05 || h > 50) continue;
        const e = combine(goal, paramIndex(goal), budget, [model.tier(h, p)], [1]);
        if (e.feasible && (bestValue === undefined || !better(goal, bestValue, e.goal!))) bestValue = e.goal!;
      }
      expect(bestValue).toBeDefined();
      expect(Math.abs(r.best.goal! / bestValue! - 1)).toBeLessThan(1e-12);
    },
  );
});

describe('tiers', () => {
  test('budget splits in tenths: 9 for two tiers, 36 for three, each summing to 1', () => {
    expect(budgetSplits(2)).toHaveLength(9);
    expect(budgetSplits(3)).toHaveLength(36);
    for (const s of budgetSplits(3)) expect(s.reduce((a, b) => a + b, 0)).toBeCloseTo(1, 12);
  });
  test('a tiered design is never worse than its best single tier for the sigma goal', () => {
    const goal = goals[2]!;
    const budget: Budget = { budgetHours: 80, overheadHours: 0.1, minimumCount: 0 };
    fc.assert(
      fc.property(
        fc.array(
          fc.record({ hours: fc.double({ min: 0.05, max: 50, noNaN: true }), share: fc.integer({ min: 1, max: 8 }) }),
          { minLength: 2, maxLength: 3 },
        ),
        fc.integer({ min: 0, max: 2 }),
        (tiers, j) => {
          const total = tiers.reduce((a, t) => a + t.share, 0);
          const values = tiers
            .map((t) => ({ ...t, p: Math.floor(((t.share / total) * 80) / (t.hours + 0.1)) }))
            .filter((t) => t.p >= 1)
            .map((t) => model.tier(t.hours, t.p));
          if (values.length < 2) return;
          const g: PlanGoal = { kind: 'sigma', parameter: ['log10_phi_star', 'log10_l_star', 'alpha'][j]! };
          const tiered = combine(
            g,
            j,
            budget,
            values,
            values.map(() => 1 / values.length),
          );
          for (const v of values) {
            const alone = combine(g, j, budget, [v], [1]);
            if (alone.goal !== undefined) expect(tiered.goal!).toBeLessThanOrEqual(alone.goal * (1 + 1e-12));
          }
          void goal;
        },
      ),
      { numRuns: 60, seed: 11 },
    );
  });
});
