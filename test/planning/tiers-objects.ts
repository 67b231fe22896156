/**
 * The tier search as it was before its rows became typed arrays (src/planning/search.ts
 * searchTiers): every tier kept as an object and every trial combined into a new design. Kept as
 * the reference the typed rows are tested against (test/planning/tiers-typed.test.ts).
 */
import type { DesignModel, TierValue } from '../../src/planning/model.js';
import type { PlanGoal } from '../../src/model/plan.js';
import {
  better,
  budgetSplits,
  combine,
  pointingsFor,
  type Budget,
  type Evaluated,
  type TieredResult,
} from '../../src/planning/search.js';

/**
 * For each budget split (tiers ordered from the shortest exposure to the longest), coordinate
 * descent over the grid exposure of each tier, starting from exposures spread evenly over the grid.
 */
export function searchTiersWithObjects(
  model: DesignModel,
  goal: PlanGoal,
  parameterIndex: number,
  budget: Budget,
  exposures: number[],
  k: number,
  onProgress?: (done: number, total: number) => void,
): TieredResult {
  const n = exposures.length;
  const cache = new Map<number, (TierValue | undefined)[]>();
  const tierAt = (tenths: number): (TierValue | undefined)[] => {
    let row = cache.get(tenths);
    if (!row) {
      row = exposures.map((h) => {
        const p = pointingsFor(model, (tenths / 10) * budget.budgetHours, h, budget.overheadHours);
        return p >= 1 ? model.tier(h, p) : undefined;
      });
      cache.set(tenths, row);
    }
    return row;
  };
  const splits = budgetSplits(k);
  const designs: Evaluated[] = [];
  splits.forEach((split, si) => {
    const rows = split.map((f) => tierAt(Math.round(f * 10)));
    const idx = split.map((_, i) => Math.round(((i + 1) * (n - 1)) / (k + 1)));
    const valueOf = (ix: number[]): number | undefined => {
      const ts: TierValue[] = [];
      for (let i = 0; i < k; i++) {
        const t = rows[i]![ix[i]!];
        if (!t) return undefined;
        ts.push(t);
      }
      const e = combine(goal, parameterIndex, budget, ts, split, false);
      return e.feasible ? e.goal : undefined;
    };
    let current = valueOf(idx);
    for (let round = 0; round < 100; round++) {
      let changed = false;
      for (let i = 0; i < k; i++) {
        const lo = i === 0 ? 0 : idx[i - 1]! + 1;
        const hi = i === k - 1 ? n - 1 : idx[i + 1]! - 1;
        for (let e = lo; e <= hi; e++) {
          if (e === idx[i]) continue;
          const trial = [...idx];
          trial[i] = e;
          const v = valueOf(trial);
          if (v !== undefined && (current === undefined || better(goal, v, current))) {
            current = v;
            idx[i] = e;
            changed = true;
          }
        }
      }
      if (!changed) break;
    }
    if (current !== undefined) {
      designs.push(
        combine(
          goal,
          parameterIndex,
          budget,
          idx.map((e, i) => rows[i]![e]!),
          split,
          true,
        ),
      );
    }
    onProgress?.(si + 1, splits.length);
  });
  return { splits, designs };
}
