/**
 * A plan: how a time budget may be spent between area and depth, as the `plan:` section of a plan
 * file gives it (read and checked by src/survey/plan-section.ts; searched by src/planning/).
 */

import type { FluxDensityUnit } from './photometry.js';

/** The limit a plan deepens: an apparent AB magnitude or a line flux in erg s^-1 cm^-2. */
export type LimitKind = 'magnitude' | 'line_flux';

/** How deep an exposure of t hours per pointing goes (src/planning/depth.ts). */
export type DepthLaw =
  | { kind: 'background' | 'source'; referenceLimit: number; referenceHours: number }
  | { kind: 'table'; hours: number[]; limits: number[] }
  | {
      /** The noise budget (src/planning/depth.ts): variance source : sky : read = 1 : skyToSource : readToSource at the reference. */
      kind: 'noise';
      referenceLimit: number;
      referenceHours: number;
      skyToSource: number;
      readToSource: number;
      /** Longest single frame, hours: an exposure t is max(1, ceil(t / frameHours)) frames, each adding read noise. */
      frameHours: number;
    };

/** Most frames the noise law's longest exposure may hold (checked when the plan is read). */
export const MAX_NOISE_FRAMES = 100_000;

export type PlanGoal = { kind: 'count' } | { kind: 'faint_count' } | { kind: 'sigma'; parameter: string };

export interface PlanSpec {
  file: string;
  limitKind: LimitKind;
  fieldOfViewDeg2: number;
  overheadHours: number;
  budgetHours: number;
  depthLaw: DepthLaw;
  fixed?: { areaDeg2: number } | { limit: number };
  goal: PlanGoal;
  minimumCount: number;
  grid: { minHours: number; maxHours: number; count: number };
  tiers: 1 | 2 | 3;
  /** The unit the plan's limits (or else detection.limit) were written in when a flux density: outputs quote limits in it beside AB. */
  limitUnit?: FluxDensityUnit;
  /** Rank the designs by the goal at the pessimistic case of the population's model_uncertainty (plan.robust). */
  robust?: boolean;
}

/** Limit -> depth d, a variable that grows as the survey deepens: the magnitude, or -log10 of the flux. */
export function depthOfLimit(kind: LimitKind, limit: number): number {
  return kind === 'magnitude' ? limit : -Math.log10(limit);
}
