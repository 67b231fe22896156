/* Generated from specs/plan.schema.json by scripts/generate-output-types.ts: do not edit (run `npx tsx scripts/generate-output-types.ts`). */
import type { Warning } from '../../warnings.js';
import type { CosmologyBlock, ModelDescription } from './shared.js';

/**
 * Designs that spend a time budget (skytally plan). Hours per pointing, areas in deg^2, limits in limit_variable (apparent AB magnitude or line flux in erg/s/cm^2). For a tiered design the top-level exposure and limit are those of its deepest tier; pointings, area and count are totals.
 */
export interface Plan {
  format: 1;
  title: string;
  cosmology: CosmologyBlock;
  population: string;
  model: ModelDescription;
  caveat: string;
  goal:
    | ('count' | 'faint_count')
    | {
        sigma: string;
      };
  goal_direction: 'maximise' | 'minimise';
  budget_hours: number;
  overhead_hours: number;
  field_of_view_deg2: number;
  limit_variable: 'apparent_magnitude' | 'line_flux_cgs';
  /**
   * Present only when the plan's limits (reference.limit, fixed.limit, a depth_law table's rows) or else the survey's detection.limit were given as a flux density: the unit of the first so written. The limits stay AB magnitudes here; the human outputs quote them in this unit too (f_nu = 3631 Jy 10^(-0.4 m)).
   */
  limit_unit?: 'Jy' | 'mJy' | 'uJy' | 'nJy' | 'erg/s/cm^2/Hz' | 'W/m^2/Hz';
  depth_law:
    | {
        kind: 'background' | 'source';
        reference_limit: number;
        reference_exposure_hours: number;
      }
    | {
        kind: 'noise';
        reference_limit: number;
        reference_exposure_hours: number;
        sky_to_source: number;
        read_to_source: number;
        frame_hours: number;
        reference_frames: number;
      }
    | {
        kind: 'table';
        /**
         * [[hours, limit], ...]
         */
        table: number[][];
      };
  cosmic_variance: boolean;
  minimum_count: number;
  exposure_grid: {
    min_hours: number;
    max_hours: number;
    count: number;
  };
  tiers: number;
  /**
   * The area or the limit the plan file fixes.
   */
  fixed?:
    | {
        area_deg2: number;
      }
    | {
        limit: number;
      };
  /**
   * With robust: true in the plan section: the designs ranked by the goal at the model's pessimistic case (best is the best so ranked).
   */
  robust?: {
    draws: number;
    seed: number;
    source: 'normal' | 'draws_file';
    /**
     * 0.84 for a sigma goal, 0.16 for the count goal.
     */
    percentile: number;
    best_assumed: PlanDesign;
    best_robust: PlanDesign;
    same_design: boolean;
    /**
     * How often best_robust wins draw by draw: each draw ranks the same designs (those listed and the refined best under the assumed values, those meeting minimum_count) by that draw's goal.
     */
    agreement: {
      /**
       * Draws under which some design has a goal value (a sigma is undefined where a draw leaves a design no sources).
       */
      draws_ranked: number;
      /**
       * Fraction of draws_ranked in which best_robust has the best goal of all the designs (0 when draws_ranked is 0).
       */
      best_fraction: number;
      /**
       * Fraction of draws_ranked in which best_robust's goal is within near_best.tolerance (5 %) of that draw's best (0 when draws_ranked is 0).
       */
      near_best_fraction: number;
    };
    notes: string[];
  };
  budget_fractions?: number[][];
  /**
   * @minItems 1
   */
  designs: PlanDesign[];
  best: PlanDesign;
  neighbours: PlanDesign[];
  /**
   * The designs whose goal value is within `tolerance` (0.05) of the best: from the smallest area to the largest.
   */
  near_best: {
    tolerance: number;
    from: PlanDesign;
    to: PlanDesign;
    designs_within: number;
    contiguous: boolean;
  };
  refinement: {
    method: string;
    grid_best: PlanDesign;
    improved: boolean;
  };
  notes: string[];
  /**
   * What the reader should know although nothing stopped the work (also printed on stderr, one line each); empty when there is nothing to say.
   */
  warnings: Warning[];
}
export interface PlanDesign {
  exposure_hours_per_pointing: number;
  pointings: number;
  area_deg2: number;
  limit: number;
  count: number;
  /**
   * Expected count fainter than L* (or M*).
   */
  faint_count: number;
  goal_value: number;
  hours_used: number;
  meets_minimum_count: boolean;
  /**
   * With robust: true: the goal at the model's pessimistic case, the value 84% of the model's draws do at least as well as (the 84th percentile of a sigma, the 16th of a count).
   */
  goal_value_pessimistic?: number;
  /**
   * Fisher sigma of every parameter (sigma goal only).
   */
  sigma?: {
    [k: string]: number;
  };
  /**
   * @minItems 2
   * @maxItems 3
   */
  tiers?: PlanTier[];
}
export interface PlanTier {
  budget_fraction: number;
  exposure_hours_per_pointing: number;
  pointings: number;
  area_deg2: number;
  limit: number;
  count: number;
}
