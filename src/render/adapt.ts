/**
 * The forecast and plan results, as their commands return them, turned into what the figure and
 * report layer reads (types.ts ForecastJson, PlanJson). The input types here are structural:
 * they name only the fields read, as the forecast (src/forecast/forecast.ts, `Forecast`) and
 * plan (src/planning/plan.ts, `PlanJson`) results hold them, so this module does not import
 * those layers.
 */
import type { ForecastJson, PlanDesign, PlanJson } from './types.js';

/** The fields of a forecast result the report draws and tabulates. */
export interface ForecastResultLike {
  parameters: readonly string[];
  /** Input value of each parameter (the centre of the ellipses). */
  center: Record<string, number>;
  fisher: { sigma: Record<string, number>; correlation: number[][] };
  /** The assumed model; its quantity names what L* measures in a threshold survey. */
  model?: { quantity?: string };
  mocks?: {
    count: number;
    /** Summary of the mock fits per parameter. */
    parameters: Record<string, { mean: number; std: number }>;
    /** One row per converged mock fit, columns in the order of `parameters` (optional; null: not constrained). */
    fits?: (number | null)[][];
  };
}

/** A forecast result as the figure and report layer reads it. */
export function forecastForFigures(f: ForecastResultLike): ForecastJson {
  const out: ForecastJson = {
    parameters: [...f.parameters],
    fisher: { sigma: { ...f.fisher.sigma }, correlation: f.fisher.correlation.map((r) => [...r]) },
    center: { ...f.center },
  };
  if (typeof f.model?.quantity === 'string' && f.model.quantity.trim()) out.quantity = f.model.quantity.trim();
  if (f.mocks) {
    const summary: Record<string, { mean: number; std: number }> = {};
    for (const [k, v] of Object.entries(f.mocks.parameters)) summary[k] = { mean: v.mean, std: v.std };
    out.mocks = { count: f.mocks.count, summary, parameters: [...f.parameters] };
    if (Array.isArray(f.mocks.fits)) out.mocks.fits = f.mocks.fits.map((r) => [...r]);
  }
  return out;
}

/** One design of a plan result (the fields drawn and tabulated): the same fields as types.ts PlanDesign. */
export type PlanDesignLike = PlanDesign;

/** The fields of a plan result the report draws and tabulates. */
export interface PlanResultLike {
  goal: string | { sigma: string };
  budget_hours: number;
  designs: readonly PlanDesignLike[];
  best: PlanDesignLike;
  near_best?: { from: PlanDesignLike; to: PlanDesignLike };
}

function design(d: PlanDesignLike): PlanDesign {
  return {
    exposure_hours_per_pointing: d.exposure_hours_per_pointing,
    pointings: d.pointings,
    area_deg2: d.area_deg2,
    limit: d.limit,
    count: d.count,
    goal_value: d.goal_value,
  };
}

/** The goal as one name: "count", "faint_count" or "sigma_<parameter>". */
export function goalName(goal: PlanResultLike['goal']): string {
  return typeof goal === 'string' ? goal : `sigma_${goal.sigma}`;
}

/** A plan result as the figure and report layer reads it. */
export function planForFigures(p: PlanResultLike): PlanJson {
  const out: PlanJson = {
    goal: goalName(p.goal),
    budget_hours: p.budget_hours,
    designs: p.designs.map(design),
    best: design(p.best),
  };
  if (p.near_best) {
    out.near_best = { from: p.near_best.from.exposure_hours_per_pointing, to: p.near_best.to.exposure_hours_per_pointing };
  }
  return out;
}
