/**
 * The single-tier search as it was before it kept its grid in typed arrays (src/planning/search.ts
 * searchSingleTier): every grid design built and kept as an object. Kept as the reference the
 * typed search is tested against (test/planning/single-typed.test.ts).
 */
import type { DesignModel } from '../../src/planning/model.js';
import type { PlanGoal } from '../../src/model/plan.js';
import { better, combine, maximises, pointingsFor, type Budget, type Evaluated } from '../../src/planning/search.js';

const GOLDEN = (Math.sqrt(5) - 1) / 2;

export interface SingleTierObjects {
  exposures: number[];
  /** One entry per grid exposure with at least one pointing. */
  designs: Evaluated[];
  gridBestIndex: number;
  best: Evaluated;
  refined: boolean;
}

/** Pointings-maximising exposure of `p` pointings using the whole budget. */
function fullBudgetHours(budget: Budget, p: number): number {
  return budget.budgetHours / p - budget.overheadHours;
}

export function searchSingleTierWithObjects(
  model: DesignModel,
  goal: PlanGoal,
  parameterIndex: number,
  budget: Budget,
  exposures: number[],
  onProgress?: (done: number, total: number) => void,
): SingleTierObjects {
  const designs: Evaluated[] = [];
  const chunk = Math.max(1, Math.floor(exposures.length / 50));
  exposures.forEach((h, i) => {
    const p = pointingsFor(model, budget.budgetHours, h, budget.overheadHours);
    if (p >= 1) designs.push(combine(goal, parameterIndex, budget, [model.tier(h, p)], [1]));
    if (onProgress && (i % chunk === 0 || i === exposures.length - 1)) onProgress(i + 1, exposures.length);
  });
  let bi = -1;
  designs.forEach((d, i) => {
    if (d.feasible && (bi < 0 || better(goal, d.goal!, designs[bi]!.goal!))) bi = i;
  });
  if (bi < 0) return { exposures, designs, gridBestIndex: -1, best: designs[0]!, refined: false };
  let best = designs[bi]!;

  // Refinement on the continuous number of pointings between the grid neighbours.
  const [hMin, hMax] = [exposures[0]!, exposures[exposures.length - 1]!];
  const pOf = (d: Evaluated) => d.tiers[0]!.pointings;
  const pHi = pOf(designs[Math.max(0, bi - 1)]!);
  const pLo = pOf(designs[Math.min(designs.length - 1, bi + 1)]!);
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
  let pStar = pOf(best);
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
  for (const base of [Math.floor(pStar), pOf(best)])
    for (let k = -1; k <= 2; k++) if (base + k >= 1 && base + k <= model.maxPointings) candidates.add(base + k);
  let refined = false;
  for (const p of [...candidates].sort((x, y) => x - y)) {
    const e = evalP(p);
    if (e && e.feasible && better(goal, e.goal!, best.goal!)) {
      best = e;
      refined = true;
    }
  }
  return { exposures, designs, gridBestIndex: bi, best, refined };
}
