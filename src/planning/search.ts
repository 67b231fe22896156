/**
 * The search over designs: a log-spaced grid of exposure per pointing, golden-section refinement
 * of the best grid design on the continuous number of pointings (each pointing then exposed for
 * the whole remaining budget), whole pointings enforced by evaluating the whole numbers on either
 * side; tiers by a small search over budget fractions (multiples of 0.1) with coordinate descent
 * over the grid exposures of each tier.
 */
import { TIER_VALUES, type DesignModel, type TierValue } from './model.js';
import type { PlanGoal } from '../model/plan.js';
import { fisherSigma } from './sigma.js';

export interface Budget {
  budgetHours: number;
  overheadHours: number;
  minimumCount: number;
}

export interface Evaluated {
  tiers: TierValue[];
  /** Budget fraction of each tier (1 for a single tier). */
  fractions: number[];
  count: number;
  faintCount: number;
  fisher: number[][];
  /** Goal value; undefined when it cannot be computed (singular Fisher matrix, no source). */
  goal: number | undefined;
  feasible: boolean;
  hoursUsed: number;
}

export const NEAR_BEST_TOLERANCE = 0.05;
const GOLDEN = (Math.sqrt(5) - 1) / 2;

export function maximises(goal: PlanGoal): boolean {
  return goal.kind !== 'sigma';
}

/** True when a is a better goal value than b. */
export function better(goal: PlanGoal, a: number, b: number): boolean {
  return maximises(goal) ? a > b : a < b;
}

/** sigma of parameter j from a 3 x 3 Fisher matrix by cofactors (fast path for the tier search). */
export function sigma3(f: number[][], j: number): number | undefined {
  const a = f[0]!;
  const b = f[1]!;
  const c = f[2]!;
  const det =
    a[0]! * (b[1]! * c[2]! - b[2]! * c[1]!) -
    a[1]! * (b[0]! * c[2]! - b[2]! * c[0]!) +
    a[2]! * (b[0]! * c[1]! - b[1]! * c[0]!);
  const i1 = j === 0 ? 1 : 0;
  const i2 = j === 2 ? 1 : 2;
  const cof = f[i1]![i1]! * f[i2]![i2]! - f[i1]![i2]! * f[i2]![i1]!;
  const v = cof / det;
  return v > 0 && Number.isFinite(v) ? Math.sqrt(v) : undefined;
}

export function goalOf(
  goal: PlanGoal,
  parameterIndex: number,
  count: number,
  faint: number,
  fisher: number[][],
  exact: boolean,
): number | undefined {
  if (goal.kind === 'count') return count;
  if (goal.kind === 'faint_count') return faint;
  if (!(count > 0)) return undefined;
  if (exact) return fisherSigma(fisher, parameterIndex);
  return sigma3(fisher, parameterIndex);
}

export function combine(
  goal: PlanGoal,
  parameterIndex: number,
  budget: Budget,
  tiers: TierValue[],
  fractions: number[],
  exact = true,
): Evaluated {
  let count = 0;
  let faint = 0;
  let hours = 0;
  const fisher = [
    [0, 0, 0],
    [0, 0, 0],
    [0, 0, 0],
  ];
  for (const t of tiers) {
    count += t.count;
    faint += t.faintCount;
    hours += t.pointings * (t.hours + budget.overheadHours);
    for (let j = 0; j < 3; j++) for (let k = 0; k < 3; k++) fisher[j]![k]! += t.fisher[j]![k]!;
  }
  const g = goalOf(goal, parameterIndex, count, faint, fisher, exact);
  const ok = g !== undefined && Number.isFinite(g);
  return {
    tiers,
    fractions,
    count,
    faintCount: faint,
    fisher,
    goal: ok ? g : undefined,
    feasible: ok && count >= budget.minimumCount,
    hoursUsed: hours,
  };
}

export function logGrid(minHours: number, maxHours: number, count: number): number[] {
  const out: number[] = [];
  const l0 = Math.log(minHours);
  const l1 = Math.log(maxHours);
  for (let i = 0; i < count; i++)
    out.push(i === count - 1 ? maxHours : i === 0 ? minHours : Math.exp(l0 + ((l1 - l0) * i) / (count - 1)));
  return out;
}

/** Whole pointings that fit `hours` of a budget share, capped at the whole sky. */
export function pointingsFor(model: DesignModel, shareHours: number, hours: number, overheadHours: number): number {
  return Math.min(model.maxPointings, Math.floor(shareHours / (hours + overheadHours) + 1e-9));
}

export interface SingleTierResult {
  exposures: number[];
  /** Number of designs: the grid exposures with at least one pointing, in grid order. */
  size: number;
  /** Design i (0 <= i < size), the same numbers the search evaluated; built on demand unless kept. */
  design(i: number): Evaluated;
  /** Every design, in grid order. */
  designs(): Evaluated[];
  /** The largest expected count of any design (0 when there is none). */
  mostCount: number;
  gridBestIndex: number;
  best: Evaluated;
  refined: boolean;
}

/** Pointings-maximising exposure of `p` pointings using the whole budget. */
function fullBudgetHours(budget: Budget, p: number): number {
  return budget.budgetHours / p - budget.overheadHours;
}

/**
 * The best design of one tier: the grid, then the refinement. Every grid design is evaluated, but
 * only its pointings, goal value and count are kept (typed arrays) unless `keepDesigns`: a design
 * asked for is evaluated again (the same numbers: the model is deterministic), so a search of
 * 20,000 exposures holds a few hundred kilobytes rather than 20,000 objects when only its best
 * designs are wanted (the tier search's plans).
 */
export function searchSingleTier(
  model: DesignModel,
  goal: PlanGoal,
  parameterIndex: number,
  budget: Budget,
  exposures: number[],
  onProgress?: (done: number, total: number) => void,
  keepDesigns = true,
): SingleTierResult {
  const n = exposures.length;
  const at = new Int32Array(n); // grid index of design i
  const pointings = new Float64Array(n);
  const goals = new Float64Array(n); // NaN where undefined
  const feasibleAt = new Uint8Array(n);
  const kept: Evaluated[] = [];
  let size = 0;
  let mostCount = 0;
  const row = new Float64Array(TIER_VALUES);
  const fisher = [
    [0, 0, 0],
    [0, 0, 0],
    [0, 0, 0],
  ];
  const chunk = Math.max(1, Math.floor(n / 50));
  for (let i = 0; i < n; i++) {
    const h = exposures[i]!;
    const p = pointingsFor(model, budget.budgetHours, h, budget.overheadHours);
    if (p >= 1) {
      let g: number | undefined;
      let feasible: boolean;
      let count: number;
      if (keepDesigns) {
        const e = combine(goal, parameterIndex, budget, [model.tier(h, p)], [1]);
        kept.push(e);
        ({ goal: g, feasible, count } = e);
      } else {
        // combine() of the one tier, without building it: the same sums from zero
        model.tierInto(h, p, row, 0);
        count = 0 + row[0]!;
        const faint = 0 + row[1]!;
        for (let j = 0; j < 3; j++) for (let c = 0; c < 3; c++) fisher[j]![c] = 0 + row[2 + 3 * j + c]!;
        const v = goalOf(goal, parameterIndex, count, faint, fisher, true);
        const ok = v !== undefined && Number.isFinite(v);
        g = ok ? v : undefined;
        feasible = ok && count >= budget.minimumCount;
      }
      at[size] = i;
      pointings[size] = p;
      goals[size] = g ?? NaN;
      feasibleAt[size] = feasible ? 1 : 0;
      mostCount = Math.max(mostCount, count);
      size++;
    }
    if (onProgress && (i % chunk === 0 || i === n - 1)) onProgress(i + 1, n);
  }
  const design = (i: number): Evaluated => {
    if (!(i >= 0 && i < size)) throw new Error(`internal: design ${i} of ${size}`);
    if (keepDesigns) return kept[i]!;
    return combine(goal, parameterIndex, budget, [model.tier(exposures[at[i]!]!, pointings[i]!)], [1]);
  };
  const designs = (): Evaluated[] => (keepDesigns ? kept : Array.from({ length: size }, (_, i) => design(i)));
  const result = { exposures, size, design, designs, mostCount };

  let bi = -1;
  for (let i = 0; i < size; i++) {
    if (feasibleAt[i] && (bi < 0 || better(goal, goals[i]!, goals[bi]!))) bi = i;
  }
  if (bi < 0) return { ...result, gridBestIndex: -1, best: design(0), refined: false };
  let best = design(bi);

  // Refinement on the continuous number of pointings between the grid neighbours.
  const [hMin, hMax] = [exposures[0]!, exposures[n - 1]!];
  const pHi = pointings[Math.max(0, bi - 1)]!;
  const pLo = pointings[Math.min(size - 1, bi + 1)]!;
  const evalP = (p: number): Evaluated | undefined => {
    const h = fullBudgetHours(budget, p);
    if (!(h >= hMin * (1 - 1e-12)) || !(h <= hMax * (1 + 1e-12))) return undefined;
    return combine(goal, parameterIndex, budget, [model.tier(Math.min(hMax, Math.max(hMin, h)), p)], [1]);
  };
  const score = (p: number): number => {
    const e = evalP(p);
    if (!e || !e.feasible) return maximises(goal) ? -Infinity : Infinity;
    return e.goal!;
  };
  let pStar = pointings[bi]!;
  if (pHi > pLo) {
    // Golden-section search in ln P (continuous pointings), a unimodal bracket assumed.
    let a = Math.log(Math.max(1, pLo));
    let b = Math.log(pHi);
    let c = b - GOLDEN * (b - a);
    let d = a + GOLDEN * (b - a);
    let fc = score(Math.exp(c));
    let fd = score(Math.exp(d));
    for (let it = 0; it < 60 && b - a > 1e-9; it++) {
      if (better(goal, fc, fd) || fc === fd) {
        b = d;
        d = c;
        fd = fc;
        c = b - GOLDEN * (b - a);
        fc = score(Math.exp(c));
      } else {
        a = c;
        c = d;
        fc = fd;
        d = a + GOLDEN * (b - a);
        fd = score(Math.exp(d));
      }
    }
    pStar = Math.exp(0.5 * (a + b));
  }
  // Whole pointings: the whole numbers around the continuous optimum and the grid best's own.
  const candidates = new Set<number>();
  for (const base of [Math.floor(pStar), pointings[bi]!])
    for (let k = -1; k <= 2; k++) if (base + k >= 1 && base + k <= model.maxPointings) candidates.add(base + k);
  let refined = false;
  for (const p of [...candidates].sort((x, y) => x - y)) {
    const e = evalP(p);
    if (e && e.feasible && better(goal, e.goal!, best.goal!)) {
      best = e;
      refined = true;
    }
  }
  return { ...result, gridBestIndex: bi, best, refined };
}

/** Compositions of 10 tenths into k positive parts. */
export function budgetSplits(k: number): number[][] {
  const out: number[][] = [];
  const rec = (left: number, parts: number[]) => {
    if (parts.length === k - 1) {
      if (left >= 1) out.push([...parts, left]);
      return;
    }
    for (let j = 1; j <= left - (k - 1 - parts.length); j++) rec(left - j, [...parts, j]);
  };
  rec(10, []);
  return out.map((p) => p.map((j) => j / 10));
}

export interface TieredResult {
  splits: number[][];
  /** The best design found for each split (absent where no design is feasible). */
  designs: Evaluated[];
}

/**
 * For each budget split (tiers ordered from the shortest exposure to the longest), coordinate
 * descent over the grid exposure of each tier, starting from exposures spread evenly over the grid.
 */
export function searchTiers(
  model: DesignModel,
  goal: PlanGoal,
  parameterIndex: number,
  budget: Budget,
  exposures: number[],
  k: number,
  onProgress?: (done: number, total: number) => void,
): TieredResult {
  const n = exposures.length;
  // One row per budget share (in tenths): for each grid exposure, the tier's count, faint count and
  // Fisher matrix (row-major) in one typed array, ROW numbers apart; NaN count where the share buys
  // no pointing. A plan of 20,000 exposures and 3 tiers keeps 8 rows of 20,000 x 11 numbers
  // (14 MB) instead of 160,000 objects.
  const ROW = TIER_VALUES;
  const cache = new Map<number, Float64Array>();
  const tierAt = (tenths: number): Float64Array => {
    let row = cache.get(tenths);
    if (!row) {
      row = new Float64Array(n * ROW);
      for (let e = 0; e < n; e++) {
        const h = exposures[e]!;
        const p = pointingsFor(model, (tenths / 10) * budget.budgetHours, h, budget.overheadHours);
        if (p < 1) {
          row[e * ROW] = NaN;
          continue;
        }
        model.tierInto(h, p, row, e * ROW);
      }
      cache.set(tenths, row);
    }
    return row;
  };
  const splits = budgetSplits(k);
  const designs: Evaluated[] = [];
  const fisher = [
    [0, 0, 0],
    [0, 0, 0],
    [0, 0, 0],
  ];
  splits.forEach((split, si) => {
    const rows = split.map((f) => tierAt(Math.round(f * 10)));
    const idx = split.map((_, i) => Math.round(((i + 1) * (n - 1)) / (k + 1)));
    // combine(goal, parameterIndex, budget, tiers, split, false) of the tiers at ix, summed in the
    // same order, without building them
    const valueOf = (ix: number[]): number | undefined => {
      let count = 0;
      let faint = 0;
      // the matrix's nine elements in locals, each summed over the tiers in order (no nested loops:
      // this runs for every trial, and the engine compiles it at every start)
      let f00 = 0;
      let f01 = 0;
      let f02 = 0;
      let f10 = 0;
      let f11 = 0;
      let f12 = 0;
      let f20 = 0;
      let f21 = 0;
      let f22 = 0;
      for (let i = 0; i < k; i++) {
        const row = rows[i]!;
        const at = ix[i]! * ROW;
        if (Number.isNaN(row[at]!)) return undefined;
        count += row[at]!;
        faint += row[at + 1]!;
        f00 += row[at + 2]!;
        f01 += row[at + 3]!;
        f02 += row[at + 4]!;
        f10 += row[at + 5]!;
        f11 += row[at + 6]!;
        f12 += row[at + 7]!;
        f20 += row[at + 8]!;
        f21 += row[at + 9]!;
        f22 += row[at + 10]!;
      }
      const r0 = fisher[0]!;
      const r1 = fisher[1]!;
      const r2 = fisher[2]!;
      r0[0] = f00;
      r0[1] = f01;
      r0[2] = f02;
      r1[0] = f10;
      r1[1] = f11;
      r1[2] = f12;
      r2[0] = f20;
      r2[1] = f21;
      r2[2] = f22;
      const g = goalOf(goal, parameterIndex, count, faint, fisher, false);
      return g !== undefined && Number.isFinite(g) && count >= budget.minimumCount ? g : undefined;
    };
    let current = valueOf(idx);
    const trial = [...idx];
    for (let round = 0; round < 100; round++) {
      let changed = false;
      for (let i = 0; i < k; i++) {
        const lo = i === 0 ? 0 : idx[i - 1]! + 1;
        const hi = i === k - 1 ? n - 1 : idx[i + 1]! - 1;
        for (let t = 0; t < k; t++) trial[t] = idx[t]!;
        for (let e = lo; e <= hi; e++) {
          if (e === idx[i]) continue;
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
      const tiers = idx.map((e, i) => {
        const h = exposures[e]!;
        return model.tier(h, pointingsFor(model, split[i]! * budget.budgetHours, h, budget.overheadHours));
      });
      designs.push(combine(goal, parameterIndex, budget, tiers, split, true));
    }
    onProgress?.(si + 1, splits.length);
  });
  return { splits, designs };
}

/** Indices of the designs within 5 % of the best goal value. */
export function nearBest(goal: PlanGoal, designs: Evaluated[], bestValue: number): number[] {
  const out: number[] = [];
  designs.forEach((d, i) => {
    if (!d.feasible) return;
    const ok = maximises(goal)
      ? d.goal! >= (1 - NEAR_BEST_TOLERANCE) * bestValue
      : d.goal! <= (1 + NEAR_BEST_TOLERANCE) * bestValue;
    if (ok) out.push(i);
  });
  return out;
}
